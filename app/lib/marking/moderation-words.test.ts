import { describe, expect, it } from "vitest";
import { changedSinceWords, releaseButtonLabel, releasedSentence, reopenedWords, stillOpenWords } from "./moderation-words";

const atZeroOneTwo = (say: (n: number) => string) => [0, 1, 2].map(say);

describe("moderation's words", () => {
  it("says what a release did at 0, 1 and 2", () => {
    expect(atZeroOneTwo((n) => releasedSentence({ released: n, zeros: 0, emailed: n, withheld: n }))).toEqual([
      "Released 0 marks and queued 0 e-mails.",
      "Released 1 mark and queued 1 e-mail; 1 student sees nothing yet.",
      "Released 2 marks and queued 2 e-mails; 2 students see nothing yet.",
    ]);
    expect(releasedSentence({ released: 2, zeros: 1, emailed: 2, withheld: 0 })).toBe(
      "Released 2 marks (1 of them zero for no hand-in) and queued 2 e-mails.",
    );
  });

  it("counts the students who may still hand in, the marks to release, and those changed or reopened since", () => {
    expect(atZeroOneTwo(stillOpenWords)).toEqual([
      "0 students may still hand in (extensions counted)",
      "1 student may still hand in (extensions counted)",
      "2 students may still hand in (extensions counted)",
    ]);
    expect(atZeroOneTwo(releaseButtonLabel)).toEqual([
      "Release 0 marks and e-mail their students",
      "Release 1 mark and e-mail the student",
      "Release 2 marks and e-mail their students",
    ]);
    expect(atZeroOneTwo(changedSinceWords)).toEqual([
      "0 changed since, shown to their students with the reason",
      "1 changed since, shown to the student with the reason",
      "2 changed since, shown to their students with the reason",
    ]);
    expect(atZeroOneTwo(reopenedWords)).toEqual([
      "0 reopened by a hand-in after the release: mark them again at the desk",
      "1 reopened by a hand-in after the release: mark it again at the desk",
      "2 reopened by a hand-in after the release: mark them again at the desk",
    ]);
  });
});
