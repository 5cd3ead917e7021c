/** The moderation page's adjustment of one mark, read on the server and in the browser. */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";

export const markAdjustment = z.object({
  intent: z.literal("adjust"),
  membershipId: z.uuid("Choose the student."),
  expectedVersion: z.coerce.number().int().min(0),
  target: z.string().min(1, "Choose what to adjust."),
  value: typedNumber(z.number({ error: "Enter a number." }).finite()),
  reason: z.string().trim().min(3, "Say why the mark is adjusted: it is kept with the change.").max(500),
});
