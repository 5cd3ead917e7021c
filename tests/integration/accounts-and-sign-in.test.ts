/**
 * Accounts end to end through the built app: sessions, password and e-mailed-link sign-in, resets,
 * invitations, rate limits, CSRF refusal, personal API tokens and security headers.
 */
import { and, desc, eq, sql } from "drizzle-orm";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import {
  apiTokens,
  auditEvents,
  courseMemberships,
  courses,
  emailLinks,
  emailOutbox,
  invitations,
  sessions,
  taCohortAssignments,
  users,
} from "~/db/schema";
import { hashPassword } from "~/server/auth/password.server";
import { SESSION_COOKIE, SESSION_LIFETIME_MS, validateSessionToken } from "~/server/auth/session.server";
import { hashToken } from "~/server/auth/tokens.server";
import { db } from "~/server/db.server";
import { createInvitations, findInvitation } from "~/server/members/invitations.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor, sessionTokenFrom } from "../support/app-requests";

const PASSWORD = "a kettle of warm glycerol";
const DAY = 24 * 60 * 60 * 1000;

let handle: AppHandler;
let fixture: AccessFixture;
/** Every raw token the tests see, checked against the database at the end. */
const rawTokens: string[] = [];

async function createUser(email: string, password: string | null = PASSWORD) {
  const [user] = await db
    .insert(users)
    .values({ email, name: `Person ${email}`, passwordHash: password ? await hashPassword(password) : null })
    .returning();
  return user;
}

async function signIn(email: string, password: string, ip = "203.0.113.10") {
  return handle(appRequest("/sign-in", { form: { intent: "password", email, password }, ip }));
}

async function latestEmailTo(address: string) {
  const [row] = await db.select().from(emailOutbox).where(eq(emailOutbox.toAddress, address)).orderBy(desc(emailOutbox.createdAt)).limit(1);
  return row;
}

const tokenIn = (url: string) => url.split("/").pop()!;

beforeAll(async () => {
  process.env.TRUST_PROXY = "1";
  handle = await createAppHandler();
  fixture = await createAccessFixture("accounts");
});

describe("sessions", () => {
  it("signs in with a password into a new session whose id is the SHA-256 of the cookie's token", async () => {
    await createUser("sphere@accounts.example");
    const first = await signIn("sphere@accounts.example", PASSWORD);
    const second = await signIn("Sphere@Accounts.example", PASSWORD);
    expect(first.status).toBe(302);
    const cookie = first.headers.getSetCookie().find((value) => value.startsWith(`${SESSION_COOKIE}=`))!;
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(cookie).toMatch(/Path=\//);
    const [token, otherToken] = [sessionTokenFrom(first)!, sessionTokenFrom(second)!];
    rawTokens.push(token, otherToken);
    expect(token).toMatch(/^[a-z2-7]{32,}$/);
    expect(otherToken).not.toBe(token);
    const [row] = await db
      .select()
      .from(sessions)
      .where(eq(sessions.id, hashToken(token)));
    expect(row.expiresAt.getTime()).toBeGreaterThan(Date.now() + SESSION_LIFETIME_MS - 60_000);
  });

  it("refuses a wrong password and an unknown account with the same words", async () => {
    await createUser("column@accounts.example");
    const wrong = await signIn("column@accounts.example", "not the password", "203.0.113.11");
    const unknown = await signIn("nobody@accounts.example", "not the password", "203.0.113.11");
    expect([wrong.status, unknown.status]).toEqual([401, 401]);
    const words = (html: string) => html.match(/do not match[^<]*/)?.[0];
    expect(words(await wrong.text())).toBe(words(await unknown.text()));
    const failures = await db.select().from(auditEvents).where(eq(auditEvents.action, "auth.sign_in_failed"));
    expect(failures.length).toBeGreaterThanOrEqual(2);
    expect(JSON.stringify(failures)).not.toContain("not the password");
  });

  it("never sends a crafted redirectTo out as the Location", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    for (const target of ["/\t/evil.example", "/\\evil.example", "/\n/evil.example"]) {
      const signedIn = await handle(appRequest(`/sign-in?${new URLSearchParams({ redirectTo: target })}`, { cookie }));
      expect(signedIn.status).toBe(302);
      expect(signedIn.headers.get("location")).toBe("/");
    }
    await createUser("redirected@accounts.example");
    const posted = await handle(
      appRequest("/sign-in", {
        form: { intent: "password", email: "redirected@accounts.example", password: PASSWORD, redirectTo: "/\t/evil.example" },
        ip: "203.0.113.90",
      }),
    );
    expect(posted.status).toBe(302);
    expect(posted.headers.get("location")).toBe("/");
  });

  it("renews a session with fewer than 15 days left, and sends the new expiry in the cookie", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const id = hashToken(cookie.split("=")[1]);
    await db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() + 10 * DAY) })
      .where(eq(sessions.id, id));
    const response = await handle(appRequest("/account", { cookie }));
    expect(response.status).toBe(200);
    const [row] = await db.select().from(sessions).where(eq(sessions.id, id));
    expect(row.expiresAt.getTime()).toBeGreaterThan(Date.now() + 29 * DAY);
    const renewed = response.headers.getSetCookie().find((value) => value.startsWith(`${SESSION_COOKIE}=`));
    expect(renewed).toContain(new Date(row.expiresAt).toUTCString().slice(0, 16));
    expect(response.headers.get("cache-control")).toContain("no-store");
  });

  it("does not renew a session with more than 15 days left", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const id = hashToken(cookie.split("=")[1]);
    const expiresAt = new Date(Date.now() + 20 * DAY);
    await db.update(sessions).set({ expiresAt }).where(eq(sessions.id, id));
    const response = await handle(appRequest("/account", { cookie }));
    expect(response.headers.getSetCookie().some((value) => value.startsWith(`${SESSION_COOKIE}=`))).toBe(false);
    const [row] = await db.select().from(sessions).where(eq(sessions.id, id));
    expect(row.expiresAt.getTime()).toBe(expiresAt.getTime());
  });

  it("treats an expired session as signed out, deletes its row and clears the cookie", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const id = hashToken(cookie.split("=")[1]);
    await db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessions.id, id));
    const response = await handle(appRequest("/account", { cookie }));
    expect(response.status).toBe(302);
    expect(response.headers.get("location")).toBe("/sign-in?redirectTo=%2Faccount");
    expect(await db.select().from(sessions).where(eq(sessions.id, id))).toEqual([]);
    expect(response.headers.getSetCookie().find((value) => value.startsWith(`${SESSION_COOKIE}=`))).toMatch(/Max-Age=0/);
  });

  it("signs out everywhere: every session of the user ends, other users keep theirs", async () => {
    const [mine, alsoMine, someoneElses] = await Promise.all([
      sessionCookieFor(fixture.userIds.sameCohortStudent),
      sessionCookieFor(fixture.userIds.sameCohortStudent),
      sessionCookieFor(fixture.userIds.otherCohortStudent),
    ]);
    const response = await handle(appRequest("/sign-out", { cookie: mine, form: { intent: "everywhere" } }));
    expect(response.status).toBe(302);
    expect(await validateSessionToken(alsoMine.split("=")[1])).toBeNull();
    expect(await validateSessionToken(someoneElses.split("=")[1])).not.toBeNull();
  });
});

