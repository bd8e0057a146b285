// Normalising IPA text for matching: canonical decomposition (NFD), tie bars dropped, ASCII g read
// as ɡ, while remembering which code point of the original string each matched code point came from.

import { distance } from "fastest-levenshtein";

/** U+0361 COMBINING DOUBLE INVERTED BREVE and U+035C COMBINING DOUBLE BREVE BELOW: tie bars. */
export const TIE_BARS: ReadonlySet<string> = new Set(["\u0361", "\u035C"]);

/** Characters with a meaning of their own in a pronunciation; never part of a symbol or diacritic. */
export const PRIMARY_STRESS = "\u02C8"; // ˈ MODIFIER LETTER VERTICAL LINE
export const SECONDARY_STRESS = "\u02CC"; // ˌ MODIFIER LETTER LOW VERTICAL LINE
/** ASCII stand-ins read on input only: ' for ˈ and , for ˌ. */
export const ASCII_PRIMARY = "'";
export const ASCII_SECONDARY = ",";
export const SYLLABLE_BREAK = ".";
export const WORD_BREAK = "#";
/** A morpheme join inside a word (SPE '+'); a compound's parts are joined by WORD_BREAK. */
export const MORPHEME_JOIN = "+";
export const RESERVED: ReadonlySet<string> = new Set([
  PRIMARY_STRESS,
  SECONDARY_STRESS,
  ASCII_PRIMARY,
  ASCII_SECONDARY,
  SYLLABLE_BREAK,
  WORD_BREAK,
  MORPHEME_JOIN,
]);

const MARK = /^\p{M}$/u;

/** True for a combining mark (general category M). */
export const isCombining = (cp: string): boolean => MARK.test(cp);

/**
 * The code points of `text` prepared for matching, each with the 0-based index (in code points)
 * of the original character it came from.
 *
 * Invariant: `cps` is NFD of `text` with tie bars removed and g (U+0067) replaced by ɡ (U+0261).
 * NFD is computed per cluster (a non-mark followed by its marks): canonical reordering never
 * crosses a starter, so the concatenation equals the NFD of the whole string, and a cluster's
 * code points keep their own column when decomposition left them in place.
 */
export interface Prepared {
  readonly cps: readonly string[];
  readonly cols: readonly number[];
}

const NEEDS_WORK = /[g\u0361\u035C]/;

export function prepare(text: string): Prepared {
  const orig = Array.from(text);
  if (!NEEDS_WORK.test(text) && text.normalize("NFD") === text) {
    // Fast path: nothing to decompose, drop or replace; columns are the identity.
    return { cps: orig, cols: orig.map((_, k) => k) };
  }
  const cps: string[] = [];
  const cols: number[] = [];
  let i = 0;
  while (i < orig.length) {
    let j = i + 1;
    while (j < orig.length && isCombining(orig[j]!)) j++;
    const cluster = orig.slice(i, j);
    const nfd = Array.from(cluster.join("").normalize("NFD"));
    const same = nfd.length === cluster.length && nfd.every((c, k) => c === cluster[k]);
    nfd.forEach((c, k) => {
      if (TIE_BARS.has(c)) return;
      let col = i;
      if (same) col = i + k;
      else {
        const at = cluster.indexOf(c);
        if (at >= 0) col = i + at;
      }
      cps.push(c === "g" ? "\u0261" : c);
      cols.push(col);
    });
    i = j;
  }
  return { cps, cols };
}

/** The matching key of a symbol or mark: its prepared code points joined. */
export const matchKey = (text: string): string => prepare(text).cps.join("");

/** NFC with ASCII g written as ɡ (U+0261); the one form every written symbol takes. */
export const canonicalSymbol = (text: string): string => text.normalize("NFC").replace(/g/g, "\u0261");

/** Parses `U+0303`-style code point notation; other text is returned as is (NFC). */
export function decodeMark(cell: string): string | undefined {
  const m = /^U\+([0-9A-Fa-f]{4,6})$/.exec(cell);
  if (!m) return cell.normalize("NFC");
  const cp = Number.parseInt(m[1]!, 16);
  if (cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return undefined;
  return String.fromCodePoint(cp);
}

/** Code point length of a string. */
export const cpLength = (s: string): number => Array.from(s).length;

/** Levenshtein distance (for "did you mean" suggestions): fastest-levenshtein's, shared with the grammar checker. */
export const editDistance = (a: string, b: string): number => distance(a, b);

/** `U+0303` for a code point (for messages about invisible marks). */
export const codePointName = (cp: string): string =>
  "U+" + cp.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0");
