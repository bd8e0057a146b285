// The symbol string the reference interpreter works on: word edges, syllable boundaries and
// feature bundles, with stable keys so that equal symbols (and equal words) compare equal.

import type { Bundle } from "../inventory/types.js";
import { bundleKey } from "../inventory/types.js";

/**
 * One symbol of a word (DEVELOPERS.md, "The string every stage sees").
 * `#` is a word edge (the compiler's symbol 1), `.` a syllable boundary (symbol 2), `+` a
 * morpheme join inside a word (symbol 3), and a segment is a full feature bundle over the
 * inventory's features, prosodic ones included.
 */
export type Sym =
  | { readonly kind: "boundary"; readonly which: "word" | "syllable" | "join" }
  | { readonly kind: "segment"; readonly bundle: Bundle };

export type Word = readonly Sym[];

export const WORD_EDGE: Sym = Object.freeze({ kind: "boundary", which: "word" });
export const SYLLABLE_EDGE: Sym = Object.freeze({ kind: "boundary", which: "syllable" });
export const JOIN_EDGE: Sym = Object.freeze({ kind: "boundary", which: "join" });

export const segment = (bundle: Bundle): Sym => ({ kind: "segment", bundle });

export const isWordEdge = (s: Sym): boolean => s.kind === "boundary" && s.which === "word";
export const isSyllableEdge = (s: Sym): boolean => s.kind === "boundary" && s.which === "syllable";
export const isJoin = (s: Sym): boolean => s.kind === "boundary" && s.which === "join";
export const isSegment = (s: Sym): s is { readonly kind: "segment"; readonly bundle: Bundle } => s.kind === "segment";

/**
 * A key that is equal exactly for equal symbols: `#`, `.`, `j+` (a join), or the bundle's values
 * joined (a string of '+', '-', '0', one per feature, which can never be `#`, `.` or start with `j`).
 */
export function toKey(s: Sym): string {
  if (s.kind === "boundary") return s.which === "word" ? "#" : s.which === "syllable" ? "." : "j+";
  return bundleKey(s.bundle);
}

/** A key equal exactly for equal words (symbol keys joined by a space). */
export const wordKey = (w: Word): string => w.map(toKey).join(" ");

/** Words sorted by key with duplicates removed: the canonical form of a set of outputs. */
export function sortedDistinct(words: readonly Word[]): Sym[][] {
  const byKey = new Map<string, Word>();
  for (const w of words) {
    const k = wordKey(w);
    if (!byKey.has(k)) byKey.set(k, w);
  }
  return [...byKey.keys()].sort().map((k) => [...(byKey.get(k) as Word)]);
}

/**
 * A finding about a word (not about the grammar's source text): for example a consonant
 * cluster that the declared onsets and codas cannot syllabify. `at` is the index in the word the
 * step returns where the cluster starts; `cluster` holds its segments.
 */
export interface Lint {
  readonly code: string;
  readonly message: string;
  readonly at: number;
  readonly cluster: readonly Bundle[];
}
