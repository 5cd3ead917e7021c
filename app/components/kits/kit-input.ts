/** The kit page's forms, one schema told apart by `intent`, read on the server and in the browser. */
import { z } from "zod";
import { partConditions } from "~/lib/kits/kit-states";

const note = z.string().trim().max(500).optional();

/** The moves that need nothing but a note; each is a button of one form. */
export const simpleMoves = ["at_home", "coming_back", "on_shelf", "retired"] as const;

/** A parcel as the carrier's receipt gives it: the kit page's shipping and a student's return alike. */
export const parcelInput = {
  carrier: z.string().trim().min(1, "Name the carrier.").max(60),
  trackingNumber: z.string().trim().min(3, "Enter the tracking number.").max(60),
  shippedOn: z.iso.date({ error: "Enter the date the parcel left." }),
};

export const kitInput = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("pack"), holderMembershipId: z.uuid({ error: "Choose the student the kit is packed for." }), note }),
  z.object({ intent: z.literal("ship"), ...parcelInput, note }),
  z.object({ intent: z.literal("move"), to: z.enum(simpleMoves), note }),
  z.object({
    intent: z.literal("check-in"),
    // One row per part of the kit; an unticked box sends nothing.
    // No condition is assumed: a damaged or missing part cannot be passed over as fine.
    parts: z.array(
      z.object({
        partId: z.uuid(),
        condition: z.enum(partConditions, { error: "Choose this part's condition." }),
        remeasure: z.literal("on").optional(),
      }),
    ),
    note,
  }),
]);
