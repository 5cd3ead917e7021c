import { and, gt, isNull, sql } from "drizzle-orm";
import { invitations } from "~/db/schema";

/**
 * An invitation that can still be accepted: not accepted, withdrawn, sent again or past its lifetime.
 * Every list and count of open invitations (members page, kit holders, shipping addresses) uses it.
 */
export const openInvitation = and(
  isNull(invitations.acceptedAt),
  isNull(invitations.revokedAt),
  isNull(invitations.replacedById),
  gt(invitations.expiresAt, sql`now()`),
);
