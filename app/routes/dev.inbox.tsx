import { Link, type LoaderFunctionArgs, useLoaderData } from "react-router";
import { z } from "zod";
import { PageHeader } from "~/components/ui/page-header";
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

export default function DevInbox() {
  const { emails, templates, shown, filter } = useLoaderData<typeof loader>();
  return (
    <div>
      <PageHeader title="Development inbox">
        Every message the local mail catcher received, and a preview of each template. Nothing here left this machine.
      </PageHeader>
      <div className="grid gap-6 lg:grid-cols-[20rem_1fr]">
        <aside className="flex flex-col gap-6">
          <section aria-labelledby="caught-heading">
            <h2 id="caught-heading" className="font-semibold">
              Caught messages ({emails.length})
            </h2>
            <form method="get" className="mt-2 flex gap-2">
              <label className="sr-only" htmlFor="inbox-filter">
                Recipient
              </label>
              <input
                id="inbox-filter"
                name="to"
                type="search"
                defaultValue={filter}
                placeholder="recipient@example.org"
                className="min-w-0 flex-1 rounded border border-paper-300 bg-white px-2 py-1 text-sm"
              />
              <button type="submit" className="rounded bg-ink-800 px-3 py-1 text-sm text-paper-50">
                Filter
              </button>
            </form>
            {emails.length === 0 ? <p className="mt-2 text-sm text-ink-600">No messages yet.</p> : null}
            <ul className="mt-2 divide-y divide-paper-200 rounded border border-paper-200 bg-paper-50">
              {emails.map((email) => (
                <li key={email.id}>
                  <Link
                    to={`?message=${email.id}`}
                    className="block px-3 py-2 text-sm hover:bg-paper-100"
                    aria-current={shown?.kind === "message" && shown.email.id === email.id ? "page" : undefined}
                  >
                    <span className="block font-medium">{email.subject || "(no subject)"}</span>
                    <span className="block text-ink-600">
                      {email.toAddresses.join(", ")} · {formatDateTime(email.receivedAt, "UTC", "seconds")} UTC
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          </section>
          <section aria-labelledby="previews-heading">
            <h2 id="previews-heading" className="font-semibold">
              Template previews
            </h2>
            <p className="text-sm text-ink-600">Rendered with invented demo values.</p>
            <ul className="mt-2 flex flex-col gap-1 text-sm">
              {templates.map((template) => (
                <li key={template}>
                  <Link to={`?preview=${template}`} className="text-ink-700 underline">
                    {template}
                  </Link>
                </li>
              ))}
            </ul>
          </section>
        </aside>
        <section aria-label="Message" className="min-w-0">
          {shown ? <ShownMessage shown={shown} /> : <p className="text-ink-600">Choose a message or a template preview.</p>}
        </section>
      </div>
    </div>
  );
}

function ShownMessage({ shown }: { shown: Shown }) {
  const subject = shown.kind === "message" ? shown.email.subject : shown.subject;
  const html = shown.kind === "message" ? shown.email.html : shown.html;
  const text = shown.kind === "message" ? shown.email.text : shown.text;
  return (
    <article className="flex flex-col gap-4">
      <h2 className="text-xl font-semibold">{shown.kind === "preview" ? `Preview: ${subject}` : subject}</h2>
      {shown.kind === "message" ? (
        <details>
          <summary className="cursor-pointer text-sm font-medium">Headers</summary>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-xs">
            {Object.entries(shown.email.headers).map(([name, value]) => (
              <div key={name} className="contents">
                <dt className="font-mono text-ink-600">{name}</dt>
                <dd className="break-all font-mono whitespace-pre-wrap">{value}</dd>
              </div>
            ))}
          </dl>
        </details>
      ) : null}
      <h3 className="font-medium">HTML</h3>
      {/* An empty sandbox: the message's own scripts and forms cannot run against this origin. */}
      {html ? (
        <iframe
          title={`HTML of “${subject}”`}
          sandbox=""
          srcDoc={html}
          className="h-[36rem] w-full rounded border border-paper-300 bg-white"
        />
      ) : (
        <p className="text-sm">No HTML part.</p>
      )}
      <h3 className="font-medium">Plain text</h3>
      <pre className="overflow-x-auto rounded border border-paper-300 bg-paper-50 p-3 text-sm whitespace-pre-wrap">
        {text ?? "No text part."}
      </pre>
    </article>
  );
}

export function meta() {
  return [{ title: "Development inbox · Benchpost" }];
}
