import { and, eq, inArray } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, invitations, kits, shippingAddresses } from "~/db/schema";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { hashToken } from "~/server/auth/tokens.server";
import { db } from "~/server/db.server";
import { acceptInvitation } from "~/server/members/invitations.server";
import {
  addressesFor,
  auditAddressViews,
  getAddress,
  importAddresses,
  previewAddressImport,
  saveAddress,
} from "~/server/shipping/addresses.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countAllStatements, countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let handle: AppHandler;
beforeAll(async () => {
  fixture = await createAccessFixture("addresses");
  handle = await createAppHandler();
});

const fernwick = {
  name: "Test ownStudent",
  line1: "12 Kiln Street",
  line2: null,
  city: "Fernwick",
  region: null,
  postcode: "FW1 2AB",
  country: "GB",
  phone: null,
} satisfies PostalAddress;
/** The same address as a form sends it: blank for what is not given. */
const fernwickForm = { ...fernwick, line2: "", region: "", phone: "" };

async function invite(email: string, courseId = fixture.courseId, expiresInDays = 14) {
  const token = `token-${email}`;
  const [row] = await db
    .insert(invitations)
    .values({
      courseId,
      email,
      role: "student",
      cohortId: courseId === fixture.courseId ? fixture.cohortId : null,
      tokenHash: hashToken(token),
      expiresAt: new Date(Date.now() + expiresInDays * 24 * 3600 * 1000),
    })
    .returning({ id: invitations.id });
  return { id: row.id, token };
}

async function auditOf(action: string, subject: string) {
  return db
    .select({ actorId: auditEvents.actorId, detail: auditEvents.detail })
    .from(auditEvents)
    .where(and(eq(auditEvents.action, action), eq(auditEvents.subject, subject)));
}

const csvOf = (rows: string[]) => ["email,name,line1,line2,city,region,postcode,country,phone", ...rows].join("\n");
/** A page's text without the comments React puts between adjacent text pieces. */
const words = (html: string) => html.replaceAll("<!-- -->", "");

describe("addresses for server work", () => {
  it("reads many owners' addresses in one statement, and audits many views in one INSERT naming whose", async () => {
    const course = await createAccessFixture("addresses-many");
    const invited = await invite("later.student@addresses.example", course.courseId);
    const actor = course.userIds.instructor;
    await saveAddress(db, {
      courseId: course.courseId,
      actorId: actor,
      owner: { membershipId: course.membershipIds.ownStudent },
      address: fernwick,
    });
    await saveAddress(db, {
      courseId: course.courseId,
      actorId: actor,
      owner: { invitationId: invited.id },
      address: { ...fernwick, name: "Later Student", postcode: "FW9 9ZZ" },
    });
    const { statements, result } = await countStatements(() =>
      addressesFor(db, course.courseId, {
        membershipIds: [course.membershipIds.ownStudent, course.membershipIds.sameCohortStudent],
        invitationIds: [invited.id],
      }),
    );
    expect(statements).toBe(1);
    expect([...result.keys()].sort()).toEqual([course.membershipIds.ownStudent, invited.id].sort());
    expect(result.get(invited.id)).toMatchObject({ name: "Later Student", postcode: "FW9 9ZZ" });
    // Another course's addresses are not read through this one.
    expect((await addressesFor(db, fixture.courseId, { invitationIds: [invited.id] })).size).toBe(0);

    const audited = await countStatements(() =>
      auditAddressViews(db, {
        courseId: course.courseId,
        actorId: actor,
        subjects: [course.membershipIds.ownStudent, `invitation:${invited.id}`],
      }),
    );
    expect(audited.statements).toBe(1);
    expect(await auditOf("address.viewed", `membership:${course.membershipIds.ownStudent}`)).toEqual([{ actorId: actor, detail: {} }]);
    expect(await auditOf("address.viewed", `invitation:${invited.id}`)).toHaveLength(1);
  });
});

