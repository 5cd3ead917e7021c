/**
 * Benchpost's tables and enums, one file per area; `~/db/schema` is all of them.
 * Measured values are stored in SI units unless the column name carries another unit.
 * Times are `timestamptz`; a course's IANA time zone decides how they are shown.
 */
export * from "./accounts";
export * from "./courses";
export * from "./kits";
export * from "./email";
export * from "./labs";
export * from "./shipping";
export * from "./comparison";
export * from "./marking";
