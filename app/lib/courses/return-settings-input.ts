/** What an instructor types for the kits' return: the return-by date, the reminder days and the return address. */
import { z } from "zod";
import type { PostalAddress } from "~/lib/shipping/postal-address";

const blank = (value: unknown) => value === undefined || value === null || (typeof value === "string" && value.trim() === "");
const optionalText = (max: number) => z.preprocess((value) => (blank(value) ? null : value), z.string().trim().max(max).nullable());

/**
 * The course's return address. A stand-in until the per-country address schema
 * (app/lib/shipping/address-schema.ts) is on main: the one place to swap for it.
 */
export const returnAddressInput: z.ZodType<PostalAddress> = z.object({
  name: z.string().trim().min(1, "Name who receives the kits, e.g. the lab or the department.").max(100),
  line1: z.string().trim().min(1, "Enter the street and number.").max(100),
  line2: optionalText(100),
  city: z.string().trim().min(1, "Enter the town or city.").max(60),
  region: optionalText(60),
  postcode: optionalText(20),
  country: z
    .string()
    .trim()
    .toUpperCase()
    .regex(/^[A-Z]{2}$/, "Enter the country as its two-letter code, e.g. IE or PT."),
  phone: optionalText(30),
});

/** The most days after the return-by date a reminder can be set for: a term's length is plenty. */
export const maxReminderDay = 120;

/** "1, 7" → [1, 7]: whole days after the return-by date, in order, each once; blank sends no reminder. */
export const reminderDays = z.preprocess(
  (value) =>
    blank(value)
      ? []
      : String(value)
          .split(/[\s,;]+/)
          .filter(Boolean),
  z
    .array(
      z
        .string()
        .regex(/^\d+$/, "Give the reminder days as whole numbers separated by commas, e.g. 1, 7.")
        .transform(Number)
        .refine((day) => day >= 1 && day <= maxReminderDay, `Reminder days run from 1 to ${maxReminderDay} days after the return-by date.`),
    )
    .max(10, "Ten reminders at most.")
    .transform((days) => [...new Set(days)].sort((a, b) => a - b)),
);

export const returnSettingsInput = z.object({
  kitReturnBy: z.preprocess(
    (value) => (blank(value) ? null : value),
    z.iso.date({ error: "Enter the return-by date as a date, e.g. 2027-05-28." }).nullable(),
  ),
  kitReturnReminderDays: reminderDays,
  // Every field blank: the course has no return address yet.
  returnAddress: z.preprocess(
    (value) => (value === undefined || (typeof value === "object" && value !== null && Object.values(value).every(blank)) ? null : value),
    returnAddressInput.nullable(),
  ),
});
export type ReturnSettingsInput = z.infer<typeof returnSettingsInput>;
/** The form's fields as typed: the reminder days are one text. */
export type ReturnSettingsForm = { kitReturnBy: string; kitReturnReminderDays: string; returnAddress: PostalAddress | null };

/** How the reminder days are typed back into the form. */
export const reminderDaysText = (days: number[]) => days.join(", ");
