import { describe, expect, it } from "vitest";
import { safetyCautions, safetyCautionsDeferral } from "../app/lib/safety/cautions";
import { renderEmail } from "../app/server/email/email-templates.server";
import { readableText } from "../tests/support/readable-text";
import KitShippedEmail from "./kit-shipped";

describe("kit-shipped e-mail", () => {
  it("carries every safety caution and the deferral to local rules, in the HTML and the plain text", async () => {
    const { html, text } = await renderEmail("kit-shipped", KitShippedEmail.PreviewProps);
    // The plain text wraps its lines, so its spaces are collapsed as the HTML's are.
    const readText = text.replace(/\s+/g, " ");
    for (const read of [readableText(html), readText]) {
      for (const caution of safetyCautions) expect(read, caution.topic).toContain(caution.text);
      expect(read).toContain(safetyCautionsDeferral);
    }
    expect(readText).toContain("DEMO0000000007");
  });
});
