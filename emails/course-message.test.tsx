import { describe, expect, it } from "vitest";
import { renderEmail } from "../app/server/email/email-templates.server";
import { readableText } from "../tests/support/readable-text";

const props = {
  courseTitle: "Settling Spheres",
  authorName: "Dr Ana Lima",
  subject: "Kits go back on Monday",
  body: "Hello all,\n\nPack the column first.\nThen the spheres.\n\n<b>Not bold</b> & done",
  courseUrl: "http://127.0.0.1:3000/courses/c1",
};

describe("course-message e-mail", () => {
  it("names the course in the subject and keeps the author's paragraphs and line breaks as plain text", async () => {
    const { subject, html, text } = await renderEmail("course-message", props);
    expect(subject).toBe("Settling Spheres: Kits go back on Monday");
    // Three paragraphs; the second keeps its line break.
    expect(html.match(/<p\b/g)!.length).toBeGreaterThanOrEqual(4);
    expect(html).toContain("Pack the column first.</span><span><br/>Then the spheres.");
    // The author's text is text, never markup.
    expect(html).not.toContain("<b>Not bold</b>");
    expect(html).toContain("&lt;b&gt;Not bold&lt;/b&gt; &amp; done");
    expect(readableText(html)).toContain("Pack the column first.");
    expect(text).toContain("From Dr Ana Lima, in Settling Spheres:");
    expect(html).toContain('href="http://127.0.0.1:3000/courses/c1"');
  });
});
