/** What an instructor types to create or edit a course and its cohorts; shared by form and server. */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";

/** IANA names the runtime knows (Node and browsers share the ICU list), so a typo is caught. */
export function isTimeZone(value: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: value });
    return value.includes("/") || value === "UTC";
  } catch {
    return false;
  }
}

export const partBiasAlphas = [0.01, 0.05, 0.1] as const;

export const courseInput = z.object({
  title: z.string().trim().min(3, "Give the course a title of at least 3 characters.").max(120),
  code: z.string().trim().min(2, "Enter the course code, e.g. ME 2140.").max(30),
  term: z.string().trim().min(2, "Enter the term, e.g. 2027 Spring.").max(40),
  timeZone: z.string().trim().refine(isTimeZone, "Choose a time zone by its IANA name, e.g. Europe/Dublin."),
  localGravity: z.preprocess(
    (value) => (value === "" || value === null || value === undefined ? null : value),
    typedNumber(
      z
        .number({ error: "Enter local gravity in m/s², or leave it empty for 9.80665." })
        .min(9.76, "Gravity on Earth's surface lies between 9.76 and 9.84 m/s².")
        .max(9.84, "Gravity on Earth's surface lies between 9.76 and 9.84 m/s².")
        .nullable(),
    ),
  ),
  /** Significance of the kit-part bias test; the usual choices only, so that a typo cannot silence it. */
  partBiasAlpha: typedNumber(
    z
      .number()
      .refine((alpha) => partBiasAlphas.includes(alpha as (typeof partBiasAlphas)[number]), "Choose 0.01, 0.05 or 0.10.")
      .default(0.05),
  ),
});
export type CourseInput = z.infer<typeof courseInput>;

export const cohortName = z.string().trim().min(1, "Name the cohort.").max(60, "Keep cohort names under 60 characters.");
