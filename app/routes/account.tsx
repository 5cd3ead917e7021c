import { data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/account";
import { accountInput, passwordFields } from "~/components/account/account-input";
import { ApiTokens } from "~/components/account/api-tokens";
import { CalendarFeed } from "~/components/account/calendar-feed";
import { NameForm } from "~/components/account/name-form";
import { PasswordForm } from "~/components/account/password-form";
import { Sessions } from "~/components/account/sessions";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireUser } from "~/server/auth/access.server";
import { createApiToken, listApiTokens, mayHaveApiTokens, revokeApiToken } from "~/server/auth/api-tokens.server";
import { endOwnSession, listUserSessions } from "~/server/auth/session.server";
import { redirectSignedOut, redirectWithNewSession } from "~/server/auth/session-responses.server";
import { changePassword, hasPassword, signOutEverywhere, updateName } from "~/server/auth/sign-in.server";
import { hasCalendarFeed, resetCalendarFeed } from "~/server/calendar/feed.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";

/** `?password=reset|changed`: where a reset or a change lands, to say it worked. */
const accountSearch = z.object({ password: z.enum(["reset", "changed"]).optional() });

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser({ request, context });
  const [sessions, canHaveTokens, passwordSet, calendarFeedMade] = await Promise.all([
    listUserSessions(user.id),
    mayHaveApiTokens(user),
    hasPassword(user.id),
    hasCalendarFeed(user.id),
  ]);
  const tokens = canHaveTokens ? await listApiTokens(user.id) : null;
  const { password: notice } = readSearchParams(request, accountSearch);
  return {
    user: { name: user.name, email: user.email },
    passwordSet,
    passwordNotice: notice ?? null,
    sessions: sessions.map((session) => ({ ...session, current: session.id === user.sessionId })),
    tokens,
    calendarFeedMade,
  };
}

export const action = formAction(async ({ request, context, formData }: Route.ActionArgs & { formData: FormData }) => {
  const user = await requireUser({ request, context });
  // Only staff have tokens: anyone else is refused before the form is read.
  if (formData.get("intent") === "create-token" && !(await mayHaveApiTokens(user))) throw data("Forbidden", { status: 403 });
  const submission = parseSubmission(formData, accountInput);
  if (submission.status !== "success") return data(submission.reply({ hideFields: passwordFields }), { status: 400 });
  const input = submission.value;
  switch (input.intent) {
    case "profile":
      await updateName(user.id, input.name);
      return { intent: input.intent, saved: true as const };
    case "password": {
      const result = await changePassword(user.id, input, request);
      if ("outcome" in result) {
        const fieldErrors = { currentPassword: ["This is not your current password."] };
        return data(submission.reply({ fieldErrors, hideFields: passwordFields }), { status: 400 });
      }
      return redirectWithNewSession({ request, context }, "/account?password=changed", result);
    }
    case "end-session":
      await endOwnSession(db, user.id, input.sessionId);
      if (input.sessionId === user.sessionId) return redirectSignedOut("/sign-in");
      return { intent: input.intent, ended: true as const };
    case "sign-out-everywhere":
      await signOutEverywhere(user.id, request);
      return redirectSignedOut("/sign-in");
    case "create-token": {
      const created = await createApiToken(user, input.tokenName, request);
      return { intent: input.intent, created: { name: input.tokenName, token: created.token } };
    }
    case "revoke-token":
      await revokeApiToken(user, input.tokenId, request);
      return { intent: input.intent, revoked: true as const };
    case "calendar-feed":
      return { intent: input.intent, calendarFeedUrl: await resetCalendarFeed(user.id, request) };
  }
});

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const { user, passwordSet, passwordNotice, sessions, tokens, calendarFeedMade } = loaderData;
  return (
    <div className="mx-auto max-w-3xl space-y-8">
      <PageHeader id="account-title" title="Your account">
        {user.email}
      </PageHeader>
      {passwordNotice ? (
        <Notice tone="success">
          {passwordNotice === "reset" ? "Your new password is saved." : "Your password is changed."} Every other session has been signed
          out.
        </Notice>
      ) : null}
      <NameForm
        name={user.name}
        lastResult={replyFor(actionData, "profile")}
        saved={actionData !== undefined && "saved" in actionData}
        busy={busy}
      />
      <PasswordForm passwordSet={passwordSet} lastResult={replyFor(actionData, "password")} busy={busy} />
      <Sessions sessions={sessions} busy={busy} />
      <CalendarFeed
        made={calendarFeedMade}
        url={actionData && "calendarFeedUrl" in actionData ? actionData.calendarFeedUrl : undefined}
        busy={busy}
      />
      {tokens ? (
        <ApiTokens
          tokens={tokens}
          created={actionData && "created" in actionData ? actionData.created : undefined}
          lastResult={replyFor(actionData, "create-token")}
          busy={busy}
        />
      ) : null}
    </div>
  );
}

export function meta() {
  return [{ title: "Your account · Benchpost" }];
}
