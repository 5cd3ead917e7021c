/** Words and choices the shipping pages share with the server: none of it touches the database. */
import { kitStates } from "~/lib/kits/kit-states";

/** Students by the kit they hold: none yet, or a kit in one of its states. */
export const candidateKitStates = ["none", ...kitStates] as const;
export type CandidateKitState = (typeof candidateKitStates)[number];

/**
 * The reasons a label is not bought: the carrier's (`refused_address`, `rate_limited`, `timeout`,
 * `carrier_error`) and ours, found before asking it.
 */
export const labelFailureLabels = {
  refused_address: "Address refused",
  rate_limited: "Carrier busy",
  timeout: "No answer",
  carrier_error: "Carrier error",
  no_address: "No address",
  no_return_address: "No return address",
  no_carrier: "No carrier",
} as const;
export type LabelFailureCode = keyof typeof labelFailureLabels;
