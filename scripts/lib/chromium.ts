import { ensureDebianPackage } from "./debian-package";

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

/** The browser suite drives Debian's Chromium; install it when it is missing. */
export function ensureChromium(): void {
  ensureDebianPackage({
    name: "chromium",
    title: "Chromium",
    path: CHROMIUM_PATH,
    purpose: "the browser tests",
    pathVariable: "CHROMIUM_PATH",
  });
}