describe("the student's own address page", () => {
  const page = () => `/courses/${fixture.courseId}/my-address`;

  it("refuses TAs and instructors (403, audited as a refused access) and writes nothing for them", async () => {
    for (const actor of ["assignedTa", "instructor"] as const) {
      const response = await handle(appRequest(page(), { cookie: await sessionCookieFor(fixture.userIds[actor]) }));
      expect(response.status).toBe(403);
    }
    const refused = await db
      .select({ actorId: auditEvents.actorId })
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "access.denied"), eq(auditEvents.subject, `path:${page()}`)));
    expect(refused.map((row) => row.actorId)).toEqual(expect.arrayContaining([fixture.userIds.assignedTa, fixture.userIds.instructor]));
    const post = await handle(
      appRequest(page(), { cookie: await sessionCookieFor(fixture.userIds.assignedTa), form: { intent: "save", ...fernwickForm } }),
    );
    expect(post.status).toBe(403);
    expect(await getAddress(db, fixture.courseId, { membershipId: fixture.membershipIds.assignedTa })).toBeNull();
  });

  it("answers a bad address with each message at its field, keeping what was typed", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const response = await handle(
      appRequest(page(), {
        cookie,
        form: {
          intent: "save",
          name: "Ada Typed-Name",
          line1: "40 Weir Road",
          city: "",
          region: "Nowhere",
          postcode: "1234",
          country: "US",
        },
      }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("Enter the town or city.");
    expect(html).toContain("“1234” is not a postcode there; write it like 12345 or 12345-6789.");
    expect(html).toContain("“Nowhere” is not a state code; write it like NY.");
    expect(html).toContain('value="Ada Typed-Name"');
    expect(html).toContain('value="40 Weir Road"');
    expect(await getAddress(db, fixture.courseId, { membershipId: fixture.membershipIds.ownStudent })).toBeNull();
  });

  it("saves, shows (audited per view), exports (audited) and deletes (only once confirmed) the student's address", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.sameCohortStudent);
    const owner = { membershipId: fixture.membershipIds.sameCohortStudent };
    const subject = `membership:${owner.membershipId}`;
    const saved = await handle(
      appRequest(page(), { cookie, form: { intent: "save", ...fernwickForm, name: "Sam Same", postcode: "fw12ab", country: "gb" } }),
    );
    expect(saved.status).toBe(200);
    expect(await getAddress(db, fixture.courseId, owner)).toMatchObject({ name: "Sam Same", postcode: "FW1 2AB", country: "GB" });
    expect(await auditOf("address.changed", subject)).toHaveLength(1);

    const before = (await auditOf("address.viewed", subject)).length;
    const shown = await handle(appRequest(page(), { cookie }));
    expect(shown.status).toBe(200);
    expect(await shown.text()).toContain('value="12 Kiln Street"');
    expect(await auditOf("address.viewed", subject)).toHaveLength(before + 1);

    const exported = await handle(appRequest(`${page()}.json`, { cookie }));
    expect(exported.status).toBe(200);
    expect(exported.headers.get("Content-Disposition")).toMatch(/^attachment/);
    expect(await exported.json()).toMatchObject({ address: { name: "Sam Same", line1: "12 Kiln Street", postcode: "FW1 2AB" } });
    expect(await auditOf("address.exported", subject)).toHaveLength(1);
    // Nobody else downloads it: the export is the student's own, through their own membership.
    expect((await handle(appRequest(`${page()}.json`, { cookie: await sessionCookieFor(fixture.userIds.instructor) }))).status).toBe(403);

    const unconfirmed = await handle(appRequest(page(), { cookie, form: { intent: "delete" } }));
    expect(unconfirmed.status).toBe(400);
    expect(await unconfirmed.text()).toContain("Tick the box to say you mean it.");
    expect(await getAddress(db, fixture.courseId, owner)).not.toBeNull();
    const deleted = await handle(appRequest(page(), { cookie, form: { intent: "delete", confirm: "yes" } }));
    expect(deleted.status).toBe(200);
    expect(await getAddress(db, fixture.courseId, owner)).toBeNull();
    expect(await auditOf("address.deleted", subject)).toHaveLength(1);
    expect((await handle(appRequest(`${page()}.json`, { cookie }))).status).toBe(404);
  });
});

