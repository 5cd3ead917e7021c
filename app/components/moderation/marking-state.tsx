/** Where the marking stands: closing it to TAs (or opening it again) and releasing the marks. */
import { useState } from "react";
import { Form } from "react-router";
import { LabTime } from "~/components/drop-logs/lab-time";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { afterReleaseHandInNames, releasedCount, type ReleaseCounts } from "~/lib/marking/release";
import { changedSinceWords, releaseButtonLabel, reopenedWords, stillOpenWords } from "~/lib/marking/moderation-words";
import { counted } from "~/lib/plural";
import type { Moderation, ReleasePreview } from "~/server/marking/moderation.server";

type Standing = Pick<Moderation, "released" | "changedAfterRelease" | "needsRemarking" | "release">;

export function MarkingState({
  lab,
  standing,
  timeZone,
  busy,
  typed,
}: {
  lab: { readyAt: string | null; releasedAt: string | null };
  standing: Standing;
  timeZone: string;
  busy: boolean;
  /** What a refused release had chosen, to show it again. */
  typed?: Record<string, string>;
}) {
  const { released, changedAfterRelease, needsRemarking, release } = standing;
  return (
    <section aria-labelledby="state-heading" className="flex flex-col gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <h2 id="state-heading" className="text-lg font-semibold">
        Where the marking stands
      </h2>
      <p className="text-sm">
        {lab.readyAt ? (
          <>
            Closed to TAs since <LabTime at={lab.readyAt} courseTimeZone={timeZone} />.
          </>
        ) : (
          "Open: TAs are marking at the desk."
        )}{" "}
        {lab.releasedAt ? (
          <>
            {counted(released, "mark", "marks")} released, last on <LabTime at={lab.releasedAt} courseTimeZone={timeZone} />
            {changedAfterRelease ? `; ${changedSinceWords(changedAfterRelease)}` : ""}
            {needsRemarking ? `; ${reopenedWords(needsRemarking)}` : ""}.
          </>
        ) : (
          "Nothing released: students see no marks."
        )}
      </p>
      <div className="flex flex-wrap gap-3">
        <Form method="post">
          <input type="hidden" name="intent" value={lab.readyAt ? "reopen" : "ready"} />
          <Button type="submit" variant="secondary" disabled={busy}>
            {lab.readyAt ? "Open the marking to TAs again" : "Close the marking to TAs"}
          </Button>
        </Form>
        {lab.readyAt ? null : (
          <p className="self-center text-sm text-ink-700">Close the marking to TAs before releasing, so nothing changes under you.</p>
        )}
      </div>
      {lab.readyAt ? (
        <ReleaseForm
          release={release}
          timeZone={timeZone}
          busy={busy}
          again={released > 0}
          values={typed?.intent === "release" ? typed : undefined}
        />
      ) : null}
    </section>
  );
}

/** Each standing's count, in the words the release form uses. */
const standingWords: [keyof ReleaseCounts, string][] = [
  ["fully-marked", "fully marked"],
  ["partly-marked", "partly marked"],
  ["marked-on-earlier-version", "marked on an earlier version than their latest hand-in"],
  ["not-marked", "handed in, not marked yet (never released)"],
  ["no-hand-in", "handed in nothing, and can no longer"],
  ["no-hand-in-still-open", "handed in nothing yet, and still may (never released)"],
  ["released", "already released"],
];

/** Release, as a choice with its counts: nothing is released before the instructor picks whom. */
function ReleaseForm({
  release,
  timeZone,
  busy,
  again,
  values,
}: {
  release: ReleasePreview;
  timeZone: string;
  busy: boolean;
  again: boolean;
  values?: Record<string, string>;
}) {
  const [scope, setScope] = useState(values?.scope ?? "");
  const [zeroForNoHandIn, setZeroForNoHandIn] = useState(values?.zeroForNoHandIn === "on");
  const { counts, stillOpen } = release;
  const count = scope === "marked" || scope === "all" ? releasedCount(counts, { scope, zeroForNoHandIn }) : null;
  return (
    <Form method="post" className="flex flex-col gap-3 border-t border-ink-900/10 pt-3" aria-labelledby="release-heading">
      <input type="hidden" name="intent" value="release" />
      <h3 id="release-heading" className="font-semibold">
        {again ? "Release the marks added since" : "Release the marks"}
      </h3>
      <ul className="text-sm" aria-label="Where the students stand">
        {standingWords.map(([standing, words]) => (
          <li key={standing}>
            <span className="tabular-nums">{counts[standing]}</span> {words}
          </li>
        ))}
      </ul>
      {stillOpen.students ? (
        <Notice tone="warning">
          {stillOpenWords(stillOpen.students)}
          {stillOpen.until ? (
            <>
              , until <LabTime at={stillOpen.until} courseTimeZone={timeZone} />
            </>
          ) : null}
          . After the release, a hand-in from a student whose mark is released is handled as the lab says:{" "}
          {afterReleaseHandInNames[release.afterReleaseHandIns].toLowerCase()}.
        </Notice>
      ) : null}
      {stillOpen.students ? (
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" name="whileOpen" defaultChecked={values?.whileOpen === "on"} /> Release anyway, while hand-ins are still
          possible
        </label>
      ) : null}
      <fieldset className="flex flex-col gap-1 text-sm">
        <legend className="font-medium">Whom to release</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name="scope" value="marked" checked={scope === "marked"} onChange={() => setScope("marked")} required /> Only
          the fully marked students ({counts["fully-marked"]})
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="scope" value="all" checked={scope === "all"} onChange={() => setScope("all")} /> Every marked student,
          partly marked included ({counts["fully-marked"] + counts["partly-marked"] + counts["marked-on-earlier-version"]})
        </label>
        <label className="mt-1 flex items-center gap-2">
          <input
            type="checkbox"
            name="zeroForNoHandIn"
            checked={zeroForNoHandIn}
            onChange={(event) => setZeroForNoHandIn(event.target.checked)}
          />{" "}
          Release zero for no hand-in ({counts["no-hand-in"]}; a mark already given to one of them is released as it is)
        </label>
      </fieldset>
      <div>
        <Button type="submit" disabled={busy || count === null}>
          {count === null ? "Choose whom to release" : releaseButtonLabel(count)}
        </Button>
      </div>
    </Form>
  );
}
