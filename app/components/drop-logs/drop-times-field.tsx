/**
 * The table of drop times: one row per drop, typed, pasted as a column (from a spreadsheet or a
 * stopwatch app) or read from a CSV file. Rows are `drops[0]`, `drops[1]`…; adding and removing a row
 * are buttons that submit the form without JavaScript (the server saves the draft with the row
 * changed) and change the table in place with it.
 */
import Papa from "papaparse";
import { useEffect, useRef, useState, type ClipboardEvent } from "react";
import { Button } from "~/components/ui/button";
import { dropFieldName } from "~/lib/drop-logs/drop-log-input";
import { enteredTimes, joinTimes, splitPastedTimes, type TimesJoin } from "~/lib/drop-logs/pasted-times";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import { counted, plural } from "~/lib/plural";
import { joinTimesQuestion } from "~/lib/drop-logs/drop-log-words";

/** A column of times waiting for the student to say how it joins the drops already typed. */
type IncomingColumn = { times: string[]; /** "from the clipboard", "from runs.csv" */ from: string; returnFocusTo: number };

/** The first column of a CSV file that holds numbers; a header row above them is skipped. */
function numberColumn(rows: string[][]): string[] | null {
  const width = Math.max(0, ...rows.map((row) => row.length));
  for (let column = 0; column < width; column++) {
    const cells = rows.map((row) => (row[column] ?? "").trim()).filter((cell) => Number.isFinite(parseTypedNumber(cell)));
    if (cells.length) return cells;
  }
  return null;
}

