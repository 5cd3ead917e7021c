import type { ReactNode } from "react";
import { Form, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/account";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { PASSWORD_MIN_LENGTH, newPasswordField, passwordToCheck } from "~/lib/auth/password-policy";
import { parseForm } from "~/lib/forms/parse-form";
import { requireUser } from "~/server/auth/access.server";
import { createApiToken, listApiTokens, mayHaveApiTokens, revokeApiToken } from "~/server/auth/api-tokens.server";
import { endOwnSession, listUserSessions } from "~/server/auth/session.server";
import { redirectSignedOut, redirectWithNewSession } from "~/server/auth/session-responses.server";
import { changePassword, hasPassword, signOutEverywhere, updateName } from "~/server/auth/sign-in.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { formatDateTime } from "~/lib/format-date";

/** `?password=reset|changed`: where a reset or a change lands, to say it worked. */
const accountSearch = z.object({ password: z.enum(["reset", "changed"]).optional() });
const profileSchema = z.object({ intent: z.literal("profile"), name: z.string().trim().min(1, "Enter your name.").max(120) });
const passwordSchema = z
  .object({
    intent: z.literal("password"),
    currentPassword: passwordToCheck.default(""),
    newPassword: newPasswordField,
    confirmPassword: z.string(),
  })
  .refine((form) => form.newPassword === form.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two passwords are not the same.",
  });