describe("a student's address on the member page", () => {
  it("is shown to the instructor (audited), never to the student's TA, and the page is closed to other students", async () => {
    const course = await createAccessFixture("addresses-member");
    const owner = { membershipId: course.membershipIds.ownStudent };
    await saveAddress(db, { courseId: course.courseId, actorId: course.userIds.ownStudent, owner, address: fernwick });
    const path = `/courses/${course.courseId}/members/${owner.membershipId}`;
    const subject = `membership:${owner.membershipId}`;

    const instructor = await handle(appRequest(path, { cookie: await sessionCookieFor(course.userIds.instructor) }));
    expect(instructor.status).toBe(200);
    expect(await instructor.text()).toContain("12 Kiln Street");
    expect(await auditOf("address.viewed", subject)).toEqual([{ actorId: course.userIds.instructor, detail: {} }]);

    const ta = await handle(appRequest(path, { cookie: await sessionCookieFor(course.userIds.assignedTa) }));
    expect(ta.status).toBe(200);
    expect(await ta.text()).not.toContain("12 Kiln Street");
    expect(await auditOf("address.viewed", subject)).toHaveLength(1);

    const other = await handle(appRequest(path, { cookie: await sessionCookieFor(course.userIds.sameCohortStudent) }));
    expect(other.status).toBe(403);
    const otherCourse = await handle(appRequest(path, { cookie: await sessionCookieFor(course.userIds.otherInstructor) }));
    expect(otherCourse.status).toBe(403);
  });
});