export function DropTimesField({
  drops,
  onChange,
  requiredDrops,
  messageFor,
  strayRows,
}: {
  drops: string[];
  onChange: (drops: string[]) => void;
  requiredDrops: number;
  /** The error of a row (the server's, the instant check's or the preview's), if any. */
  messageFor: (row: number) => string | undefined;
  strayRows: Set<number>;
}) {
  const [incoming, setIncoming] = useState<IncomingColumn | null>(null);
  const [columnMessage, setColumnMessage] = useState<string | null>(null);
  const dropRefs = useRef<(HTMLInputElement | null)[]>([]);
  const focusRow = (row: number) => setTimeout(() => dropRefs.current[row]?.focus(), 0);

  const setDrop = (index: number, value: string) => onChange(drops.map((drop, i) => (i === index ? value : drop)));
  const addRow = () => {
    onChange([...drops, ""]);
    focusRow(drops.length);
  };
  const removeRow = (index: number) => onChange(drops.length > 1 ? drops.filter((_, i) => i !== index) : [""]);

  const typedCount = enteredTimes(drops).length;
  const joinColumn = (column: IncomingColumn, how: TimesJoin) => {
    const kept = how === "append" ? typedCount : 0;
    onChange(joinTimes(drops, column.times, how));
    setIncoming(null);
    const times = `${counted(column.times.length, "drop time", "drop times")} ${column.from}`;
    setColumnMessage(
      how === "append" ? `Added ${times} after drop ${kept}.` : typedCount ? `Replaced the drops with ${times}.` : `Entered ${times}.`,
    );
    focusRow(kept);
  };
  // Into an empty log the column simply goes in; over typed drops the student is asked first.
  const receiveColumn = (column: IncomingColumn) => {
    if (typedCount === 0) joinColumn(column, "replace");
    else {
      setColumnMessage(null);
      setIncoming(column);
    }
  };
  const pasteIntoRow = (index: number, event: ClipboardEvent<HTMLInputElement>) => {
    const times = splitPastedTimes(event.clipboardData.getData("text"));
    if (times.length < 2) return;
    event.preventDefault();
    receiveColumn({ times, from: "from the clipboard", returnFocusTo: index });
  };
  const readCsv = (file: File) =>
    Papa.parse<string[]>(file, {
      skipEmptyLines: true,
      complete: ({ data }) => {
        const times = numberColumn(data);
        if (times) receiveColumn({ times, from: `from ${file.name}`, returnFocusTo: 0 });
        else setColumnMessage(`${file.name} holds no column of numbers.`);
      },
      error: () => setColumnMessage(`${file.name} could not be read as CSV.`),
    });

  return (
    <fieldset>
      <legend className="text-sm font-medium">
        Drop times <span className="font-normal text-ink-600">(s, {requiredDrops} or more)</span>
      </legend>
      <p className="text-sm text-ink-600">Paste a column of times from a spreadsheet or stopwatch app into a row, or read a CSV file.</p>
      {incoming ? (
        <JoinTimesChoice
          incoming={incoming}
          typedCount={typedCount}
          onChoose={(how) => joinColumn(incoming, how)}
          onCancel={() => {
            setIncoming(null);
            dropRefs.current[incoming.returnFocusTo]?.focus();
          }}
        />
      ) : null}
      <table className="mt-2 w-full text-sm">
        <thead>
          <tr className="text-left text-ink-700">
            <th scope="col" className="w-10 py-1">
              #
            </th>
            <th scope="col" className="py-1">
              Time (s)
            </th>
            <th scope="col" className="w-20 py-1">
              <span className="sr-only">Remove</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {drops.map((value, index) => {
            const message = messageFor(index);
            const stray = strayRows.has(index);
            return (
              <tr key={index} className={stray ? "bg-amber-300/20" : undefined}>
                <td className="pt-3.5 pb-1 align-top tabular-nums">{index + 1}</td>
                <td className="py-1 align-top">
                  <input
                    ref={(element) => {
                      dropRefs.current[index] = element;
                    }}
                    name={dropFieldName(index)}
                    inputMode="decimal"
                    aria-label={`Drop ${index + 1} time in seconds`}
                    aria-invalid={message ? true : undefined}
                    aria-describedby={message || stray ? `drop-${index}-note` : undefined}
                    className={`w-full rounded border px-3 py-2 text-base tabular-nums ${message ? "border-outlier" : "border-ink-900/20"}`}
                    value={value}
                    onChange={(event) => setDrop(index, event.target.value)}
                    onPaste={(event) => pasteIntoRow(index, event)}
                    onKeyDown={(event) => {
                      if (event.key === "Enter") {
                        event.preventDefault();
                        if (index === drops.length - 1) addRow();
                        else dropRefs.current[index + 1]?.focus();
                      }
                    }}
                  />
                  {message || stray ? (
                    <p id={`drop-${index}-note`} className={`mt-1 ${message ? "font-medium text-outlier" : "text-amber-800"}`}>
                      {message ?? "Stray drop (generalized ESD test): kept, and also reported without it."}
                    </p>
                  ) : null}
                </td>
                <td className="py-1 text-right align-top">
                  <button
                    type="submit"
                    name="intent"
                    value={`remove-drop-${index}`}
                    formNoValidate
                    className="rounded px-2 py-2 text-ink-700 underline"
                    onClick={(event) => {
                      event.preventDefault();
                      removeRow(index);
                    }}
                    aria-label={`Remove drop ${index + 1}`}
                  >
                    Remove
                  </button>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <div className="mt-2 flex flex-wrap items-center gap-3">
        <Button
          type="submit"
          name="intent"
          value="add-drop"
          formNoValidate
          variant="secondary"
          onClick={(event) => {
            event.preventDefault();
            addRow();
          }}
        >
          Add a drop
        </Button>
        {/* The file input is hidden; the label is what is seen, tapped and shows the keyboard focus. */}
        <label className="cursor-pointer rounded px-2 py-2 text-sm focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-ink-700">
          <span className="underline">Read a CSV file</span>
          <input
            type="file"
            accept=".csv,text/csv,text/plain"
            className="sr-only"
            onChange={(event) => {
              const file = event.target.files?.[0];
              if (file) readCsv(file);
              event.target.value = "";
            }}
          />
        </label>
        <span className="text-sm text-ink-700" role="status">
          {columnMessage}
        </span>
      </div>
    </fieldset>
  );
}

/**
 * The question a column of times asks when the log already has drops. Focus moves to it so a keyboard
 * or screen-reader user meets it at once; Escape leaves the log as it was.
 */
function JoinTimesChoice({
  incoming,
  typedCount,
  onChoose,
  onCancel,
}: {
  incoming: IncomingColumn;
  typedCount: number;
  onChoose: (how: TimesJoin) => void;
  onCancel: () => void;
}) {
  const first = useRef<HTMLButtonElement>(null);
  useEffect(() => first.current?.focus(), []);
  return (
    <div
      role="group"
      aria-labelledby="join-times-question"
      className="mt-2 rounded-lg bg-paper-100 p-3 ring-1 ring-ink-900/10"
      onKeyDown={(event) => {
        if (event.key === "Escape") {
          event.preventDefault();
          onCancel();
        }
      }}
    >
      <p id="join-times-question" className="text-sm">
        {joinTimesQuestion(incoming.times.length, incoming.from, typedCount)}
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <Button ref={first} type="button" onClick={() => onChoose("append")}>
          Add after drop {typedCount}
        </Button>
        <Button type="button" variant="danger" onClick={() => onChoose("replace")}>
          Replace {plural(typedCount, "the drop", `all ${typedCount} drops`)}
        </Button>
        <Button type="button" variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </div>
  );
}