const endSessionSchema = z.object({ intent: z.literal("end-session"), sessionId: z.string().min(1) });
const createTokenSchema = z.object({
  intent: z.literal("create-token"),
  tokenName: z.string().trim().min(1, "Name the token after what will use it.").max(80),
});
const revokeTokenSchema = z.object({ intent: z.literal("revoke-token"), tokenId: z.uuid() });

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser({ request, context });
  const [sessions, canHaveTokens, passwordSet] = await Promise.all([
    listUserSessions(user.id),
    mayHaveApiTokens(user),
    hasPassword(user.id),
  ]);
  const tokens = canHaveTokens ? await listApiTokens(user.id) : null;
  const { password: notice } = readSearchParams(request, accountSearch);
  return {
    user: { name: user.name, email: user.email },
    passwordSet,
    passwordNotice: notice ?? null,
    sessions: sessions.map((session) => ({ ...session, current: session.id === user.sessionId })),
    tokens,
  };
}

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUser({ request, context });
  const formData = await request.formData();
  switch (formData.get("intent")) {
    case "profile": {
      const form = parseForm(profileSchema, formData);
      if (!form.ok) return data({ intent: "profile" as const, errors: form.errors, values: form.values }, { status: 400 });
      await updateName(user.id, form.data.name);
      return { intent: "profile" as const, saved: true };
    }
    case "password": {
      const form = parseForm(passwordSchema, formData);
      if (!form.ok) return data({ intent: "password" as const, errors: form.errors }, { status: 400 });
      const result = await changePassword(user.id, form.data, request);
      if ("outcome" in result)
        return data({ intent: "password" as const, errors: { currentPassword: "This is not your current password." } }, { status: 400 });
      return redirectWithNewSession({ request, context }, "/account?password=changed", result);
    }
    case "end-session": {
      const form = parseForm(endSessionSchema, formData);
      if (!form.ok) return data({ intent: "end-session" as const, errors: form.errors }, { status: 400 });
      await endOwnSession(db, user.id, form.data.sessionId);
      if (form.data.sessionId === user.sessionId) return redirectSignedOut("/sign-in");
      return { intent: "end-session" as const, ended: true };
    }
    case "sign-out-everywhere": {
      await signOutEverywhere(user.id, request);
      return redirectSignedOut("/sign-in");
    }
    case "create-token": {
      if (!(await mayHaveApiTokens(user))) throw data("Forbidden", { status: 403 });
      const form = parseForm(createTokenSchema, formData);
      if (!form.ok) return data({ intent: "create-token" as const, errors: form.errors, values: form.values }, { status: 400 });
      const created = await createApiToken(user, form.data.tokenName, request);
      return { intent: "create-token" as const, created: { name: form.data.tokenName, token: created.token } };
    }
    case "revoke-token": {
      const form = parseForm(revokeTokenSchema, formData);
      if (!form.ok) return data({ intent: "revoke-token" as const, errors: form.errors }, { status: 400 });
      await revokeApiToken(user, form.data.tokenId, request);
      return { intent: "revoke-token" as const, revoked: true };
    }
    default:
      return data({ intent: null, errors: { form: "Unknown action." } }, { status: 400 });
  }
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const result = (intent: string) => (actionData?.intent === intent ? (actionData as Record<string, unknown>) : undefined);
  const errorsOf = (intent: string) => (result(intent)?.errors as Record<string, string | undefined> | undefined) ?? {};
  const valuesOf = (intent: string) => (result(intent)?.values as Record<string, string> | undefined) ?? {};
  const created = result("create-token")?.created as { name: string; token: string } | undefined;
  return (
    <div className="mx-auto max-w-3xl space-y-8">
      <PageHeader id="account-title" title="Your account">
        {loaderData.user.email}
      </PageHeader>
      {loaderData.passwordNotice ? (
        <Notice tone="success">
          {loaderData.passwordNotice === "reset" ? "Your new password is saved." : "Your password is changed."} Every other session has been
          signed out.
        </Notice>
      ) : null}

      <Section id="profile-title" title="Name">
        <Form method="post" className="flex flex-col gap-3 sm:flex-row sm:items-end">
          <input type="hidden" name="intent" value="profile" />
          <TextField
            className="flex-1"
            label="Your name"
            name="name"
            autoComplete="name"
            required
            defaultValue={valuesOf("profile").name ?? loaderData.user.name}
            error={errorsOf("profile").name}
          />
          <Button type="submit" disabled={busy}>
            Save
          </Button>
        </Form>
        {result("profile")?.saved ? <p className="mt-2 text-sm text-consistent">Saved.</p> : null}
      </Section>

      <Section id="password-title" title={loaderData.passwordSet ? "Change your password" : "Choose a password"}>
        <Form method="post" className="space-y-3">
          <input type="hidden" name="intent" value="password" />
          {loaderData.passwordSet ? (
            <TextField
              label="Current password"
              name="currentPassword"
              type="password"
              autoComplete="current-password"
              required
              error={errorsOf("password").currentPassword}
            />
          ) : (
            <p className="text-sm text-ink-700">
              You sign in with e-mailed links. A password lets you sign in without waiting for an e-mail.
            </p>
          )}
          <TextField
            label="New password"
            name="newPassword"
            type="password"
            autoComplete="new-password"
            required
            minLength={PASSWORD_MIN_LENGTH}
            hint="Saving it signs you out on every other device."
            error={errorsOf("password").newPassword}
          />
          <TextField
            label="The same password again"
            name="confirmPassword"
            type="password"
            autoComplete="new-password"
            required
            error={errorsOf("password").confirmPassword}
          />
          <Button type="submit" disabled={busy}>
            Save the password
          </Button>
        </Form>
      </Section>

      <Section id="sessions-title" title="Where you are signed in">
        <ul className="divide-y divide-ink-900/10">
          {loaderData.sessions.map((session) => (
            <li key={session.id} className="flex flex-col gap-2 py-3 sm:flex-row sm:items-center sm:justify-between">
              <div className="text-sm">
                <p className="font-medium">
                  {describeDevice(session.userAgent)}
                  {session.current ? " · this device" : ""}
                </p>
                <p className="text-ink-600">
                  Since <time dateTime={new Date(session.createdAt).toISOString()}>{formatDate(session.createdAt)}</time>
                  {session.ip ? ` · from ${session.ip}` : ""}
                </p>
              </div>
              <Form method="post">
                <input type="hidden" name="intent" value="end-session" />
                <input type="hidden" name="sessionId" value={session.id} />
                <Button
                  type="submit"
                  variant="secondary"
                  disabled={busy}
                  aria-label={`Sign out ${describeDevice(session.userAgent)}${session.current ? " (this device)" : ""}`}
                >
                  Sign out
                </Button>
              </Form>
            </li>
          ))}
        </ul>
        <Form method="post" className="mt-3">
          <input type="hidden" name="intent" value="sign-out-everywhere" />
          <Button type="submit" variant="danger" disabled={busy}>
            Sign out everywhere
          </Button>
        </Form>
      </Section>

      {loaderData.tokens ? (
        <Section id="tokens-title" title="Personal API tokens">
          <p className="text-sm text-ink-700">
            For scripts that call Benchpost's API as you: send the token as <code>Authorization: Bearer …</code>. Treat it like a password.
          </p>
          {created ? (
            <div className="mt-3">
              <Notice tone="success">
                <p>Token “{created.name}” created. Copy it now: it is shown only this once.</p>
                <p
                  className="mt-2 break-all rounded bg-white px-2 py-1 font-mono text-ink-950 ring-1 ring-ink-900/10"
                  data-testid="new-api-token"
                >
                  {created.token}
                </p>
              </Notice>
            </div>
          ) : null}
          <Form method="post" className="mt-3 flex flex-col gap-3 sm:flex-row sm:items-end">
            <input type="hidden" name="intent" value="create-token" />
            <TextField
              className="flex-1"
              label="Token name"
              name="tokenName"
              placeholder="e.g. mark export script"
              required
              defaultValue={valuesOf("create-token").tokenName}
              error={errorsOf("create-token").tokenName}
            />
            <Button type="submit" disabled={busy}>
              Create a token
            </Button>
          </Form>
          {loaderData.tokens.length > 0 ? (
            <table className="mt-4 w-full text-left text-sm">
              <thead>
                <tr className="text-ink-600">
                  <th className="py-2 font-medium">Name</th>
                  <th className="py-2 font-medium">Created</th>
                  <th className="py-2 font-medium">Last used</th>
                  <th className="py-2">
                    <span className="sr-only">Revoke</span>
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-ink-900/10">
                {loaderData.tokens.map((token) => (
                  <tr key={token.id}>
                    <td className="py-2">{token.name}</td>
                    <td className="py-2">{formatDate(token.createdAt)}</td>
                    <td className="py-2">{token.lastUsedAt ? formatDate(token.lastUsedAt) : "never"}</td>
                    <td className="py-2 text-right">
                      <Form method="post">
                        <input type="hidden" name="intent" value="revoke-token" />
                        <input type="hidden" name="tokenId" value={token.id} />
                        <Button type="submit" variant="danger" disabled={busy} aria-label={`Revoke ${token.name}`}>
                          Revoke
                        </Button>
                      </Form>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </Section>
      ) : null}
    </div>
  );
}

function Section({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
      <h2 id={id} className="mb-3 text-lg font-medium">
        {title}
      </h2>
      {children}
    </section>
  );
}

function describeDevice(userAgent: string | null): string {
  if (!userAgent) return "Unknown device";
  const browser = /Firefox\//.test(userAgent)
    ? "Firefox"
    : /Edg\//.test(userAgent)
      ? "Edge"
      : /Chrome\//.test(userAgent)
        ? "Chrome"
        : /Safari\//.test(userAgent)
          ? "Safari"
          : "A browser";
  const system = /Android/.test(userAgent)
    ? "Android"
    : /iPhone|iPad/.test(userAgent)
      ? "iOS"
      : /Mac OS X/.test(userAgent)
        ? "macOS"
        : /Windows/.test(userAgent)
          ? "Windows"
          : /Linux/.test(userAgent)
            ? "Linux"
            : null;
  return system ? `${browser} on ${system}` : browser;
}

function formatDate(value: Date | string): string {
  return `${formatDateTime(value, "UTC")} UTC`;
}

export function meta() {
  return [{ title: "Your account · Benchpost" }];
}
