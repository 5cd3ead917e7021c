/**
 * One print job for a shipment: a PDF with one A4 page per kit, the carrier's label at the top (at its
 * own size, so a 4×6 in label prints to scale) and the kit's packing slip below it. A kit whose label is
 * not bought yet still gets its page, with a "no label yet" box in the label's place: the packer works
 * through one stack in kit order and sees at the kit itself what is missing, instead of matching a
 * separate list at the end. Everything is read in a constant number of statements.
 */
import { and, asc, eq, getTableColumns, sql } from "drizzle-orm";
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import { cohorts, courseMemberships, invitations, kitParts, kits, parts, shipmentItems, shipments, users } from "~/db/schema";
import { describePart } from "~/lib/kits/describe-part";
import { safetyCautions, safetyCautionsDeferral } from "~/lib/safety/cautions";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import type { Executor } from "~/server/db.server";
import { jsonRows } from "~/server/json-rows.server";
import { addressesFor, auditAddressViews } from "~/server/shipping/addresses.server";
import { counted } from "~/lib/plural";

/** Each kit of a shipment with its label, holder and parts, in kit-number order: one statement. */
async function shipmentPrintItems(executor: Executor, courseId: string, shipmentId: string) {
  const contents = jsonRows(
    getTableColumns(parts),
    sql`from ${kitParts} join ${parts} on ${parts.id} = ${kitParts.partId} where ${kitParts.kitId} = ${kits.id}`,
    sql`${parts.kind}, ${parts.label}`,
  );
  const rows = await executor
    .select({
      kind: shipments.kind,
      status: shipmentItems.status,
      carrier: shipmentItems.carrier,
      service: shipmentItems.service,
      trackingNumber: shipmentItems.trackingNumber,
      labelPdf: shipmentItems.labelPdf,
      errorMessage: shipmentItems.errorMessage,
      kitNumber: kits.number,
      membershipId: kits.holderMembershipId,
      invitationId: kits.holderInvitationId,
      holderName: sql<string | null>`coalesce(${users.name}, ${invitations.name}, ${invitations.email})`,
      cohortName: cohorts.name,
      parts: contents.column,
    })
    .from(shipmentItems)
    .innerJoin(shipments, eq(shipments.id, shipmentItems.shipmentId))
    .innerJoin(kits, eq(kits.id, shipmentItems.kitId))
    .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .leftJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(invitations, eq(invitations.id, kits.holderInvitationId))
    .where(and(eq(shipments.id, shipmentId), eq(shipments.courseId, courseId)))
    .orderBy(sql`length(${kits.number})`, asc(kits.number));
  return rows.map((row) => ({ ...row, parts: contents.read(row.parts) }));
}

type PrintItem = Awaited<ReturnType<typeof shipmentPrintItems>>[number] & { address: PostalAddress | null };

/**
 * The shipment's PDF, or null when the course has no such shipment. Printing shows the students'
 * addresses to the instructor, so each one printed is audited.
 */
export async function shipmentPrintPdf(
  executor: Executor,
  {
    course,
    shipmentId,
    actorId,
    request,
  }: { course: { id: string; code: string; title: string }; shipmentId: string; actorId: string; request?: Request },
): Promise<Uint8Array | null> {
  const items = await shipmentPrintItems(executor, course.id, shipmentId);
  if (items.length === 0) return null;
  const ids = (pick: (item: (typeof items)[number]) => string | null) => items.map(pick).filter((id): id is string => id !== null);
  const addresses = await addressesFor(executor, course.id, {
    membershipIds: ids((item) => item.membershipId),
    invitationIds: ids((item) => item.invitationId),
  });
  const holderKey = (item: (typeof items)[number]) => item.membershipId ?? item.invitationId;
  const printed = items.map((item) => ({ ...item, address: addresses.get(holderKey(item) ?? "") ?? null }));
  await auditAddressViews(executor, {
    courseId: course.id,
    actorId,
    request,
    subjects: printed
      .filter((item) => item.address)
      .map((item) => (item.membershipId ? `membership:${item.membershipId}` : `invitation:${item.invitationId}`)),
    detail: { via: "shipment print" },
  });
  return renderShipmentPdf(course, printed);
}

const a4 = { width: 595.28, height: 841.89 };
const margin = 36;
/** The largest label drawn at its own size: 4×6 in, the common thermal label; larger ones are scaled down to it. */
const labelBox = { width: 288, height: 432 };
const ink = rgb(0.1, 0.1, 0.12);
const grey = rgb(0.4, 0.4, 0.45);

/** Symbols of the parts' values that WinAnsi lacks, written the way a typewriter would. */
const plainSymbols: Record<string, string> = { ρ: "rho", "≈": "~", μ: "µ", "≤": "<=", "≥": ">=", "−": "-", "→": "->" };

