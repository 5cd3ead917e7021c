/**
 * Accounts end to end through the built app: sessions, password and e-mailed-link sign-in, resets,
 * invitations, rate limits, CSRF refusal, personal API tokens and security headers.
 */
import { desc, eq, sql } from "drizzle-orm";
import pg from "pg";
import { beforeAll, describe, expect, it, vi } from "vitest";
import { apiTokens, auditEvents, courseMemberships, emailLinks, emailOutbox, invitations, sessions, taCohortAssignments, users } from "~/db/schema";
import { hashPassword } from "~/server/auth/password.server";
import { SESSION_COOKIE, SESSION_LIFETIME_MS, validateSessionToken } from "~/server/auth/session.server";
import { hashToken } from "~/server/auth/tokens.server";
import { db } from "~/server/db.server";
import { createInvitations } from "~/server/members/invitations.server";
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
    const [row] = await db.select().from(sessions).where(eq(sessions.id, hashToken(token)));
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

  it("renews a session with fewer than 15 days left, and sends the new expiry in the cookie", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const id = hashToken(cookie.split("=")[1]);
    await db.update(sessions).set({ expiresAt: new Date(Date.now() + 10 * DAY) }).where(eq(sessions.id, id));
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
    await db.update(sessions).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(sessions.id, id));
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

  it("limits e-mailed link requests per address", async () => {
    await createUser("linky@accounts.example");
    const statuses: number[] = [];
    for (let attempt = 1; attempt <= 6; attempt++) {
      const response = await handle(appRequest("/forgot-password", { form: { email: "linky@accounts.example" }, ip: `192.0.2.${attempt}` }));
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

  it("says the same whether or not an account exists, and sends nothing to an unknown address", async () => {
    const response = await handle(appRequest("/forgot-password", { form: { email: "ghost@accounts.example" } }));
    expect(response.status).toBe(200);
    expect(await latestEmailTo("ghost@accounts.example")).toBeUndefined();
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

  it("refuses a common password and keeps any Unicode password whole", async () => {
    const user = await createUser("policy@accounts.example");
    const cookie = await sessionCookieFor(user.id);
    const common = await handle(appRequest("/account", { cookie, form: { intent: "password", currentPassword: PASSWORD, newPassword: "password123", confirmPassword: "password123" } }));
    expect(common.status).toBe(400);
    expect(await common.text()).toMatch(/most common/);
    const long = `${"ünïcødé 🌊 ".repeat(8)}end`;
    const changed = await handle(appRequest("/account", { cookie, form: { intent: "password", currentPassword: PASSWORD, newPassword: long, confirmPassword: long } }));
    expect(changed.status).toBe(302);
    // Changing the password ended the session it was changed from; the response carries a new one.
    expect(await validateSessionToken(cookie.split("=")[1])).toBeNull();
    expect(sessionTokenFrom(changed)).toBeTruthy();
    expect((await signIn("policy@accounts.example", long.slice(0, -1), "203.0.113.30")).status).toBe(401);
    expect((await signIn("policy@accounts.example", long, "203.0.113.30")).status).toBe(302);
  });
});

describe("invitations", () => {
  async function invite(email: string, role: string, cohortId = "") {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const response = await handle(appRequest(`/courses/${fixture.courseId}/members`, { cookie, form: { intent: "invite", email, name: "Invited Person", role, cohortId } }));
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
        const people = Array.from({ length: count }, (_, index) => ({ email: `${prefix}${index}@bulk.example`, role: "student" as const, cohortId: fixture.cohortId }));
        const result = await db.transaction((tx) => createInvitations(tx, { id: fixture.userIds.instructor, name: "Test instructor" }, fixture.courseId, people));
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
      appRequest(`/courses/${fixture.courseId}/members/${fixture.membershipIds.sameCohortStudent}`, { cookie, form: { intent: "change-role", role: "student", cohortId: fixture.otherCohortId } }),
    );
    expect(change.status).toBe(200);
    const log = await handle(appRequest(`/courses/${fixture.courseId}/audit`, { cookie }));
    const html = await log.text();
    expect(html).toContain("sent an invitation");
    expect(html).toContain("accepted an invitation");
    expect(html).toContain("changed a member&#x27;s role");
  });
});

describe("cross-site requests", () => {
  it("changes nothing on a cross-origin POST, with or without an Origin header", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const form = { intent: "profile", name: "Renamed By Another Site" };
    const foreign = await handle(appRequest("/account", { cookie, form, origin: "https://evil.example" }));
    const noOrigin = await handle(appRequest("/account", { cookie, form, origin: null, headers: { "Sec-Fetch-Site": "cross-site" } }));
    const noHeaders = await handle(appRequest("/account", { cookie, form, origin: null }));
    const dataRequest = await handle(appRequest("/account.data", { cookie, form, origin: null, headers: { "Sec-Fetch-Site": "same-site" } }));
    // Every refusal is ours: 403 with Benchpost's own page, not the framework's bare 400.
    expect([foreign.status, noOrigin.status, noHeaders.status, dataRequest.status]).toEqual([403, 403, 403, 403]);
    expect(await foreign.text()).toContain("That form came from another site");
    const [user] = await db.select({ name: users.name }).from(users).where(eq(users.id, fixture.userIds.ownStudent));
    expect(user.name).toBe("Test ownStudent");
    const sameOrigin = await handle(appRequest("/account", { cookie, form: { ...form, name: "Renamed Here" }, origin: null, headers: { "Sec-Fetch-Site": "same-origin" } }));
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
    expect(await me.json()).toMatchObject({ user: { id: fixture.userIds.assignedTa }, authenticatedWith: "api-token", courses: [{ id: fixture.courseId, role: "ta" }] });
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
