import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import { readableText } from "../tests/support/readable-text";
import DeadlineReminderEmail from "./deadline-reminder";

describe("deadline-reminder e-mail", () => {
  it("says that every hand-in is kept, that the latest counts and that a late one is labelled, never that one replaces another", async () => {
    const { html, text } = await renderEmail("deadline-reminder", DeadlineReminderEmail.PreviewProps);
    for (const read of [readableText(html), text.replace(/\s+/g, " ")]) {
      expect(read).toContain("Every hand-in is kept as a version of its own, and your latest one is the one that counts.");
      expect(read).toContain("A hand-in after the due time is taken and labelled late");
      expect(read).not.toMatch(/replaces/);
    }
  });
});
