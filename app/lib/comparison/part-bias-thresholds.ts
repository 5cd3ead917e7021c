/**
 * When a kit part is tested for bias (see `part-bias.ts`). Apart from the test itself, which reaches the
 * Student-t quantile (stdlib), so the inventory pages that quote these numbers do not ship it.
 */

/** At least this many hand-ins with the part, and as many with its peers, before a part is tested. */
export const MINIMUM_HAND_INS_FOR_BIAS = 3;
/**
 * Peers must come from at least this many other parts (our choice): with a single peer part a
 * difference cannot be told apart from that peer's own bias, and both parts would be flagged alike.
 */
export const MINIMUM_PEER_PARTS = 2;