/**
 * Text the standard PDF fonts can draw: they know only WinAnsi (Latin-1 and a few more), and pdf-lib
 * throws on anything else. A character outside it is printed as "?", visibly, rather than dropped or
 * guessed at: a name like "Łucja" then reads "?ucja" and whoever packs sees it needs checking.
 */
export function printableText(font: PDFFont, text: string): string {
  const known = new Set(font.getCharacterSet());
  const drawable = (chars: string) => [...chars].every((char) => known.has(char.codePointAt(0)!));
  return [...text.normalize("NFC").replace(/\s+/g, " ")]
    .map((char) => {
      const plain = plainSymbols[char] ?? char;
      return drawable(plain) ? plain : "?";
    })
    .join("");
}

function wrap(font: PDFFont, text: string, size: number, width: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of text.split(/\s+/).filter(Boolean)) {
    const candidate = line ? `${line} ${word}` : word;
    if (line && font.widthOfTextAtSize(candidate, size) > width) {
      lines.push(line);
      line = word;
    } else line = candidate;
  }
  if (line) lines.push(line);
  return lines;
}

type Fonts = { regular: PDFFont; bold: PDFFont };

/** Writes wrapped lines from the top down, moving the cursor (the next line's baseline) below them. */
type Writer = (text: string, options?: { size?: number; bold?: boolean; color?: typeof ink; x?: number; width?: number }) => void;

/** Without a page it only measures: the cursor moves as if the lines were drawn. */
function writerFor(page: PDFPage | null, fonts: Fonts, start: { x: number; y: number; width: number }) {
  const cursor = { y: start.y };
  const write: Writer = (text, { size = 9, bold = false, color = ink, x = start.x, width = start.width } = {}) => {
    const font = bold ? fonts.bold : fonts.regular;
    for (const line of wrap(font, printableText(font, text), size, width)) {
      page?.drawText(line, { x, y: cursor.y, size, font, color });
      cursor.y -= size * 1.25;
    }
  };
  return { write, cursor };
}

function addressLines(address: PostalAddress): string[] {
  return [
    address.name,
    address.line1,
    address.line2,
    [address.postcode, address.city].filter(Boolean).join(" "),
    address.region,
    address.country,
    address.phone ? `Phone ${address.phone}` : null,
  ].filter((line): line is string => Boolean(line));
}

const labelMissingWords: Record<string, string> = {
  queued: "The label is waiting to be bought.",
  buying: "The label is being bought.",
  failed: "Buying the label failed",
};

async function renderShipmentPdf(course: { code: string; title: string }, items: PrintItem[]): Promise<Uint8Array> {
  const pdf = await PDFDocument.create();
  pdf.setTitle(`Shipment of ${counted(items.length, "kit", "kits")} · ${course.code}`);
  pdf.setCreator("Benchpost");
  const fonts = { regular: await pdf.embedFont(StandardFonts.Helvetica), bold: await pdf.embedFont(StandardFonts.HelveticaBold) };

  for (const item of items) {
    const page = pdf.addPage([a4.width, a4.height]);
    const labelTop = a4.height - margin;
    await drawLabel(pdf, page, fonts, item, { x: margin, y: labelTop - labelBox.height });

    // Beside the label: what the parcel is, for matching label, box and slip at a glance.
    const side = writerFor(page, fonts, {
      x: margin + labelBox.width + 18,
      y: labelTop - 22,
      width: a4.width - 2 * margin - labelBox.width - 18,
    });
    side.write(`Kit ${item.kitNumber}`, { size: 22, bold: true });
    side.cursor.y -= 4;
    side.write(`${item.kind === "return" ? "Return" : item.kind === "replacement" ? "Replacement" : "Outbound"} parcel`, { color: grey });
    side.write(
      item.trackingNumber
        ? ["Tracking", item.carrier, item.trackingNumber, item.service ? `(${item.service})` : null].filter(Boolean).join(" ")
        : "No tracking number yet",
    );
    side.cursor.y -= 8;
    side.write(`For ${item.holderName ?? "no student yet"}${item.cohortName ? ` · ${item.cohortName}` : ""}`, { bold: true });
    if (item.address) for (const line of addressLines(item.address)) side.write(line);
    else side.write("No shipping address on file.", { color: grey });

    // The cut line between the label and the slip that goes into the box.
    const cutY = labelTop - labelBox.height - 14;
    page.drawLine({
      start: { x: margin, y: cutY },
      end: { x: a4.width - margin, y: cutY },
      thickness: 0.5,
      color: grey,
      dashArray: [4, 3],
    });

    drawSlip(page, fonts, course, item, { top: cutY - 22, ...slipFit(fonts, course, item, cutY - 22) });
  }
  return pdf.save();
}

type SlipFit = { scale: number; shownParts: number };

