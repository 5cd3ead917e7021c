/**
 * The body of the 403 thrown for a cross-site write, so that the error page can tell it from "no role
 * here" and say what actually happened.
 */
export const CROSS_ORIGIN_REFUSAL = "Cross-origin request refused";
