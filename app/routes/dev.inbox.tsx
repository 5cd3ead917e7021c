import { Link, type LoaderFunctionArgs, useLoaderData } from "react-router";
import { z } from "zod";
import { Button, ButtonLink } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { counted } from "~/lib/plural";
import { formatDateTime } from "~/lib/format-date";
import { emailTemplateNames } from "../../emails/template-props";
import { renderTemplatePreviews } from "~/server/email/email-templates.server";
import { type CaughtEmail, getCaughtEmail, listCaughtEmails, requireDevInbox } from "~/server/email/dev-inbox.server";

const selection = z.object({
  message: z.uuid().optional(),
  preview: z.enum(emailTemplateNames as [string, ...string[]]).optional(),
  to: z.string().trim().max(254).optional(),
});

type Shown = { kind: "message"; email: CaughtEmail } | { kind: "preview"; template: string; subject: string; html: string; text: string };

// Typed without `./+types`: typegen sees this route only when it is run for a demo build.
export async function loader({ request, context }: LoaderFunctionArgs) {
  requireDevInbox(context);
  const parsed = selection.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  const wanted = parsed.success ? parsed.data : {};
  const emails = await listCaughtEmails({ to: wanted.to || undefined });
  let shown: Shown | null = null;
  if (wanted.message) {
    const email = await getCaughtEmail(wanted.message);
    if (email) shown = { kind: "message", email };
  } else if (wanted.preview) {
    const preview = (await renderTemplatePreviews()).find((candidate) => candidate.template === wanted.preview);
    if (preview) shown = { kind: "preview", ...preview };
  }
  return { emails, templates: emailTemplateNames, shown, filter: wanted.to ?? "" };
}

/**
 * One column in the app's own look: the message or preview being read comes first, full width, then
 * what was caught as a grid of slips addressed to their recipient, then the templates. Reading one
 * message at a time, not a mail program's list beside a reading pane.
 */
export default function DevInbox() {
  const { emails, templates, shown, filter } = useLoaderData<typeof loader>();
  return (
    <div className="flex flex-col gap-8">
      <PageHeader title="Development inbox">
        What Benchpost sent while running on this machine, caught before it could leave, and every e-mail template with invented values.
      </PageHeader>
      <Notice>Nothing here was delivered: the local mail catcher keeps every message, and the links in them point back to this app.</Notice>

      {shown ? <ShownMessage shown={shown} /> : null}

      <section aria-labelledby="caught-heading" className="flex flex-col gap-3">
        <div className="flex flex-wrap items-end justify-between gap-4">
          <h2 id="caught-heading" className="text-lg font-semibold">
            Caught on this machine: {counted(emails.length, "message", "messages")}
            {filter ? ` for ${filter}` : ""}
          </h2>
          <form method="get" className="flex flex-wrap items-end gap-2">
            <TextField label="For the address" name="to" type="search" defaultValue={filter} className="w-64" />
            <Button type="submit" variant="secondary">
              Show
            </Button>
            {filter ? (
              <Link to="." className="px-2 py-2 text-sm underline">
                Everyone
              </Link>
            ) : null}
          </form>
        </div>
        {emails.length === 0 ? (
          <p className="text-sm text-ink-700">Nothing caught yet{filter ? ` for ${filter}` : ""}.</p>
        ) : (
          <ol className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
            {emails.map((email) => {
              const open = shown?.kind === "message" && shown.email.id === email.id;
              return (
                <li
                  key={email.id}
                  className={`rounded-lg bg-white p-4 shadow-sm ring-1 ${open ? "ring-2 ring-ink-800" : "ring-ink-900/10"}`}
                >
                  <p className="text-sm wrap-anywhere text-ink-700">For {email.toAddresses.join(", ")}</p>
                  <p className="mt-1 font-medium">{email.subject || "Without a subject"}</p>
                  <p className="mt-1 text-sm text-ink-700">
                    Caught{" "}
                    <time dateTime={new Date(email.receivedAt).toISOString()}>{formatDateTime(email.receivedAt, "UTC", "seconds")}</time>
                  </p>
                  <Link
                    to={`?message=${email.id}`}
                    className="mt-2 inline-block text-sm font-medium underline"
                    aria-current={open ? "page" : undefined}
                  >
                    {open ? "Reading it above" : "Read it"}
                    <span className="sr-only">: {email.subject || "without a subject"}</span>
                  </Link>
                </li>
              );
            })}
          </ol>
        )}
      </section>

      <section aria-labelledby="previews-heading" className="flex flex-col gap-3">
        <h2 id="previews-heading" className="text-lg font-semibold">
          Every template, with invented values
        </h2>
        <ul className="flex flex-wrap gap-2">
          {templates.map((template) => (
            <li key={template}>
              <ButtonLink
                to={`?preview=${template}`}
                variant="secondary"
                aria-current={shown?.kind === "preview" && shown.template === template ? "page" : undefined}
              >
                {template}
              </ButtonLink>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}

function ShownMessage({ shown }: { shown: Shown }) {
  const subject = shown.kind === "message" ? shown.email.subject : shown.subject;
  const html = shown.kind === "message" ? shown.email.html : shown.html;
  const text = shown.kind === "message" ? shown.email.text : shown.text;
  return (
    <article aria-labelledby="shown-heading" className="flex flex-col gap-4 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <h2 id="shown-heading" className="text-xl font-semibold">
            {shown.kind === "preview" ? `Preview: ${subject}` : subject}
          </h2>
          {shown.kind === "message" ? <p className="text-sm wrap-anywhere text-ink-700">For {shown.email.toAddresses.join(", ")}</p> : null}
        </div>
        <Link to="." className="text-sm underline">
          Put it away
        </Link>
      </div>
      <div className="grid gap-4 lg:grid-cols-2">
        <section aria-label="As the recipient sees it" className="min-w-0">
          <h3 className="mb-2 font-medium">As the recipient sees it</h3>
          {/* An empty sandbox: the message's own scripts and forms cannot run against this origin. */}
          {html ? (
            <iframe
              title={`HTML of “${subject}”`}
              sandbox=""
              srcDoc={html}
              className="h-[36rem] w-full rounded border border-ink-900/20 bg-white"
            />
          ) : (
            <p className="text-sm">No HTML part.</p>
          )}
        </section>
        <section aria-label="Plain text" className="min-w-0">
          <h3 className="mb-2 font-medium">Plain text</h3>
          <pre className="overflow-x-auto rounded bg-paper-100 p-3 text-sm whitespace-pre-wrap">{text ?? "No text part."}</pre>
        </section>
      </div>
      {shown.kind === "message" ? (
        <details>
          <summary className="cursor-pointer text-sm font-medium">Headers as caught</summary>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-xs">
            {Object.entries(shown.email.headers).map(([name, value]) => (
              <div key={name} className="contents">
                <dt className="font-mono text-ink-700">{name}</dt>
                <dd className="break-all font-mono whitespace-pre-wrap">{value}</dd>
              </div>
            ))}
          </dl>
        </details>
      ) : null}
    </article>
  );
}

export function meta() {
  return [{ title: "Development inbox · Benchpost" }];
}