describe("rate limits", () => {
  it("answers the 11th failed sign-in from one address within the window with 429 and Retry-After", async () => {
    const ip = "198.51.100.7";
    // Different accounts each time, so that only the per-address limit is in play.
    for (let attempt = 1; attempt <= 10; attempt++) {
      expect((await signIn(`guess${attempt}@accounts.example`, "wrong password", ip)).status).toBe(401);
    }
    const limited = await signIn("guess11@accounts.example", "wrong password", ip);
    expect(limited.status).toBe(429);
    expect(Number(limited.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(await limited.text()).toMatch(/Too many attempts/);
    // Another address is not affected.
    expect((await signIn("guess12@accounts.example", "wrong password", "198.51.100.8")).status).toBe(401);
  });

  it("checks at most 10 passwords of a burst of wrong guesses sent at once", async () => {
    await createUser("burst@accounts.example");
    // Each guess from its own address, so that only the per-account limit is in play.
    const responses = await Promise.all(
      Array.from({ length: 50 }, (_, index) => signIn("burst@accounts.example", `wrong guess ${index}`, `198.18.0.${index + 1}`)),
    );
    const statuses = responses.map((response) => response.status);
    // 401 is a wrong password that was checked, 429 a guess that never was.
    expect(statuses.filter((status) => status === 401).length).toBeLessThanOrEqual(10);
    expect(statuses.filter((status) => status === 429).length).toBe(50 - statuses.filter((status) => status === 401).length);
    // The window stays closed for the account afterwards, even for the right password.
    expect((await signIn("burst@accounts.example", PASSWORD, "198.18.1.1")).status).toBe(429);
  });

  it("gives a successful sign-in its point back, so that only failures count", async () => {
    await createUser("steady@accounts.example");
    const ip = "198.51.100.40";
    for (let attempt = 1; attempt <= 15; attempt++) expect((await signIn("steady@accounts.example", PASSWORD, ip)).status).toBe(302);
    expect((await signIn("steady@accounts.example", "wrong password", ip)).status).toBe(401);
  });

  it("limits e-mailed link requests per address", async () => {
    await createUser("linky@accounts.example");
    const statuses: number[] = [];
    for (let attempt = 1; attempt <= 6; attempt++) {
      const response = await handle(
        appRequest("/forgot-password", { form: { email: "linky@accounts.example" }, ip: `192.0.2.${attempt}` }),
      );
      statuses.push(response.status);
    }
    expect(statuses).toEqual([200, 200, 200, 200, 200, 429]);
  });
});

describe("e-mailed links", () => {
  it("signs in with an e-mailed link once; the second use fails", async () => {
    await createUser("link-only@accounts.example", null);
    const request = await handle(appRequest("/sign-in", { form: { intent: "link", email: "link-only@accounts.example" } }));
    expect(request.status).toBe(200);
    const email = await latestEmailTo("link-only@accounts.example");
    expect(email.template).toBe("sign-in-link");
    const url = String(email.props.url);
    rawTokens.push(tokenIn(url));
    const page = await handle(appRequest(new URL(url).pathname));
    expect(page.status).toBe(200);
    expect(page.headers.get("referrer-policy")).toBe("strict-origin");
    const first = await handle(appRequest(new URL(url).pathname, { form: {} }));
    expect(first.status).toBe(302);
    expect(sessionTokenFrom(first)).toBeTruthy();
    expect((await handle(appRequest(new URL(url).pathname, { form: {} }))).status).toBe(410);
  });

  it("answers a reset or sign-in request for an unknown address alike, after the same statements, and queues a no-account notice", async () => {
    await createUser("known@accounts.example");
    /** The response, with the address taken out, and the SQL the app sent (texts only: the values differ). */
    const ask = async (path: string, form: Record<string, string>, email: string) => {
      const spy = vi.spyOn(pg.Client.prototype, "query");
      try {
        const response = await handle(appRequest(path, { form: { ...form, email }, ip: "203.0.113.70" }));
        const statements = spy.mock.calls.map(([query]) => (typeof query === "string" ? query : (query as { text: string }).text));
        // The page's script nonce is new on every response.
        return {
          status: response.status,
          body: (await response.text()).replaceAll(email, "ADDRESS").replace(/nonce="[^"]*"/g, ""),
          statements,
        };
      } finally {
        spy.mockRestore();
      }
    };
    for (const [path, form] of [
      ["/forgot-password", {}],
      ["/sign-in", { intent: "link" }],
    ] as const) {
      const known = await ask(path, form, "known@accounts.example");
      const unknown = await ask(path, form, "ghost@accounts.example");
      expect(known.status).toBe(200);
      expect(unknown.status).toBe(200);
      expect(unknown.body).toBe(known.body);
      expect(known.statements.length).toBeGreaterThan(5);
      expect(unknown.statements).toEqual(known.statements);
    }
    const notices = await db.select().from(emailOutbox).where(eq(emailOutbox.toAddress, "ghost@accounts.example"));
    expect(notices.map((row) => [row.template, row.status, row.props.purpose])).toEqual(
      expect.arrayContaining([
        ["no-account", "queued", "password_reset"],
        ["no-account", "queued", "sign_in"],
      ]),
    );
    expect(notices).toHaveLength(2);
  });

  it("sends sign-in and reset links to an account whose name has quotes and angle brackets", async () => {
    const [user] = await db
      .insert(users)
      .values({ email: "quoted@accounts.example", name: 'Ann "Nan" <Lee>', passwordHash: await hashPassword(PASSWORD) })
      .returning();
    const link = await handle(appRequest("/sign-in", { form: { intent: "link", email: "quoted@accounts.example" }, ip: "203.0.113.50" }));
    expect(link.status).toBe(200);
    expect(await latestEmailTo("quoted@accounts.example")).toMatchObject({
      template: "sign-in-link",
      status: "queued",
      toName: 'Ann "Nan" <Lee>',
    });
    const reset = await handle(appRequest("/forgot-password", { form: { email: "quoted@accounts.example" }, ip: "203.0.113.50" }));
    expect(reset.status).toBe(200);
    expect(await latestEmailTo("quoted@accounts.example")).toMatchObject({ template: "password-reset", status: "queued" });
    expect(await db.select().from(emailLinks).where(eq(emailLinks.userId, user.id))).toHaveLength(2);
  });

  it("resets a password once, ends every session, and a reused reset link fails", async () => {
    const user = await createUser("reset@accounts.example");
    const oldSession = await sessionCookieFor(user.id);
    await handle(appRequest("/forgot-password", { form: { email: "reset@accounts.example" } }));
    const url = String((await latestEmailTo("reset@accounts.example")).props.url);
    const [link] = await db.select().from(emailLinks).where(eq(emailLinks.userId, user.id));
    // One hour, per the brief.
    expect(link.expiresAt.getTime() - link.createdAt.getTime()).toBeGreaterThan(59 * 60_000);
    expect(link.expiresAt.getTime() - link.createdAt.getTime()).toBeLessThanOrEqual(60 * 60_000 + 1000);
    rawTokens.push(tokenIn(url));
    const form = { newPassword: "slow steel spheres sink", confirmPassword: "slow steel spheres sink" };
    const reset = await handle(appRequest(new URL(url).pathname, { form }));
    expect(reset.status).toBe(302);
    expect(await validateSessionToken(oldSession.split("=")[1])).toBeNull();
    expect((await signIn("reset@accounts.example", PASSWORD, "203.0.113.20")).status).toBe(401);
    expect((await signIn("reset@accounts.example", form.newPassword, "203.0.113.20")).status).toBe(302);
    expect((await handle(appRequest(new URL(url).pathname, { form }))).status).toBe(410);
  });

  describe("a new password ends every outstanding e-mailed link, for signing in and for resetting", () => {
    const newPassword = "warm oil slows the sphere";
    async function linksFor(email: string, ip: string) {
      await handle(appRequest("/sign-in", { form: { intent: "link", email }, ip }));
      const signInPath = new URL(String((await latestEmailTo(email)).props.url)).pathname;
      const resetPaths: string[] = [];
      for (let index = 0; index < 2; index++) {
        await handle(appRequest("/forgot-password", { form: { email }, ip }));
        resetPaths.push(new URL(String((await latestEmailTo(email)).props.url)).pathname);
      }
      rawTokens.push(...[signInPath, ...resetPaths].map(tokenIn));
      return { signInPath, resetPaths };
    }

    it("when the password is changed on the account page", async () => {
      const user = await createUser("changer@accounts.example");
      const { signInPath, resetPaths } = await linksFor("changer@accounts.example", "203.0.113.60");
      const cookie = await sessionCookieFor(user.id);
      const changed = await handle(
        appRequest("/account", {
          cookie,
          form: { intent: "password", currentPassword: PASSWORD, newPassword, confirmPassword: newPassword },
        }),
      );
      expect(changed.status).toBe(302);
      expect(await db.select().from(emailLinks).where(eq(emailLinks.userId, user.id))).toEqual([]);
      expect((await handle(appRequest(signInPath, { form: {} }))).status).toBe(410);
      for (const path of resetPaths)
        expect(
          (await handle(appRequest(path, { form: { newPassword: "another fine password", confirmPassword: "another fine password" } })))
            .status,
        ).toBe(410);
    });

    it("when the password is reset with one of the links", async () => {
      const user = await createUser("resetter@accounts.example");
      const { signInPath, resetPaths } = await linksFor("resetter@accounts.example", "203.0.113.61");
      expect((await handle(appRequest(resetPaths[1], { form: { newPassword, confirmPassword: newPassword } }))).status).toBe(302);
      expect(await db.select().from(emailLinks).where(eq(emailLinks.userId, user.id))).toEqual([]);
      expect((await handle(appRequest(signInPath, { form: {} }))).status).toBe(410);
      expect(
        (
          await handle(
            appRequest(resetPaths[0], { form: { newPassword: "another fine password", confirmPassword: "another fine password" } }),
          )
        ).status,
      ).toBe(410);
    });
  });

  it("refuses a common password and keeps any Unicode password whole", async () => {
    const user = await createUser("policy@accounts.example");
    const cookie = await sessionCookieFor(user.id);
    const common = await handle(
      appRequest("/account", {
        cookie,
        form: { intent: "password", currentPassword: PASSWORD, newPassword: "password123", confirmPassword: "password123" },
      }),
    );
    expect(common.status).toBe(400);
    expect(await common.text()).toMatch(/most common/);
    const long = `${"ünïcødé 🌊 ".repeat(8)}end`;
    const changed = await handle(
      appRequest("/account", { cookie, form: { intent: "password", currentPassword: PASSWORD, newPassword: long, confirmPassword: long } }),
    );
    expect(changed.status).toBe(302);
    // Changing the password ended the session it was changed from; the response carries a new one.
    expect(await validateSessionToken(cookie.split("=")[1])).toBeNull();
    expect(sessionTokenFrom(changed)).toBeTruthy();
    expect((await signIn("policy@accounts.example", long.slice(0, -1), "203.0.113.30")).status).toBe(401);
    expect((await signIn("policy@accounts.example", long, "203.0.113.30")).status).toBe(302);
  });
});

describe("open sign-up", () => {
  beforeAll(() => {
    process.env.ALLOW_SIGN_UP = "true";
  });
  afterAll(() => {
    delete process.env.ALLOW_SIGN_UP;
  });

  const signUp = async (email: string, name: string) => {
    const response = await handle(appRequest("/sign-up", { form: { name, email }, ip: "203.0.113.80" }));
    return {
      status: response.status,
      signedIn: sessionTokenFrom(response) !== null,
      body: (await response.text()).replaceAll(email, "ADDRESS").replace(/nonce="[^"]*"/g, ""),
    };
  };

  it('answers "check your e-mail" for a new address and for one that has an account, and signs nobody in', async () => {
    const existing = await createUser("taken@accounts.example");
    const fresh = await signUp("fresh.instructor@accounts.example", "Fresh Instructor");
    const taken = await signUp("taken@accounts.example", "Someone Else");
    expect(fresh).toMatchObject({ status: 200, signedIn: false });
    expect(fresh.body).toContain("Check your e-mail");
    expect(taken).toEqual(fresh);

    // The new account has no password until its owner, signed in by the link, chooses one.
    const [created] = await db.select().from(users).where(eq(users.email, "fresh.instructor@accounts.example"));
    expect(created).toMatchObject({ name: "Fresh Instructor", passwordHash: null, mayCreateCourses: true });
    const newMail = await latestEmailTo("fresh.instructor@accounts.example");
    expect(newMail.template).toBe("sign-in-link");
    rawTokens.push(tokenIn(String(newMail.props.url)));
    expect((await handle(appRequest(new URL(String(newMail.props.url)).pathname, { form: {} }))).status).toBe(302);

    // The existing account is sent a way in, and keeps its name, password and rights.
    expect((await latestEmailTo("taken@accounts.example")).template).toBe("sign-in-link");
    const [after] = await db.select().from(users).where(eq(users.id, existing.id));
    expect(after).toMatchObject({ name: existing.name, passwordHash: existing.passwordHash, mayCreateCourses: false });
  });
});

describe("invitations", () => {
  async function invite(email: string, role: string, cohortId = "") {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/members`, {
        cookie,
        form: {
          intent: "invite",
          "people[0].email": email,
          "people[0].name": "Invited Person",
          "people[0].role": role,
          "people[0].cohortId": cohortId,
        },
      }),
    );
    expect(response.status).toBe(200);
    const acceptUrl = String((await latestEmailTo(email)).props.acceptUrl);
    rawTokens.push(tokenIn(acceptUrl));
    return new URL(acceptUrl).pathname;
  }

  it("creates the account with the chosen role and cohort; a reused link fails", async () => {
    const path = await invite("new.student@accounts.example", "student", fixture.otherCohortId);
    const page = await handle(appRequest(path));
    expect(page.status).toBe(200);
    expect(page.headers.get("referrer-policy")).toBe("strict-origin");
    const accepted = await handle(appRequest(path, { form: { name: "New Student", password: "" } }));
    expect(accepted.status).toBe(302);
    expect(sessionTokenFrom(accepted)).toBeTruthy();
    const [member] = await db
      .select({ role: courseMemberships.role, cohortId: courseMemberships.cohortId, name: users.name })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(eq(users.email, "new.student@accounts.example"));
    expect(member).toEqual({ role: "student", cohortId: fixture.otherCohortId, name: "New Student" });
    expect((await handle(appRequest(path, { form: { name: "Someone Else" } }))).status).toBe(410);
  });

  it("gives exactly one success when two people use one link at the same moment", async () => {
    const path = await invite("race@accounts.example", "ta", fixture.cohortId);
    const results = await Promise.all([1, 2].map(() => handle(appRequest(path, { form: { name: "Racer" } }))));
    expect(results.map((response) => response.status).sort()).toEqual([302, 410]);
    const rows = await db
      .select({ role: courseMemberships.role, assigned: taCohortAssignments.cohortId })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .leftJoin(taCohortAssignments, eq(taCohortAssignments.membershipId, courseMemberships.id))
      .where(eq(users.email, "race@accounts.example"));
    expect(rows).toEqual([{ role: "ta", assigned: fixture.cohortId }]);
    expect(await db.select().from(users).where(eq(users.email, "race@accounts.example"))).toHaveLength(1);
  });

  it("invites a person whose name has quotes, and sends an invitation whose subject would be too long", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const quoted = await handle(
      appRequest(`/courses/${fixture.courseId}/members`, {
        cookie,
        form: {
          intent: "invite",
          "people[0].email": "nan@accounts.example",
          "people[0].name": 'Ann "Nan" <Lee>',
          "people[0].role": "student",
          "people[0].cohortId": fixture.cohortId,
        },
      }),
    );
    expect(quoted.status).toBe(200);
    expect(await latestEmailTo("nan@accounts.example")).toMatchObject({ status: "queued", toName: 'Ann "Nan" <Lee>' });

    // The longest name and course title the forms take (120 characters each).
    await db
      .update(users)
      .set({ name: `Professor ${"Long".repeat(27)}n` })
      .where(eq(users.id, fixture.userIds.otherInstructor));
    await db
      .update(courses)
      .set({ title: `Fluid Mechanics ${"Laboratory ".repeat(9)}One` })
      .where(eq(courses.id, fixture.otherCourseId));
    const otherCookie = await sessionCookieFor(fixture.userIds.otherInstructor);
    const long = await handle(
      appRequest(`/courses/${fixture.otherCourseId}/members`, {
        cookie: otherCookie,
        form: {
          intent: "invite",
          "people[0].email": "long@accounts.example",
          "people[0].name": "",
          "people[0].role": "ta",
          "people[0].cohortId": "",
        },
      }),
    );
    expect(long.status).toBe(200);
    const email = await latestEmailTo("long@accounts.example");
    expect(email.status).toBe("queued");
    expect(email.subject.length).toBeLessThanOrEqual(180);
    expect(email.subject).toMatch(/^Professor Long.*…$/);
  });

  it("invites several people from one form, and none when a row is refused, with the refusal at that row", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const rows = (first: string, second: string) => ({
      intent: "invite",
      "people[0].email": first,
      "people[0].role": "student",
      "people[0].cohortId": fixture.cohortId,
      "people[1].email": second,
      "people[1].role": "ta",
      "people[1].cohortId": "",
    });
    const refused = await handle(
      appRequest(`/courses/${fixture.courseId}/members`, {
        cookie,
        form: rows("left.out@accounts.example", "ownstudent@accounts.example"),
      }),
    );
    expect(refused.status).toBe(400);
    const page = await refused.text();
    expect(page).toContain("This person is a member of the course already.");
    // What was typed comes back, the refused row's address included.
    expect(page).toContain('value="left.out@accounts.example"');
    expect(page).toContain('value="ownstudent@accounts.example"');
    expect(await latestEmailTo("left.out@accounts.example")).toBeUndefined();

    const sent = await handle(
      appRequest(`/courses/${fixture.courseId}/members`, {
        cookie,
        form: rows("first.of.two@accounts.example", "second.of.two@accounts.example"),
      }),
    );
    expect(sent.status).toBe(200);
    expect(await sent.text()).toContain("Invitations e-mailed to first.of.two@accounts.example, second.of.two@accounts.example.");
    expect((await latestEmailTo("second.of.two@accounts.example")).template).toBe("course-invitation");
  });

  it("tells the holder of a replaced invitation that a newer one was sent, instead of calling it expired", async () => {
    const firstPath = await invite("invited.twice@accounts.example", "student", fixture.cohortId);
    const secondPath = await invite("invited.twice@accounts.example", "student", fixture.cohortId);
    const [newer] = await db
      .select({ createdAt: invitations.createdAt })
      .from(invitations)
      .where(eq(invitations.tokenHash, hashToken(tokenIn(secondPath))));
    expect(await findInvitation(tokenIn(firstPath))).toMatchObject({ state: "replaced", replacedAt: newer.createdAt });
    expect(await findInvitation(tokenIn(secondPath))).toMatchObject({ state: "open", replacedAt: null });

    const page = await (await handle(appRequest(firstPath))).text();
    expect(page).toContain("This invitation was replaced by a newer one, sent to you on");
    expect(page).toContain(`dateTime="${newer.createdAt.toISOString()}"`);
    expect(page).not.toContain("has expired");
    const refused = await handle(appRequest(firstPath, { form: { name: "Invited Twice", password: "" } }));
    expect(refused.status).toBe(410);
    expect(await refused.text()).toContain("This invitation was replaced by a newer one");
    expect((await handle(appRequest(secondPath, { form: { name: "Invited Twice", password: "" } }))).status).toBe(302);
  });

  it("attaches the course to an existing account of the invited address", async () => {
    const existing = await createUser("has.account@accounts.example");
    const path = await invite("has.account@accounts.example", "student", fixture.cohortId);
    expect((await handle(appRequest(path, { form: {} }))).status).toBe(302);
    const [membership] = await db.select().from(courseMemberships).where(eq(courseMemberships.userId, existing.id));
    expect(membership).toMatchObject({ courseId: fixture.courseId, role: "student", cohortId: fixture.cohortId });
  });

  it("invites one person or forty with the same number of statements", async () => {
    const statementsFor = async (count: number, prefix: string) => {
      const spy = vi.spyOn(pg.Client.prototype, "query");
      try {
        const people = Array.from({ length: count }, (_, index) => ({
          email: `${prefix}${index}@bulk.example`,
          role: "student" as const,
          cohortId: fixture.cohortId,
        }));
        const result = await db.transaction((tx) =>
          createInvitations(tx, { id: fixture.userIds.instructor, name: "Test instructor" }, fixture.courseId, people),
        );
        expect(result.invited).toHaveLength(count);
        return spy.mock.calls.length;
      } finally {
        spy.mockRestore();
      }
    };
    const one = await statementsFor(1, "single");
    expect(await statementsFor(40, "many")).toBe(one);
  });

  it("records the invitation, its acceptance and role changes in the course's audit log", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const change = await handle(
      appRequest(`/courses/${fixture.courseId}/members/${fixture.membershipIds.sameCohortStudent}`, {
        cookie,
        form: { intent: "change-role", role: "student", cohortId: fixture.otherCohortId },
      }),
    );
    expect(change.status).toBe(200);
    const log = await handle(appRequest(`/courses/${fixture.courseId}/audit`, { cookie }));
    const html = (await log.text()).replaceAll("<!-- -->", "");
    expect(html).toMatch(/Test instructor invited \S+ as a student\./);
    expect(html).toContain("accepted an invitation and joined the course.");
    expect(html).toContain("Test instructor moved Test sameCohortStudent to the cohort “Cohort two”.");
  });
});

describe("cross-site requests", () => {
  it("changes nothing on a cross-origin POST, with or without an Origin header", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const form = { intent: "profile", name: "Renamed By Another Site" };
    const foreign = await handle(appRequest("/account", { cookie, form, origin: "https://evil.example" }));
    const noOrigin = await handle(appRequest("/account", { cookie, form, origin: null, headers: { "Sec-Fetch-Site": "cross-site" } }));
    const noHeaders = await handle(appRequest("/account", { cookie, form, origin: null }));
    const dataRequest = await handle(
      appRequest("/account.data", { cookie, form, origin: null, headers: { "Sec-Fetch-Site": "same-site" } }),
    );
    // Every refusal is ours: 403 with Benchpost's own page, not the framework's bare 400.
    expect([foreign.status, noOrigin.status, noHeaders.status, dataRequest.status]).toEqual([403, 403, 403, 403]);
    expect(await foreign.text()).toContain("That form came from another site");
    const [user] = await db.select({ name: users.name }).from(users).where(eq(users.id, fixture.userIds.ownStudent));
    expect(user.name).toBe("Test ownStudent");
    const sameOrigin = await handle(
      appRequest("/account", {
        cookie,
        form: { ...form, name: "Renamed Here" },
        origin: null,
        headers: { "Sec-Fetch-Site": "same-origin" },
      }),
    );
    expect(sameOrigin.status).toBe(200);
  });
});

describe("personal API tokens", () => {
  it("creates a token shown once, accepts it as a bearer token, records its use, and revokes it", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.assignedTa);
    const created = await handle(appRequest("/account", { cookie, form: { intent: "create-token", tokenName: "mark export" } }));
    expect(created.status).toBe(200);
    const token = (await created.text()).match(/bpt_[a-z2-7]+/)![0];
    rawTokens.push(token);
    const me = await handle(appRequest("/api/v1/me", { headers: { Authorization: `Bearer ${token}` } }));
    expect(me.status).toBe(200);
    expect(await me.json()).toMatchObject({
      user: { id: fixture.userIds.assignedTa },
      authenticatedWith: "api-token",
      courses: [{ id: fixture.courseId, role: "ta" }],
    });
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.userId, fixture.userIds.assignedTa));
    expect(row.lastUsedAt).not.toBeNull();
    // A bearer call carries no cookie, so it needs no Origin: this POST reaches the route (which has no action).
    const post = await handle(appRequest("/api/v1/me", { method: "POST", origin: null, headers: { Authorization: `Bearer ${token}` } }));
    expect(post.status).toBe(405);

    const listed = await (await handle(appRequest("/account", { cookie }))).text();
    expect(listed).toContain("mark export");
    expect(listed).not.toContain(token);
    await handle(appRequest("/account", { cookie, form: { intent: "revoke-token", tokenId: row.id } }));
    const after = await handle(appRequest("/api/v1/me", { headers: { Authorization: `Bearer ${token}` } }));
    expect(after.status).toBe(401);
    expect(await after.json()).toEqual({ error: { code: "unauthenticated", message: expect.any(String) } });
  });

  it("revokes a TA's tokens when their last staff role ends, and not before", async () => {
    const ta = await createUser("demoted.ta@accounts.example");
    const [[here], [there]] = await Promise.all([
      db.insert(courseMemberships).values({ courseId: fixture.courseId, userId: ta.id, role: "ta" }).returning(),
      db.insert(courseMemberships).values({ courseId: fixture.otherCourseId, userId: ta.id, role: "ta" }).returning(),
    ]);
    const created = await handle(
      appRequest("/account", { cookie: await sessionCookieFor(ta.id), form: { intent: "create-token", tokenName: "marking script" } }),
    );
    const token = (await created.text()).match(/bpt_[a-z2-7]+/)![0];
    rawTokens.push(token);
    const me = () => handle(appRequest("/api/v1/me", { headers: { Authorization: `Bearer ${token}` } }));
    expect((await me()).status).toBe(200);

    // Made a student here, but still a TA in the other course: still staff, the token keeps working.
    const instructor = await sessionCookieFor(fixture.userIds.instructor);
    const demoted = await handle(
      appRequest(`/courses/${fixture.courseId}/members/${here.id}`, {
        cookie: instructor,
        form: { intent: "change-role", role: "student", cohortId: fixture.cohortId },
      }),
    );
    expect(demoted.status).toBe(200);
    expect((await me()).status).toBe(200);

    // Removed from the other course: no staff role is left, and neither is the token.
    const otherInstructor = await sessionCookieFor(fixture.userIds.otherInstructor);
    expect(
      (
        await handle(
          appRequest(`/courses/${fixture.otherCourseId}/members/${there.id}`, { cookie: otherInstructor, form: { intent: "remove" } }),
        )
      ).status,
    ).toBe(302);
    expect((await me()).status).toBe(401);
    expect(await db.select().from(apiTokens).where(eq(apiTokens.userId, ta.id))).toEqual([]);
    const [revocation] = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "auth.api_token_revoked"), eq(auditEvents.actorId, fixture.userIds.otherInstructor)));
    expect(revocation.detail).toMatchObject({ name: "marking script", reason: "no longer staff", userId: ta.id });
  });

  it("revokes the tokens of a sole-course TA made a student", async () => {
    const ta = await createUser("sole.ta@accounts.example");
    const [membership] = await db.insert(courseMemberships).values({ courseId: fixture.courseId, userId: ta.id, role: "ta" }).returning();
    const created = await handle(
      appRequest("/account", { cookie: await sessionCookieFor(ta.id), form: { intent: "create-token", tokenName: "export" } }),
    );
    const token = (await created.text()).match(/bpt_[a-z2-7]+/)![0];
    rawTokens.push(token);
    const instructor = await sessionCookieFor(fixture.userIds.instructor);
    await handle(
      appRequest(`/courses/${fixture.courseId}/members/${membership.id}`, {
        cookie: instructor,
        form: { intent: "change-role", role: "student", cohortId: fixture.cohortId },
      }),
    );
    expect((await handle(appRequest("/api/v1/me", { headers: { Authorization: `Bearer ${token}` } }))).status).toBe(401);
  });

  it("gives students no tokens", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    expect((await handle(appRequest("/account", { cookie, form: { intent: "create-token", tokenName: "mine" } }))).status).toBe(403);
  });
});

describe("security headers", () => {
  it("sends a nonce-based Content-Security-Policy whose nonce is on every script", async () => {
    const response = await handle(appRequest("/sign-in"));
    const policy = response.headers.get("content-security-policy")!;
    const nonce = policy.match(/'nonce-([^']+)'/)![1];
    for (const directive of ["object-src 'none'", "base-uri 'none'", "frame-ancestors 'none'"]) expect(policy).toContain(directive);
    expect(response.headers.get("x-content-type-options")).toBe("nosniff");
    expect(response.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
    const html = await response.text();
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    expect(scripts.length).toBeGreaterThan(0);
    for (const script of scripts) expect(script).toContain(`nonce="${nonce}"`);
    const again = (await handle(appRequest("/sign-in"))).headers.get("content-security-policy")!;
    expect(again).not.toContain(nonce);
  });

  it("asks for HTTPS only (HSTS) when the production app is served over HTTPS", async () => {
    expect((await handle(appRequest("/sign-in"))).headers.get("strict-transport-security")).toBeNull();
    const before = process.env.APP_URL;
    process.env.APP_URL = "https://benchpost.example";
    try {
      for (const path of ["/sign-in", "/api/v1/me", "/healthz"]) {
        expect((await handle(appRequest(path))).headers.get("strict-transport-security"), path).toBe("max-age=31536000; includeSubDomains");
      }
    } finally {
      process.env.APP_URL = before;
    }
  });
});

describe("stored secrets", () => {
  it("keeps no raw token in the session, link, invitation, token or audit tables", async () => {
    expect(rawTokens.length).toBeGreaterThanOrEqual(7);
    const dump = await db.execute<{ text: string }>(sql`
      select string_agg(t::text, ' ') as text from (
        select row_to_json(s)::text as t from ${sessions} s
        union all select row_to_json(l)::text from ${emailLinks} l
        union all select row_to_json(i)::text from ${invitations} i
        union all select row_to_json(a)::text from ${apiTokens} a
        union all select row_to_json(e)::text from ${auditEvents} e
      ) rows`);
    const text = dump.rows[0].text;
    for (const token of rawTokens) expect(text).not.toContain(token);
  });
});
