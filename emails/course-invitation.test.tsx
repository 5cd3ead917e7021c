import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import CourseInvitationEmail from "./course-invitation";

describe("course-invitation e-mail", () => {
  it("gives the expiry in the course's zone, with the zone named", async () => {
    // 17:00 UTC on 15 January 2030 is 18:00 in Berlin (CET, UTC+1) and 12:00 in New York (UTC−5).
    for (const [timeZone, expiry] of [
      ["Europe/Berlin", "15 Jan 2030, 18:00 CET"],
      ["America/New_York", "15 Jan 2030, 12:00 GMT-5"],
    ]) {
      const { text } = await renderEmail("course-invitation", { ...CourseInvitationEmail.PreviewProps, timeZone });
      expect(text.replace(/\s+/g, " ")).toContain(`Invitation valid until: ${expiry}`);
    }
  });
});
