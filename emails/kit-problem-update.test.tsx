import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import { emailTemplates } from "./index";
import KitProblemUpdateEmail from "./kit-problem-update";

describe("kit-problem-update e-mail", () => {
  it("names the new status in the screens' words, with the replacement's tracking number", async () => {
    const props = KitProblemUpdateEmail.PreviewProps;
    const { text } = await renderEmail("kit-problem-update", props);
    expect(emailTemplates["kit-problem-update"].subject(props)).toBe("Kit DEMO-K-007: your report is now “Replacement sent”");
    expect(text).toContain("DEMO0000000042");
    expect(text).toContain(props.note);
  });

  it("leaves out the parcel when nothing was sent", async () => {
    const { text } = await renderEmail("kit-problem-update", {
      ...KitProblemUpdateEmail.PreviewProps,
      status: "resolved",
      replacementLabel: null,
      carrier: null,
      trackingNumber: null,
    });
    expect(text).toContain("Resolved");
    expect(text).not.toContain("Tracking number");
  });
});
