/**
 * The tracking CSV a carrier's shipping desk exports: one parcel per line, named by the kit number the
 * instructor gave as its reference. The same checks run in the browser for the preview and on the
 * server before anything is written, so the preview never promises what the commit then refuses.
 */
import { z } from "zod";
import { storableText } from "~/lib/forms/storable-text";
import { kitStateLabels, type KitState } from "~/lib/kits/kit-states";

/** Outbound: kits going to students; return: kits coming back to the course. */
export const trackingDirections = ["outbound", "return"] as const;
export type TrackingDirection = (typeof trackingDirections)[number];

export const trackingColumns = ["kit", "tracking", "carrier", "date"] as const;
type TrackingColumn = (typeof trackingColumns)[number];

/** The header words carrier desks commonly use, after `normaliseTrackingHeader` folded them. */
const headerWords: Record<string, TrackingColumn> = {
  kit: "kit",
  "kit number": "kit",
  reference: "kit",
  "reference 1": "kit",
  ref: "kit",
  "customer reference": "kit",
  tracking: "tracking",
  "tracking number": "tracking",
  "tracking code": "tracking",
  "tracking id": "tracking",
  carrier: "carrier",
  "carrier name": "carrier",
  courier: "carrier",
  date: "date",
  "ship date": "date",
  "shipping date": "date",
  "shipped on": "date",
  "dispatch date": "date",
};

/** Case, underscores, dashes, "#" and "no." folded away: "Tracking_No." and "TRACKING #" both read "tracking number". */
export function normaliseTrackingHeader(header: string): string {
  const folded = header
    .toLowerCase()
    .replace(/#/g, " number ")
    .replace(/[_\-.:]+/g, " ")
    .replace(/\bno\b/g, "number")
    .replace(/\s+/g, " ")
    .trim();
  return headerWords[folded] ?? folded;
}

const columnNames: Record<TrackingColumn, string> = {
  kit: "the kit number (Reference or Kit)",
  tracking: "the tracking number (Tracking number or Tracking)",
  carrier: "the carrier (Carrier)",
  date: "the ship date (Ship date or Date)",
};

/** Our own template: the headers we read best, and one example row. */
export const trackingTemplateCsv = ["Reference,Tracking number,Carrier,Ship date", "K-01,PW0001234567,Parcelwise,2027-01-18"].join("\r\n");

/** A line of the file as written (trimmed), numbered as a spreadsheet shows it. */
export type TrackingRow = { line: number; kit: string; tracking: string; carrier: string; date: string };

export function trackingRowsFromRecords(records: Record<string, string | undefined>[]): TrackingRow[] {
  return records.map((record, index) => ({
    line: index + 2,
    kit: (record.kit ?? "").trim(),
    tracking: (record.tracking ?? "").trim(),
    carrier: (record.carrier ?? "").trim(),
    date: (record.date ?? "").trim(),
  }));
}

/** The problems of the file as a whole: a column we need that it does not have. */
export function missingTrackingColumns(headers: string[]): string[] {
  return trackingColumns
    .filter((column) => !headers.includes(column))
    .map((column) => `The file has no column for ${columnNames[column]}.`);
}

/** What a preview needs to know of each kit of the course. */
export type TrackingKit = {
  id: string;
  number: string;
  state: KitState;
  holderName: string | null;
  carrier: string | null;
  trackingNumber: string | null;
  shippedOn: string | null;
  returnCarrier: string | null;
  returnTrackingNumber: string | null;
  returnShippedOn: string | null;
};

export type Parcel = { carrier: string; trackingNumber: string; shippedOn: string };

/**
 * `ship`: packed → in transit; `return`: at home (or in transit) → coming back; `correct`: the kit is
 * already on that leg and its parcel changes; `same`: it already has this parcel, nothing is written.
 */
export type TrackingOutcome = "ship" | "return" | "correct" | "same";

export type TrackingRowCheck = {
  row: TrackingRow;
  kit: TrackingKit | null;
  outcome: TrackingOutcome | null;
  parcel: Parcel | null;
  problems: string[];
};

/** What each leg's import does with a kit in each state: a move, a correction, or nothing it accepts. */
const legs: Record<TrackingDirection, { moveFrom: KitState[]; correctIn: KitState; needs: string }> = {
  outbound: {
    moveFrom: ["packed"],
    correctIn: "in_transit",
    needs: "an outbound parcel needs a packed kit (or one in transit, to correct it)",
  },
  return: {
    moveFrom: ["at_home", "in_transit"],
    correctIn: "coming_back",
    needs: "a return parcel needs a kit at home or in transit (or one coming back, to correct it)",
  },
};

const parcelOf = (kit: TrackingKit, direction: TrackingDirection): Partial<Parcel> =>
  direction === "outbound"
    ? { carrier: kit.carrier ?? undefined, trackingNumber: kit.trackingNumber ?? undefined, shippedOn: kit.shippedOn ?? undefined }
    : {
        carrier: kit.returnCarrier ?? undefined,
        trackingNumber: kit.returnTrackingNumber ?? undefined,
        shippedOn: kit.returnShippedOn ?? undefined,
      };

/**
 * A ship date as an ISO date: 2027-01-18 (a time after it is ignored), 2027/01/18 or 18.01.2027. A date
 * with slashes and the year last is refused: 03/04/2027 is March in one country and April in another.
 */
export function parseShipDate(text: string): string | null {
  const iso = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:[T ].*)?$/.exec(text);
  const dotted = /^(\d{1,2})\.(\d{1,2})\.(\d{4})$/.exec(text);
  const parts = iso ? { year: iso[1], month: iso[2], day: iso[3] } : dotted ? { year: dotted[3], month: dotted[2], day: dotted[1] } : null;
  if (!parts) return null;
  const { year, month, day } = parts;
  const date = new Date(Date.UTC(Number(year), Number(month) - 1, Number(day)));
  const written = `${year}-${month.padStart(2, "0")}-${day.padStart(2, "0")}`;
  return date.toISOString().slice(0, 10) === written ? written : null;
}

