/** What the extensions page shows: the class's own times, the extensions in force, and what a write did. */
import { Form } from "react-router";
import { LabTime } from "~/components/drop-logs/lab-time";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import type { ExtensionRow } from "~/server/labs/extensions.server";
import { extendedWho } from "~/lib/labs/extension-words";

export function ClassTimes({ lab, timeZone }: { lab: { opensAt: string; dueAt: string; lateCutoffAt: string | null }; timeZone: string }) {
  return (
    <section aria-labelledby="class-window-heading">
      <h2 id="class-window-heading" className="mb-2 text-lg font-semibold">
        The class&apos;s times
      </h2>
      <dl className="grid gap-4 sm:grid-cols-3">
        <TimeTerm label="Opens" at={lab.opensAt} timeZone={timeZone} />
        <TimeTerm label="Due" at={lab.dueAt} timeZone={timeZone} />
        <TimeTerm label="Late cut-off" at={lab.lateCutoffAt} timeZone={timeZone} />
      </dl>
    </section>
  );
}

function TimeTerm({ label, at, timeZone }: { label: string; at: string | null; timeZone: string }) {
  return (
    <div>
      <dt className="text-sm text-ink-600">{label}</dt>
      <dd>{at ? <LabTime at={at} courseTimeZone={timeZone} /> : "None: nothing after the due time"}</dd>
    </div>
  );
}

export function ExtensionTable({
  labTitle,
  extensions,
  timeZone,
  removable,
  busy,
}: {
  labTitle: string;
  extensions: ExtensionRow[];
  timeZone: string;
  removable: boolean;
  busy: boolean;
}) {
  if (extensions.length === 0) return <p className="text-sm text-ink-700">None: everyone has the class&apos;s times.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Extensions of {labTitle}</caption>
        <thead>
          <tr className="border-b border-ink-900/20">
            {["For", "Due", "Late cut-off", "Reason", "Set by"].map((heading) => (
              <th key={heading} scope="col" className="py-1 pr-3">
                {heading}
              </th>
            ))}
            {removable ? (
              <th scope="col" className="py-1">
                <span className="sr-only">Remove</span>
              </th>
            ) : null}
          </tr>
        </thead>
        <tbody>
          {extensions.map((extension) => (
            <ExtensionTableRow key={extension.id} extension={extension} timeZone={timeZone} removable={removable} busy={busy} />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function ExtensionTableRow({
  extension,
  timeZone,
  removable,
  busy,
}: {
  extension: ExtensionRow;
  timeZone: string;
  removable: boolean;
  busy: boolean;
}) {
  const target = extension.studentName ?? `the ${extension.cohortName} cohort`;
  return (
    <tr className="border-b border-ink-900/10 align-top">
      <th scope="row" className="py-1 pr-3 font-medium">
        {extension.studentName ? (
          <>
            {extension.studentName} <span className="font-normal text-ink-600">({extension.cohortName})</span>
          </>
        ) : (
          <>Whole cohort: {extension.cohortName}</>
        )}
      </th>
      <td className="py-1 pr-3">
        <LabTime at={extension.dueAt} courseTimeZone={timeZone} />
      </td>
      <td className="py-1 pr-3">{extension.lateCutoffAt ? <LabTime at={extension.lateCutoffAt} courseTimeZone={timeZone} /> : "None"}</td>
      <td className="py-1 pr-3">{extension.reason}</td>
      <td className="py-1 pr-3">
        {extension.setBy ?? "—"}, <LabTime at={extension.setAt} courseTimeZone={timeZone} />
      </td>
      {removable ? (
        <td className="py-1">
          <Form method="post">
            <input type="hidden" name="intent" value="remove" />
            <input type="hidden" name="extensionId" value={extension.id} />
            <Button type="submit" variant="danger" disabled={busy} className="py-1">
              Remove<span className="sr-only"> the extension of {target}</span>
            </Button>
          </Form>
        </td>
      ) : null}
    </tr>
  );
}

export function DoneNotice({
  done,
  count,
  dueAt,
  timeZone,
}: {
  done: "extend-students" | "extend-cohort" | "remove";
  count: number;
  dueAt: string | null;
  timeZone: string;
}) {
  if (done === "remove")
    return (
      <Notice tone="success">
        The extension is removed: its students are back on their cohort&apos;s or the class&apos;s times, and their hand-ins are judged by
        them.
      </Notice>
    );
  const who = done === "extend-cohort" ? "The cohort is" : extendedWho(count);
  return (
    <Notice tone="success">
      {who} now due <LabTime at={dueAt!} courseTimeZone={timeZone} />; hand-ins already made are judged by the new time.
    </Notice>
  );
}
