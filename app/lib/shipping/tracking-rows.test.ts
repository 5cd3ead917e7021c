import { describe, expect, it } from "vitest";
import {
  checkTrackingRows,
  missingTrackingColumns,
  normaliseTrackingHeader,
  parseShipDate,
  trackingRowsFromRecords,
  type TrackingKit,
} from "./tracking-rows";

const kit = (number: string, state: TrackingKit["state"], extra: Partial<TrackingKit> = {}): TrackingKit => ({
  id: `id-${number}`,
  number,
  state,
  holderName: "Ada Student",
  carrier: null,
  trackingNumber: null,
  shippedOn: null,
  returnCarrier: null,
  returnTrackingNumber: null,
  returnShippedOn: null,
  ...extra,
});

const row = (line: number, kitNumber: string, tracking = `PW${line}`, date = "2027-01-18", carrier = "Parcelwise") => ({
  line,
  kit: kitNumber,
  tracking,
  carrier,
  date,
});

describe("the tracking file's headers", () => {
  it.each([
    ["Reference", "kit"],
    ["KIT", "kit"],
    ["Tracking number", "tracking"],
    ["Tracking_No.", "tracking"],
    ["TRACKING #", "tracking"],
    ["Carrier", "carrier"],
    ["Ship date", "date"],
    ["ship-date", "date"],
    ["Date", "date"],
  ])("reads %s as %s", (header, column) => {
    expect(normaliseTrackingHeader(header)).toBe(column);
  });

  it("names each column a file lacks", () => {
    expect(missingTrackingColumns(["kit", "tracking", "weight"])).toEqual([
      "The file has no column for the carrier (Carrier).",
      "The file has no column for the ship date (Ship date or Date).",
    ]);
  });

  it("numbers the lines as a spreadsheet does and trims the cells", () => {
    expect(trackingRowsFromRecords([{ kit: " K-1 ", tracking: "PW1", carrier: "Parcelwise" }])).toEqual([
      { line: 2, kit: "K-1", tracking: "PW1", carrier: "Parcelwise", date: "" },
    ]);
  });
});

describe("ship dates", () => {
  it.each([
    ["2027-01-18", "2027-01-18"],
    ["2027-1-8", "2027-01-08"],
    ["2027/01/18", "2027-01-18"],
    ["2027-01-18 14:02:11", "2027-01-18"],
    ["18.01.2027", "2027-01-18"],
    ["2027-02-30", null],
    ["03/04/2027", null],
    ["tomorrow", null],
  ])("%s reads %s", (text, date) => {
    expect(parseShipDate(text)).toBe(date);
  });
});

describe("checking the rows", () => {
  const kits = [
    kit("K-1", "packed"),
    kit("K-2", "in_transit", { carrier: "Parcelwise", trackingNumber: "OLD2", shippedOn: "2027-01-17" }),
    kit("K-3", "at_home", { carrier: "Parcelwise", trackingNumber: "PW4", shippedOn: "2027-01-18" }),
    kit("K-4", "on_shelf"),
    kit("K-5", "coming_back", { returnCarrier: "Parcelwise", returnTrackingNumber: "R5", returnShippedOn: "2027-03-01" }),
  ];

  it("tells what each outbound row will do", () => {
    const checks = checkTrackingRows([row(2, "K-1"), row(3, "k-2"), row(4, "K-3")], "outbound", kits);
    expect(checks.map((check) => [check.kit?.number, check.outcome, check.problems])).toEqual([
      ["K-1", "ship", []],
      ["K-2", "correct", []],
      ["K-3", "same", []],
    ]);
    expect(checks[0].parcel).toEqual({ carrier: "Parcelwise", trackingNumber: "PW2", shippedOn: "2027-01-18" });
  });

  it("reads a tracking number printed in groups as one", () => {
    const [check] = checkTrackingRows([row(2, "K-1", "1Z 999 AA1")], "outbound", kits);
    expect(check.parcel?.trackingNumber).toBe("1Z999AA1");
  });

  it("names every kind of problem", () => {
    const checks = checkTrackingRows(
      [row(2, "K-9"), row(3, "K-4"), row(4, "K-1"), row(5, "K-1"), row(6, "K-2", "PW9", "31/12/2027"), row(7, "K-5", " "), row(8, "")],
      "outbound",
      kits,
    );
    expect(checks.map((check) => check.problems)).toEqual([
      ["There is no kit “K-9” in this course."],
      ["Kit K-4 is on shelf: an outbound parcel needs a packed kit (or one in transit, to correct it)."],
      [],
      ["Kit K-1 is also on line 4."],
      ["“31/12/2027” is not a date we can read; write it as YYYY-MM-DD."],
      ["The tracking number is missing."],
      ["The kit number (reference) is missing."],
    ]);
    expect(checks.filter((check) => check.problems.length).every((check) => check.outcome === null)).toBe(true);
  });

  it("refuses one tracking number for two kits", () => {
    const checks = checkTrackingRows([row(2, "K-1", "PW1"), row(3, "K-2", "PW1")], "outbound", kits);
    expect(checks[1].problems).toEqual(["The same tracking number is on line 2."]);
  });

  it("takes return parcels for kits at home or in transit, and corrects one coming back", () => {
    const checks = checkTrackingRows([row(2, "K-3"), row(3, "K-2"), row(4, "K-5"), row(5, "K-1")], "return", kits);
    expect(checks.map((check) => check.outcome ?? check.problems[0])).toEqual([
      "return",
      "return",
      "correct",
      "Kit K-1 is packed: a return parcel needs a kit at home or in transit (or one coming back, to correct it).",
    ]);
  });
});
