/**
 * The invented demo scenario: the Harrowgate Institute of Technology (not a real institution) runs
 * "Fluid Mechanics at Home" with three cohorts. Everything is drawn from one seeded generator, so
 * every run produces the same people.
 */
import { Faker, en } from "@faker-js/faker";

export const DEMO_PASSWORD = "settle-slowly-42";
export const DEMO_DOMAIN = "harrowgate.example";

const DAY_MS = 86_400_000;
/** The demo's first lab opens this many days before the seeding (seeds/seed-labs.ts); the term is named after it. */
export const DEMO_TERM_OPENED_DAYS_AGO = 16;

/**
 * The term a day falls in, as the demo institute names its terms: Spring from January to May, Summer
 * in June and July, Autumn from August to December.
 */
export function termOf(day: Date, timeZone: string): string {
  const [year, month] = new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "numeric" })
    .formatToParts(day)
    .filter((part) => part.type !== "literal")
    .map((part) => Number(part.value));
  return `${year} ${month <= 5 ? "Spring" : month <= 7 ? "Summer" : "Autumn"}`;
}

const demoTimeZone = "Europe/Dublin";

/** The demo's dates follow the day it is seeded, so its term label does too (labs in November read "Autumn"). */
export const demoCourse = {
  title: "Fluid Mechanics at Home",
  code: "HIT-FM210",
  term: termOf(new Date(Date.now() - DEMO_TERM_OPENED_DAYS_AGO * DAY_MS), demoTimeZone),
  timeZone: demoTimeZone,
  localGravity: null,
} as const;

export const demoCohortNames = ["Tuesday bench", "Wednesday bench", "Thursday bench"] as const;

export type DemoPerson = { name: string; email: string; studentNumber?: string };

export type DemoScenario = {
  instructor: DemoPerson;
  /** Each TA with the cohorts (by index into demoCohortNames) they mark. */
  tas: (DemoPerson & { cohorts: number[] })[];
  /** Each student with the cohort they belong to. */
  students: (DemoPerson & { cohort: number })[];
};

const STUDENTS_PER_COHORT = 15;

function emailFor(name: string, subdomain: string, taken: Set<string>): string {
  const local = name
    .normalize("NFKD")
    .replace(/[^\w\s-]/g, "")
    .trim()
    .toLowerCase()
    .replace(/\s+/g, ".");
  let candidate = `${local}@${subdomain}${DEMO_DOMAIN}`;
  for (let suffix = 2; taken.has(candidate); suffix++) candidate = `${local}${suffix}@${subdomain}${DEMO_DOMAIN}`;
  taken.add(candidate);
  return candidate;
}

export function buildDemoScenario(seed = 2140): DemoScenario {
  const faker = new Faker({ locale: [en] });
  faker.seed(seed);
  const taken = new Set<string>();
  const person = (subdomain: string) => {
    const name = `${faker.person.firstName()} ${faker.person.lastName()}`;
    return { name, email: emailFor(name, subdomain, taken) };
  };
  return {
    instructor: { name: "Dr. Imogen Falkner", email: `instructor@${DEMO_DOMAIN}` },
    tas: [
      { ...person("staff."), cohorts: [0] },
      { ...person("staff."), cohorts: [1] },
      { ...person("staff."), cohorts: [2] },
      { ...person("staff."), cohorts: [0, 1] },
    ],
    students: demoCohortNames.flatMap((_, cohort) =>
      Array.from({ length: STUDENTS_PER_COHORT }, () => ({
        ...person("students."),
        studentNumber: String(faker.number.int({ min: 21000000, max: 21999999 })),
        cohort,
      })),
    ),
  };
}
