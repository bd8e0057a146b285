// Stress marks of a tokenised pronunciation turned into the prosodic features of the nuclei they
// stress (DEVELOPERS.md, "The string every stage sees").

import type { Bundle, FeatureValue, Inventory, PronToken } from "../inventory/types.js";
import { JOIN_EDGE, SYLLABLE_EDGE, WORD_EDGE, segment } from "../interp/types.js";
import { checkJoins } from "./joins.js";
import type { Sym, Word } from "../interp/types.js";

export type StressResult =
  | { readonly ok: true; readonly symbols: Word; readonly marked: boolean }
  | { readonly ok: false; readonly column: number; readonly code: string; readonly reason: string };

/**
 * Turns tokens into symbols. A stress mark sets [+stress +primary] (ˈ) or [+stress -primary] (ˌ) on
 * the next nucleus ([+syllabic] segment) of the same word; if the pronunciation has any mark, every
 * other nucleus is [-stress -primary]; with no mark every nucleus keeps [0stress 0primary]
 * (DEVELOPERS.md, "The string every stage sees"). `column` of a failure is an offset-free column.
 */
export function applyStress(inv: Inventory, tokens: readonly PronToken[]): StressResult {
  const syllabic = inv.featureIndex.get("syllabic");
  const stressF = inv.featureIndex.get("stress");
  const primaryF = inv.featureIndex.get("primary");
  if (syllabic === undefined || stressF === undefined || primaryF === undefined) {
    const missing = syllabic === undefined ? "syllabic" : stressF === undefined ? "stress" : "primary";
    return { ok: false, column: tokens[0]?.column ?? 1, code: "lexicon/no-feature", reason: `The inventory has no feature '${missing}', needed to place stress.` };
  }
  const joinProblem = checkJoins(tokens);
  if (joinProblem !== undefined) return { ok: false, ...joinProblem };
  const marked = tokens.some((t) => t.kind === "stress");
  const out: Sym[] = [];
  let pending: { level: "primary" | "secondary"; column: number } | undefined;
  let wordHasSegment = false;
  let lastWordBreak: number | undefined;
  const withStress = (b: Bundle, s: FeatureValue, p: FeatureValue): Bundle => {
    if (b[stressF] === s && b[primaryF] === p) return b;
    const c = b.slice();
    c[stressF] = s;
    c[primaryF] = p;
    return c;
  };
  for (const t of tokens) {
    switch (t.kind) {
      case "stress":
        if (pending !== undefined) {
          return { ok: false, column: t.column, code: "lexicon/double-stress", reason: `A second stress mark before the vowel that the mark at column ${pending.column} already stresses.` };
        }
        pending = { level: t.level, column: t.column };
        break;
      case "segment": {
        wordHasSegment = true;
        let b = t.bundle;
        if (b[syllabic] === "+") {
          if (pending !== undefined) b = withStress(b, "+", pending.level === "primary" ? "+" : "-");
          else if (marked) b = withStress(b, "-", "-");
          pending = undefined;
        }
        out.push(segment(b));
        break;
      }
      case "syllable":
        out.push(SYLLABLE_EDGE);
        break;
      case "join":
        out.push(JOIN_EDGE);
        break;
      case "word":
        if (pending !== undefined) return noVowel(pending);
        if (!wordHasSegment) {
          return { ok: false, column: t.column, code: "lexicon/empty-phrase-word", reason: "A word break '#' must stand between two words of a phrase." };
        }
        wordHasSegment = false;
        lastWordBreak = t.column;
        out.push(WORD_EDGE);
        break;
      default: {
        const never: never = t;
        return never;
      }
    }
  }
  if (pending !== undefined) return noVowel(pending);
  if (!wordHasSegment && lastWordBreak !== undefined) {
    return { ok: false, column: lastWordBreak, code: "lexicon/empty-phrase-word", reason: "A word break '#' must stand between two words of a phrase." };
  }
  return { ok: true, symbols: out, marked };
}

const noVowel = (p: { level: string; column: number }): StressResult => ({
  ok: false,
  column: p.column,
  code: "lexicon/stress-without-vowel",
  reason: `The ${p.level} stress mark is not followed by a vowel (a [+syllabic] segment) in the same word.`,
});

/**
 * The symbols of an entry tagged `weak` (a weak form: every vowel unstressed, no default stress):
 * every nucleus [-stress -primary]. Only for entries without stress marks.
 */
export function unstressAll(inv: Inventory, symbols: Word): Word {
  const syllabic = inv.featureIndex.get("syllabic");
  const stressF = inv.featureIndex.get("stress");
  const primaryF = inv.featureIndex.get("primary");
  if (syllabic === undefined || stressF === undefined || primaryF === undefined) return symbols;
  return symbols.map((s) => {
    if (s.kind !== "segment" || s.bundle[syllabic] !== "+") return s;
    const b = s.bundle.slice();
    b[stressF] = "-";
    b[primaryF] = "-";
    return segment(b);
  });
}
