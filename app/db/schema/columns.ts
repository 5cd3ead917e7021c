import { timestamp } from "drizzle-orm/pg-core";

/** The creation time every table keeps. */
export const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
