/** The instructor's order of a course's cohorts (set on the settings page), names breaking ties: every list of cohorts reads them so. */
import { asc } from "drizzle-orm";
import { cohorts } from "~/db/schema";

export const inCohortOrder = [asc(cohorts.position), asc(cohorts.name)] as const;