describe("the instructor's address import", () => {
  it("previews each row as new, changed, unchanged or an error with its message", async () => {
    const course = await createAccessFixture("addresses-preview");
    const invited = await invite("invited.one@addresses-preview.example", course.courseId);
    const expired = await invite("expired.one@addresses-preview.example", course.courseId, -1);
    await saveAddress(db, {
      courseId: course.courseId,
      actorId: course.userIds.ownStudent,
      owner: { membershipId: course.membershipIds.ownStudent },
      address: fernwick,
    });
    await saveAddress(db, {
      courseId: course.courseId,
      actorId: course.userIds.sameCohortStudent,
      owner: { membershipId: course.membershipIds.sameCohortStudent },
      address: { ...fernwick, name: "Test sameCohortStudent" },
    });
    const row = (email: string, extra: Record<string, string> = {}) => ({
      email,
      name: "",
      line1: "12 Kiln Street",
      line2: "",
      city: "Fernwick",
      region: "",
      postcode: "FW1 2AB",
      country: "GB",
      phone: "",
      ...extra,
    });
    const preview = await previewAddressImport(db, course.courseId, [
      row("OwnStudent@addresses-preview.example"),
      row("samecohortstudent@addresses-preview.example", { city: "Lower Fernwick" }),
      row("invited.one@addresses-preview.example", { country: "US", postcode: "1234", region: "NY" }),
      row("invited.one@addresses-preview.example"),
      row("expired.one@addresses-preview.example"),
      row("assignedta@addresses-preview.example"),
      row("othercohortstudent@addresses-preview.example", { postcode: "fw12ab" }),
      row(""),
    ]);
    expect(expired.id).toBeTruthy();
    const summary = preview.rows.map(({ line, status, problems, changedFields }) => ({ line, status, problems, changedFields }));
    const noMatch = ["No student of this course, or pending invitation, has this e-mail."];
    expect(summary).toEqual([
      { line: 2, status: "unchanged", problems: [], changedFields: [] },
      { line: 3, status: "changed", problems: [], changedFields: ["city"] },
      {
        line: 4,
        status: "error",
        problems: ["postcode: “1234” is not a postcode there; write it like 12345 or 12345-6789."],
        changedFields: [],
      },
      { line: 5, status: "error", problems: ["The same e-mail is on line 4."], changedFields: [] },
      // An expired invitation and a TA are not students to post a kit to.
      { line: 6, status: "error", problems: noMatch, changedFields: [] },
      { line: 7, status: "error", problems: noMatch, changedFields: [] },
      { line: 8, status: "new", problems: [], changedFields: [] },
      { line: 9, status: "error", problems: ["The e-mail address is missing."], changedFields: [] },
    ]);
    // A blank name is the student's own; the postcode is written the way Royal Mail writes it.
    expect(preview.rows[6].address).toMatchObject({ name: "Test otherCohortStudent", postcode: "FW1 2AB" });
    expect(invited.id).toBeTruthy();
  });

  it("commits every ready row in one transaction of a constant number of statements, once per import key", async () => {
    const course = await createAccessFixture("addresses-commit");
    const invited = await Promise.all(
      Array.from({ length: 40 }, (_, index) => invite(`invited.${index}@addresses-commit.example`, course.courseId)),
    );
    const rowFor = (email: string, city = "Fernwick") => ({
      email,
      name: "",
      line1: "1 Mill Lane",
      city,
      postcode: "10117",
      country: "DE",
    });
    const importOf = async (rows: Record<string, string>[], importKey: string) => {
      const preview = await previewAddressImport(db, course.courseId, rows);
      return countAllStatements(() =>
        importAddresses(db, {
          courseId: course.courseId,
          actorId: course.userIds.instructor,
          importKey,
          fingerprint: preview.fingerprint,
          records: rows,
        }),
      );
    };
    const small = await importOf(
      [rowFor("ownstudent@addresses-commit.example"), rowFor("invited.0@addresses-commit.example")],
      "key-small-0001",
    );
    expect(small.result).toEqual({ ok: true, duplicate: false, written: 2, unchanged: 0, skipped: 0 });
    const large = await importOf(
      [
        rowFor("samecohortstudent@addresses-commit.example"),
        ...invited.slice(1).map((_, index) => rowFor(`invited.${index + 1}@addresses-commit.example`)),
        rowFor("nobody@x.example"),
      ],
      "key-large-0001",
    );
    expect(large.result).toEqual({ ok: true, duplicate: false, written: 40, unchanged: 0, skipped: 1 });
    expect(large.statements).toBe(small.statements);

    const owners = await db
      .select({ invitationId: shippingAddresses.invitationId, city: shippingAddresses.city, postcode: shippingAddresses.postcode })
      .from(shippingAddresses)
      .where(
        inArray(
          shippingAddresses.invitationId,
          invited.map((one) => one.id),
        ),
      );
    expect(owners).toHaveLength(40);
    expect(await auditOf("address.imported", `invitation:${invited[5].id}`)).toEqual([
      { actorId: course.userIds.instructor, detail: { importKey: "key-large-0001" } },
    ]);

    // The same preview committed again (a second click): the key was used, nothing is written again.
    const again = await importOf([rowFor("ownstudent@addresses-commit.example", "Elsewhere")], "key-small-0001");
    expect(again.result).toMatchObject({ ok: true, duplicate: true });
    expect(await getAddress(db, course.courseId, { membershipId: course.membershipIds.ownStudent })).toMatchObject({ city: "Fernwick" });
  });

  it("writes nothing from a preview the course no longer matches", async () => {
    const course = await createAccessFixture("addresses-stale");
    const rows = [
      { email: "ownstudent@addresses-stale.example", name: "", line1: "1 Mill Lane", city: "Fernwick", postcode: "10117", country: "DE" },
      {
        email: "samecohortstudent@addresses-stale.example",
        name: "",
        line1: "2 Mill Lane",
        city: "Fernwick",
        postcode: "10117",
        country: "DE",
      },
    ];
    const preview = await previewAddressImport(db, course.courseId, rows);
    expect(preview.rows.map((row) => row.status)).toEqual(["new", "new"]);
    // Meanwhile the student enters their own.
    const own = { membershipId: course.membershipIds.sameCohortStudent };
    await saveAddress(db, { courseId: course.courseId, actorId: course.userIds.sameCohortStudent, owner: own, address: fernwick });

    const result = await importAddresses(db, {
      courseId: course.courseId,
      actorId: course.userIds.instructor,
      importKey: "key-stale-0001",
      fingerprint: preview.fingerprint,
      records: rows,
    });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.preview.rows.map((row) => row.status)).toEqual(["new", "changed"]);
    expect(await getAddress(db, course.courseId, { membershipId: course.membershipIds.ownStudent })).toBeNull();
    expect(await getAddress(db, course.courseId, own)).toMatchObject({ line1: "12 Kiln Street" });
  });

  it("goes through the page: a pasted file previewed, then committed; TAs and another course's instructor are refused", async () => {
    const course = await createAccessFixture("addresses-page");
    const path = `/courses/${course.courseId}/addresses/import`;
    const cookie = await sessionCookieFor(course.userIds.instructor);
    const csv = csvOf([
      "ownstudent@addresses-page.example,,3 Mill Lane,,Fernwick,,10117,DE,",
      "nobody@addresses-page.example,,1 Road,,Town,,,FR,",
    ]);
    const preview = await handle(appRequest(path, { cookie, form: { intent: "preview", csv } }));
    expect(preview.status).toBe(200);
    const html = await preview.text();
    expect(words(html)).toContain("Preview: 2 rows — 1 new, 0 changed, 0 unchanged, 1 with problems");
    const fingerprint = html.match(/name="fingerprint" value="([0-9a-f]{64})"/)?.[1];
    const importKey = html.match(/name="importKey" value="([^"]+)"/)?.[1];
    expect(fingerprint && importKey).toBeTruthy();
    expect(await getAddress(db, course.courseId, { membershipId: course.membershipIds.ownStudent })).toBeNull();

    const commit = await handle(
      appRequest(path, { cookie, form: { intent: "commit", csv, importKey: importKey!, fingerprint: fingerprint! } }),
    );
    expect(commit.status).toBe(200);
    expect(words(await commit.text())).toContain("Imported: 1 address written, 0 unchanged, 1 row with problems left out.");
    expect(await getAddress(db, course.courseId, { membershipId: course.membershipIds.ownStudent })).toMatchObject({
      line1: "3 Mill Lane",
    });

    const noColumns = await handle(appRequest(path, { cookie, form: { intent: "preview", csv: "mail,town\na@b.example,X" } }));
    expect(noColumns.status).toBe(400);
    expect(await noColumns.text()).toContain("The file has no email, line1, city, country column; start from the template.");

    for (const actor of ["assignedTa", "otherInstructor", "ownStudent"] as const) {
      const refused = await handle(
        appRequest(path, { cookie: await sessionCookieFor(course.userIds[actor]), form: { intent: "preview", csv } }),
      );
      expect(refused.status).toBe(403);
    }
  });
});