/**
 * The packing slip below the cut line, from `top` down; returns the baseline below its last line. The
 * cautions must be on it, so a kit of many parts shrinks the slip's type (to 70 %) rather than losing
 * them, and only past that lists its last parts as "and N more".
 */
function drawSlip(
  page: PDFPage | null,
  fonts: Fonts,
  course: { code: string; title: string },
  item: PrintItem,
  fit: SlipFit & { top: number },
) {
  const { scale, shownParts } = fit;
  const slip = writerFor(page, fonts, { x: margin, y: fit.top, width: a4.width - 2 * margin });
  slip.write(`${course.code} · ${course.title}`, { size: 8, color: grey });
  slip.write(`Packing slip · Kit ${item.kitNumber}`, { size: 14, bold: true });
  slip.write(`For ${item.holderName ?? "no student yet"}`, { bold: true });
  slip.cursor.y -= 4 * scale;
  slip.write("Parts and their recorded measurements", { bold: true, size: 9 * scale });
  for (const part of item.parts.slice(0, shownParts)) {
    const { kind, values } = describePart(part);
    const rowY = slip.cursor.y;
    // A box to tick by hand as each part goes into the box.
    page?.drawRectangle({ x: margin, y: rowY - 1, width: 7 * scale, height: 7 * scale, borderColor: ink, borderWidth: 0.6 });
    slip.write(part.label, { bold: true, size: 9 * scale, x: margin + 12, width: 60 });
    const labelBottom = slip.cursor.y;
    slip.cursor.y = rowY;
    slip.write(`${kind}: ${values}`, { size: 9 * scale, x: margin + 78, width: a4.width - 2 * margin - 78 });
    slip.cursor.y = Math.min(slip.cursor.y, labelBottom);
  }
  if (item.parts.length === 0) slip.write("No parts recorded in this kit.", { color: grey, size: 9 * scale });
  if (shownParts < item.parts.length)
    slip.write(`…and ${item.parts.length - shownParts} more parts: the kit's page in Benchpost lists them all.`, {
      bold: true,
      size: 9 * scale,
    });
  slip.cursor.y -= 4 * scale;
  slip.write("When the kit arrives, open Benchpost, go to “My kit” and confirm it is complete, or report what is missing or damaged.", {
    size: 8 * scale,
  });
  slip.cursor.y -= 4 * scale;
  slip.write("Safety", { bold: true, size: 9 * scale });
  for (const caution of safetyCautions) slip.write(`${caution.topic}. ${caution.text}`, { size: 7 * scale });
  slip.write(safetyCautionsDeferral, { size: 7 * scale, color: grey });
  return slip.cursor.y;
}

/** The largest type, then the most parts, with which the slip ends above the bottom margin. */
function slipFit(fonts: Fonts, course: { code: string; title: string }, item: PrintItem, top: number): SlipFit {
  const fits = (fit: SlipFit) => drawSlip(null, fonts, course, item, { top, ...fit }) >= margin;
  const scale = [1, 0.9, 0.8, 0.7].find((candidate) => fits({ scale: candidate, shownParts: item.parts.length })) ?? 0.7;
  let shownParts = item.parts.length;
  while (shownParts > 0 && !fits({ scale, shownParts })) shownParts--;
  return { scale, shownParts };
}

async function drawLabel(pdf: PDFDocument, page: PDFPage, fonts: Fonts, item: PrintItem, at: { x: number; y: number }): Promise<void> {
  if (item.status === "bought" && item.labelPdf) {
    try {
      const [label] = await pdf.embedPdf(item.labelPdf, [0]);
      const scale = Math.min(1, labelBox.width / label.width, labelBox.height / label.height);
      const height = label.height * scale;
      page.drawPage(label, { x: at.x, y: at.y + labelBox.height - height, width: label.width * scale, height });
      return;
    } catch {
      // A label the carrier sent damaged must not stop the other kits' pages: this one says so instead.
      return drawMissingLabel(page, fonts, at, "The label file could not be read: buy it again from the shipment page.");
    }
  }
  const reason = labelMissingWords[item.status] ?? "";
  return drawMissingLabel(
    page,
    fonts,
    at,
    item.status === "failed" && item.errorMessage ? `${reason}: ${item.errorMessage}` : reason || "The label is not bought yet.",
  );
}

function drawMissingLabel(page: PDFPage, fonts: Fonts, at: { x: number; y: number }, reason: string): void {
  page.drawRectangle({ x: at.x, y: at.y, width: labelBox.width, height: labelBox.height, borderColor: ink, borderWidth: 2 });
  const box = writerFor(page, fonts, { x: at.x + 18, y: at.y + labelBox.height / 2 + 20, width: labelBox.width - 36 });
  box.write("NO LABEL YET", { size: 24, bold: true });
  box.cursor.y -= 6;
  box.write(reason, { size: 10 });
  box.write("Do not send this kit until its label is printed.", { size: 10 });
}
