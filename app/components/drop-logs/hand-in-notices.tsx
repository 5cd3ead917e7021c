/** What the lab page says above the form: the last hand-in's receipt, whether hand-ins are taken now, and what a hand-in after the release does. */
import { Notice } from "~/components/ui/notice";
import type { HandInTiming } from "~/lib/drop-logs/hand-in-window";

const timingNotes = {
  "not-open": "This lab is not open for hand-ins yet; you can fill in your drop log and see the preview.",
  "on-time": null,
  late: "The due time has passed: a hand-in now is accepted but marked late.",
  closed: "This lab takes no more hand-ins.",
} as const;

export function HandInNotices({
  handedIn,
  timing,
  afterRelease,
  releasedMessage,
}: {
  handedIn: { version: number; late: boolean; duplicate: boolean } | null;
  timing: HandInTiming;
  afterRelease: "refuse" | "reopen" | null;
  releasedMessage: string;
}) {
  const open = timing === "on-time" || timing === "late";
  return (
    <>
      {handedIn ? (
        <Notice tone="success">
          Version {handedIn.version} is handed in{handedIn.late ? " (late)" : ""}
          {handedIn.duplicate ? " — it was already stored, nothing new was added" : ""}. The server's result is below.
        </Notice>
      ) : null}
      {timingNotes[timing] ? <Notice tone={timing === "closed" ? "error" : "warning"}>{timingNotes[timing]}</Notice> : null}
      {open && afterRelease === "refuse" ? <Notice tone="error">{releasedMessage}</Notice> : null}
      {open && afterRelease === "reopen" ? (
        <Notice tone="warning">
          Your mark for this lab is released. A new hand-in is still taken: your mark is then reopened and marked again on the new version.
        </Notice>
      ) : null}
    </>
  );
}
