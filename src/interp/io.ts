// Words in and out of the interpreter: tokenised pronunciations to symbol arrays (the lexicon
// reader's convention) and symbol arrays to narrow IPA with syllable and stress marks.

import type { Bundle, FeatureValue, Inventory, PronToken } from "../inventory/types.js";
import { realiseBundle } from "./segments.js";
import type { Sym, Word } from "./types.js";
import { JOIN_EDGE, WORD_EDGE, isJoin, isSegment, isSyllableEdge, isWordEdge } from "./types.js";

/**
 * DEVELOPERS.md, "The string every stage sees": bracket the entry with `#`, put `#` between the
 * words of a phrase, drop input `.`, and turn `ˈ`/`ˌ` into [+stress ±primary] on the next
 * `[+syllabic]` segment. If the entry has any mark, every other nucleus is [-stress -primary];
 * if it has none, every nucleus is [0stress 0primary]. Consonants are always [0stress 0primary].
 * A mark with no nucleus after it in the entry marks nothing.
 */
export function wordFromTokens(tokens: readonly PronToken[], inv: Inventory): Sym[] {
  const syl = inv.featureIndex.get("syllabic");
  const si = inv.featureIndex.get("stress");
  const pi = inv.featureIndex.get("primary");
  const anyMark = tokens.some((t) => t.kind === "stress");
  const out: Sym[] = [WORD_EDGE];
  let pending: "primary" | "secondary" | null = null;
  for (const t of tokens) {
    switch (t.kind) {
      case "stress":
        pending = t.level;
        break;
      case "syllable":
        break;
      case "join":
        out.push(JOIN_EDGE);
        break;
      case "word":
        if (!isWordEdge(out[out.length - 1] as Sym)) out.push(WORD_EDGE);
        break;
      case "segment": {
        const b = [...t.bundle] as FeatureValue[];
        const nucleus = syl !== undefined && b[syl] === "+";
        let s: FeatureValue = "0";
        let p: FeatureValue = "0";
        if (nucleus && anyMark) {
          s = pending !== null ? "+" : "-";
          p = pending === "primary" ? "+" : "-";
          pending = null;
        }
        if (si !== undefined) b[si] = s;
        if (pi !== undefined) b[pi] = p;
        out.push({ kind: "segment", bundle: b });
        break;
      }
    }
  }
  if (!isWordEdge(out[out.length - 1] as Sym) || out.length === 1) out.push(WORD_EDGE);
  return out;
}

export interface IpaOptions {
  /** Write `.` between unstressed syllables (stress marks are written either way). */
  readonly syllables: boolean;
  /** Write each morpheme join `+` (the broad form); narrow forms leave joins out. */
  readonly joins?: boolean;
  /** How to write one bundle (default: the interpreter's own writer over the inventory). */
  readonly realise?: (bundle: Bundle) => string | null;
}

/**
 * Narrow IPA (IPA Handbook 1999 conventions): `ˈ`/`ˌ` at the start of a primary/secondary
 * stressed syllable, in place of the `.` that would stand there; `.` between other syllables
 * when `syllables` is set; `#` at the edges dropped, `#` inside → a space; `+` written only with
 * `joins` (a stress mark then follows it). A syllable is a
 * stretch between boundaries; in a stretch holding several nuclei (not syllabified), the mark
 * goes before the stressed nucleus, or at the stretch's start for its first nucleus.
 * A bundle no inventory symbol and diacritics can write is shown as `?`.
 */
export function symsToIpa(word: Word, inv: Inventory, opts: IpaOptions): string {
  const syl = inv.featureIndex.get("syllabic");
  const si = inv.featureIndex.get("stress");
  const pi = inv.featureIndex.get("primary");
  const write = opts.realise ?? ((b: Bundle) => realiseBundle(inv, b));
  const mark = (s: Sym): string => {
    if (!isSegment(s) || si === undefined || s.bundle[si] !== "+") return "";
    return pi !== undefined && s.bundle[pi] === "+" ? "ˈ" : "ˌ";
  };
  const nucleus = (s: Sym): boolean => isSegment(s) && syl !== undefined && s.bundle[syl] === "+";
  let from = 0;
  let to = word.length;
  while (from < to && isWordEdge(word[from] as Sym)) from++;
  while (to > from && isWordEdge(word[to - 1] as Sym)) to--;
  let text = "";
  // Split into stretches at boundaries; each stretch remembers what opened it.
  let i = from;
  let opener: "start" | "syllable" | "word" = "start";
  while (i <= to) {
    let j = i;
    while (j < to && !isSyllableEdge(word[j] as Sym) && !isWordEdge(word[j] as Sym)) j++;
    const stretch = word.slice(i, j);
    const nuclei = stretch.map((s, k) => (nucleus(s) ? k : -1)).filter((k) => k >= 0);
    const firstMark = nuclei.length > 0 ? mark(stretch[nuclei[0] as number] as Sym) : "";
    if (opener === "word") text += " ";
    if (firstMark !== "") text += firstMark;
    else if (opener === "syllable" && opts.syllables) text += ".";
    stretch.forEach((s, k) => {
      if (k !== nuclei[0] && nucleus(s)) text += mark(s);
      if (isSegment(s)) text += write(s.bundle) ?? "?";
      else if (opts.joins === true && isJoin(s)) text += "+";
    });
    if (j >= to) break;
    opener = isWordEdge(word[j] as Sym) ? "word" : "syllable";
    // Runs of `#` inside a phrase make one space.
    i = j + 1;
    while (opener === "word" && i < to && isWordEdge(word[i] as Sym)) i++;
  }
  return text;
}