describe("accepting an invitation", () => {
  it("moves the invitation's address and the kit packed for it to the new membership, in the same transaction", async () => {
    const course = await createAccessFixture("addresses-accept");
    const invited = await invite("new.student@addresses-accept.example", course.courseId);
    await saveAddress(db, {
      courseId: course.courseId,
      actorId: course.userIds.instructor,
      owner: { invitationId: invited.id },
      address: fernwick,
    });
    const [kit] = await db
      .insert(kits)
      .values({ courseId: course.courseId, number: "K-INV", state: "packed", holderInvitationId: invited.id })
      .returning({ id: kits.id });

    const outcome = await acceptInvitation(invited.token, { name: "New Student", password: null }, null, new Request("http://127.0.0.1/"));
    expect(outcome.outcome).toBe("accepted");
    const [address] = await db
      .select({
        membershipId: shippingAddresses.membershipId,
        invitationId: shippingAddresses.invitationId,
        line1: shippingAddresses.line1,
      })
      .from(shippingAddresses)
      .where(eq(shippingAddresses.courseId, course.courseId));
    expect(address.invitationId).toBeNull();
    expect(address.membershipId).not.toBeNull();
    expect(address.line1).toBe("12 Kiln Street");
    const [held] = await db
      .select({ membershipId: kits.holderMembershipId, invitationId: kits.holderInvitationId })
      .from(kits)
      .where(eq(kits.id, kit.id));
    expect(held).toEqual({ membershipId: address.membershipId, invitationId: null });
  });
});
