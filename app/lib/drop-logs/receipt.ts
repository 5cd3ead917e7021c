/** The hand-in receipt's time, as the page and the e-mail both say it. */
import { formatDateTime } from "../format-date";

/** To the second, in the course's zone, with the zone named: a student abroad reads which clock it is. */
export const receiptTimeText = (at: Date | string, timeZone: string) => `${formatDateTime(at, timeZone, "seconds")} (${timeZone} time)`;
