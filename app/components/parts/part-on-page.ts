import type { getPartPage } from "~/server/kits/parts.server";

/** The part as its page shows it: its stored values and its history. */
export type PartOnPage = NonNullable<Awaited<ReturnType<typeof getPartPage>>>["part"];
