/**
 * A hand-in state as its shape and its word (see `~/lib/marking/status-words`): ink on paper, the same
 * colour for every state, so the shape and the word carry the meaning.
 */
import { stateWords, type HandInState, type StateShape } from "~/lib/marking/status-words";

function Shape({ shape }: { shape: StateShape }) {
  const line = { fill: "none", stroke: "currentColor", strokeWidth: 1.6 } as const;
  switch (shape) {
    case "gapped-ring":
      return <circle cx={7} cy={7} r={5} {...line} strokeDasharray="2.4 2" />;
    case "crossed-ring":
      return (
        <>
          <circle cx={7} cy={7} r={5} {...line} />
          <path d="M3.2 10.8L10.8 3.2" {...line} />
        </>
      );
    case "clock":
      return (
        <>
          <circle cx={7} cy={7} r={5} {...line} />
          <path d="M7 3.8V7h2.8" {...line} />
        </>
      );
    case "disc-empty":
      return <circle cx={7} cy={7} r={5} {...line} />;
    case "disc-half":
      return (
        <>
          <circle cx={7} cy={7} r={5} {...line} />
          <path d="M7 2a5 5 0 0 1 0 10Z" fill="currentColor" />
        </>
      );
    case "disc-full":
      return <circle cx={7} cy={7} r={5.4} fill="currentColor" />;
    case "loop":
      return <path d="M11.5 7A4.5 4.5 0 1 1 9.6 3.3M9.6 1v2.6H7" {...line} />;
    case "diamond":
      return <path d="M7 1.5L12.5 7 7 12.5 1.5 7Z" fill="currentColor" />;
  }
}

const symbolId = (shape: StateShape) => `state-shape-${shape}`;

/**
 * Every state's shape once, as SVG symbols, for a page that draws many (the marking desk's legend
 * holds them): its marks then refer to a shape (`shared`) instead of drawing it again on every card.
 */
export function StateShapeSymbols() {
  const shapes = [...new Set(Object.values(stateWords).map((entry) => entry.shape))];
  return (
    <svg className="hidden" aria-hidden="true">
      {shapes.map((shape) => (
        <symbol key={shape} id={symbolId(shape)} viewBox="0 0 14 14">
          <Shape shape={shape} />
        </symbol>
      ))}
    </svg>
  );
}

/** The state's shape alone (decorative: the word beside it, or the title, names it); `shared` refers to `StateShapeSymbols`. */
export function StateShapeIcon({
  state,
  className = "h-3.5 w-3.5",
  shared = false,
}: {
  state: HandInState;
  className?: string;
  shared?: boolean;
}) {
  const { shape } = stateWords[state];
  return (
    <svg viewBox="0 0 14 14" className={`shrink-0 ${className}`} aria-hidden="true">
      {shared ? <use href={`#${symbolId(shape)}`} /> : <Shape shape={shape} />}
    </svg>
  );
}

/** The shape and the word; the sentence as a tooltip and for screen readers when `explain` is set. */
export function StateMark({ state, explain = false, shared = false }: { state: HandInState; explain?: boolean; shared?: boolean }) {
  const { word, sentence } = stateWords[state];
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap" title={sentence}>
      <StateShapeIcon state={state} shared={shared} />
      {word}
      {explain ? <span className="sr-only">: {sentence}</span> : null}
    </span>
  );
}
