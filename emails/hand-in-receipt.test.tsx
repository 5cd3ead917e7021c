import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import { readableText } from "../tests/support/readable-text";
import HandInReceiptEmail from "./hand-in-receipt";

describe("hand-in-receipt e-mail", () => {
  it("names the version, the time in the course's zone with the zone, and whether it was late", async () => {
    // 16:42:07 UTC on 14 January is 17:42:07 in Berlin (CET, UTC+1).
    const props = { ...HandInReceiptEmail.PreviewProps, timeZone: "Europe/Berlin", late: true, version: 3 };
    const { html, text, subject } = await renderEmail("hand-in-receipt", props);
    expect(subject).toBe("Receipt: Demo lab: Drag on a settling sphere, version 3 handed in");
    for (const read of [readableText(html), text.replace(/\s+/g, " ")]) {
      expect(read).toContain("Version: 3");
      expect(read).toContain("14 Jan 2030, 17:42:07 CET");
      expect(read).toContain("Timing: After due: handed in after your due time");
    }
    expect(html).toContain('href="https://benchpost.example/courses/demo/labs/demo-lab#receipt"');
  });
});
