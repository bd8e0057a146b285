// Where the joins of a pronunciation may stand: a morpheme join `+` between two segments of one
// word (a stress mark may follow it), a compound's or phrase's `#` between two words (stress.ts
// checks those). Every misplaced join is one positioned reject (DEVELOPERS.md, "The string every stage sees").

import type { PronToken } from "../inventory/types.js";

export interface JoinProblem {
  readonly column: number;
  readonly code: string;
  readonly reason: string;
}

/**
 * The first misplaced `+` of a tokenised pronunciation, or undefined:
 * - `lexicon/join-at-edge`: `+` first or last in the pronunciation, or next to a `#` (a join
 *   stands inside a word; the parts of a compound are joined by `#` alone);
 * - `lexicon/doubled-join`: two `+` with no segment between them;
 * - `lexicon/join-next-to-break`: `+` next to a `.` (the join already says where the morphemes
 *   meet; the syllabifier decides the syllables, see the grammar's `joins` declaration);
 * - `lexicon/stress-before-join`: a stress mark right before `+` (a stress mark opens the stressed
 *   syllable, so it follows the join: `mɪs+ˈpleɪs`).
 */
export function checkJoins(tokens: readonly PronToken[]): JoinProblem | undefined {
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i]!;
    if (t.kind !== "join") continue;
    const before = tokens[i - 1];
    const after = tokens[i + 1];
    if (before === undefined || after === undefined || before.kind === "word" || after.kind === "word") {
      const where = before === undefined ? "starts the pronunciation" : after === undefined ? "ends the pronunciation" : "stands next to a word break '#'";
      return { column: t.column, code: "lexicon/join-at-edge", reason: `The morpheme join '+' ${where}: a join stands between two segments of one word.` };
    }
    if (after.kind === "join") return { column: after.column, code: "lexicon/doubled-join", reason: "Two morpheme joins '+' with no segment between them: write one." };
    if (before.kind === "syllable" || after.kind === "syllable") {
      const dot = before.kind === "syllable" ? before : after;
      return { column: dot.column, code: "lexicon/join-next-to-break", reason: "A syllable break '.' next to a morpheme join '+': write the join alone (the grammar's syllabify step places the syllable breaks)." };
    }
    if (before.kind === "stress") {
      const which = before.level === "primary" ? "primary" : "secondary";
      return { column: before.column, code: "lexicon/stress-before-join", reason: `The ${which} stress mark stands before a morpheme join '+': put it after the join, at the start of the stressed syllable ('+${which === "primary" ? "ˈ" : "ˌ"}').` };
    }
  }
  return undefined;
}
