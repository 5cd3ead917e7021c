import addressparser from "nodemailer/lib/addressparser";
import { describe, expect, it } from "vitest";
import { formatMailbox } from "./email-transport.server";

describe("formatMailbox", () => {
  // Read back with nodemailer's own RFC 5322 address parser: one mailbox, the name and address as given.
  it.each(['Ann "Nan" Lee', "Lee, Ann <admin@example.org>", "Back\\slash", "Zoë Ångström", "O'Brien (TA)", 'trailing \\"'])(
    "keeps %j one mailbox with that name",
    (name) => {
      const mailbox = formatMailbox({ to: "ann@example.org", toName: name });
      expect(addressparser(mailbox, { flatten: true })).toEqual([{ name, address: "ann@example.org" }]);
    },
  );

  it("turns a line break into a space, so that no header can be forged", () => {
    const mailbox = formatMailbox({ to: "eve@example.org", toName: "Eve\r\nBcc: all@example.org" });
    expect(mailbox).not.toMatch(/[\r\n]/);
    expect(addressparser(mailbox, { flatten: true })).toEqual([{ name: "Eve  Bcc: all@example.org", address: "eve@example.org" }]);
  });

  it("is the bare address when there is no name", () => {
    expect(formatMailbox({ to: "ann@example.org", toName: null })).toBe("ann@example.org");
  });
});