/** Tracking numbers are often printed in groups ("1Z 999 AA1"); the carrier's lookup takes them whole. */
const wholeTrackingNumber = (text: string) => text.replace(/\s+/g, "");

export function checkTrackingRows(rows: TrackingRow[], direction: TrackingDirection, courseKits: TrackingKit[]): TrackingRowCheck[] {
  // Kit numbers are matched as written, else regardless of case (desks often upper-case references).
  const byNumber = new Map(courseKits.map((kit) => [kit.number, kit]));
  const byFolded = new Map<string, TrackingKit | null>();
  for (const kit of courseKits) {
    const folded = kit.number.toLowerCase();
    byFolded.set(folded, byFolded.has(folded) ? null : kit);
  }
  const firstLineOfKit = new Map<string, number>();
  const firstLineOfTracking = new Map<string, number>();
  const leg = legs[direction];

  return rows.map((row) => {
    const problems: string[] = [];
    const kit = row.kit ? (byNumber.get(row.kit) ?? byFolded.get(row.kit.toLowerCase()) ?? null) : null;
    if (!row.kit) problems.push("The kit number (reference) is missing.");
    else if (!kit) problems.push(`There is no kit “${row.kit}” in this course.`);
    else if (firstLineOfKit.has(kit.id)) problems.push(`Kit ${kit.number} is also on line ${firstLineOfKit.get(kit.id)}.`);
    else firstLineOfKit.set(kit.id, row.line);

    const trackingNumber = wholeTrackingNumber(row.tracking);
    if (!trackingNumber) problems.push("The tracking number is missing.");
    else if (trackingNumber.length > 60) problems.push("The tracking number is longer than 60 characters.");
    else if (firstLineOfTracking.has(trackingNumber))
      problems.push(`The same tracking number is on line ${firstLineOfTracking.get(trackingNumber)}.`);
    else firstLineOfTracking.set(trackingNumber, row.line);
    if (!row.carrier) problems.push("The carrier is missing.");
    else if (row.carrier.length > 60) problems.push("The carrier's name is longer than 60 characters.");
    const shippedOn = row.date ? parseShipDate(row.date) : null;
    if (!row.date) problems.push("The ship date is missing.");
    else if (!shippedOn) problems.push(`“${row.date}” is not a date we can read; write it as YYYY-MM-DD.`);
    if ([row.kit, row.tracking, row.carrier].some((cell) => !storableText.safeParse(cell).success))
      problems.push("Remove the control character or broken symbol from this line.");

    const parcel = trackingNumber && row.carrier && shippedOn ? { carrier: row.carrier, trackingNumber, shippedOn } : null;
    let outcome: TrackingOutcome | null = null;
    if (kit && parcel) {
      const current = parcelOf(kit, direction);
      const sameParcel =
        current.trackingNumber === parcel.trackingNumber && current.carrier === parcel.carrier && current.shippedOn === parcel.shippedOn;
      // A desk's export often repeats earlier days' parcels: a kit that already has this one is left alone, whatever its state.
      if (sameParcel) outcome = "same";
      else if (leg.moveFrom.includes(kit.state)) outcome = direction === "outbound" ? "ship" : "return";
      else if (kit.state === leg.correctIn) outcome = "correct";
      else problems.push(`Kit ${kit.number} is ${kitStateLabels[kit.state].toLowerCase()}: ${leg.needs}.`);
    }
    return { row, kit, outcome: problems.length ? null : outcome, parcel, problems };
  });
}

/** The words the preview shows for what a row will do. */
export function outcomeWords(check: TrackingRowCheck, direction: TrackingDirection): string {
  switch (check.outcome) {
    case "ship":
      return "To in transit; the student is e-mailed the tracking number";
    case "return":
      return "To coming back, with this return parcel";
    case "correct":
      return direction === "outbound" ? "Tracking changed (no new e-mail)" : "Return tracking changed";
    case "same":
      return "Already has this parcel: nothing changes";
    default:
      return "";
  }
}

export const maxTrackingRows = 2000;

/** What the browser posts to commit: the rows it previewed, checked again by the server. */
export const trackingCommit = z.object({
  direction: z.enum(trackingDirections, { error: "Choose whether the parcels go out or come back." }),
  importKey: z.string().trim().min(8, "The import key is missing; read the file again.").max(200),
  rows: z
    .string()
    .transform((text, context) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        context.addIssue({ code: "custom", message: "The rows did not arrive intact; read the file again." });
        return z.NEVER;
      }
    })
    .pipe(
      z
        .array(
          z.object({
            line: z.number().int().positive(),
            kit: storableText.max(200),
            tracking: storableText.max(200),
            carrier: storableText.max(200),
            date: storableText.max(200),
          }),
        )
        .min(1, "The file has no parcels in it.")
        .max(maxTrackingRows, `Import at most ${maxTrackingRows} parcels at a time.`),
    ),
});
