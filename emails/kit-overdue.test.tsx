import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import KitOverdueEmail from "./kit-overdue";

describe("kit-overdue e-mail", () => {
  it("says where to send the kit back, line by line, and how late it is", async () => {
    const { text } = await renderEmail("kit-overdue", KitOverdueEmail.PreviewProps);
    const read = text.replace(/\s+/g, " ");
    expect(read).toContain("Fri, 28 May 2027");
    expect(read).toContain("7 days");
    expect(read).toMatch(/Demo Fluids Lab\s+1 Example Quay\s+D00 DEMO Demotown\s+IE/);
  });

  it("asks the student to wait for their instructor when the course has no return address", async () => {
    const { text } = await renderEmail("kit-overdue", { ...KitOverdueEmail.PreviewProps, returnAddress: [], daysOverdue: 1 });
    const read = text.replace(/\s+/g, " ");
    expect(read).toContain("Your instructor will tell you where to send it");
    expect(read).toContain("due back 1 day ago");
  });
});
