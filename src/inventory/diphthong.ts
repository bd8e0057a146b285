// Diacritics on symbols of several letters: where the IPA writer puts them (a diphthong's marks go
// after its first letter), how the tokeniser reads them back from there, and tie bars written on
// request (t͡ʃ, a͡ɪ) for consumers that parse IPA.

import type { Bundle, Inventory } from "./types.js";
import { isCombining, matchKey } from "./ipa.js";

/*
 * Convention (common practice, no source): a diacritic on a diphthong is written on its first
 * letter, the nucleus — the element whose feature values the inventory gives the whole diphthong —
 * not on the offglide: nasalised aɪ is ãɪ, long aɪ is aːɪ, both ãːɪ (combining marks first, then
 * modifier letters, as on any symbol). The same holds for any syllabic symbol of two or more
 * letters (a triphthong, a long vowel written as a symbol: nasal aː is ãː). Consonant symbols of
 * several letters (the affricates tʃ dʒ) keep their marks after the whole symbol (tʃʰ), as usual.
 */

/** The letters of a symbol: each spacing character with the combining marks after it (NFD). */
export function letters(symbol: string): string[] {
  const out: string[] = [];
  for (const ch of Array.from(symbol.normalize("NFD"))) {
    if (isCombining(ch) && out.length > 0) out[out.length - 1] += ch;
    else out.push(ch);
  }
  return out;
}

/** Whether a segment's diacritics go after its first letter: a [+syllabic] symbol of two or more letters. */
export function marksOnFirstLetter(inv: Inventory, symbol: string, bundle: Bundle): boolean {
  const syllabic = inv.featureIndex.get("syllabic");
  return syllabic !== undefined && bundle[syllabic] === "+" && letters(symbol).length > 1;
}

/** `base` with `marks` (in writing order) after its first letter, NFC. */
export function withMarksAfterFirst(base: string, marks: readonly string[]): string {
  const ls = letters(base);
  return (ls[0]! + marks.join("") + ls.slice(1).join("")).normalize("NFC");
}

/** One symbol the tokeniser may find with diacritics after its first letter. */
export interface SplitSymbol {
  /** Matching key (ipa.ts `prepare`) of the letters after the first. */
  readonly rest: string;
  /** Its length in code points. */
  readonly restLength: number;
  /** The whole symbol's key length, in code points. */
  readonly length: number;
  readonly segment: number;
}

/** Symbols written with marks after their first letter, by the matching key of that letter (longest rest first). */
export interface SplitTable {
  readonly byHead: ReadonlyMap<string, readonly SplitSymbol[]>;
  readonly maxHeadLength: number;
  /** The first letters as the inventory spells them (NFC), for the fast reader's check. */
  readonly heads: ReadonlySet<string>;
}

const tables = new WeakMap<Inventory, SplitTable>();

/** The split table of an inventory (built once, kept while it lives). */
export function splitTable(inv: Inventory): SplitTable {
  const hit = tables.get(inv);
  if (hit !== undefined) return hit;
  const byHead = new Map<string, SplitSymbol[]>();
  const heads = new Set<string>();
  let maxHeadLength = 1;
  inv.segments.forEach((s, segment) => {
    if (!marksOnFirstLetter(inv, s.symbol, s.bundle)) return;
    const ls = letters(s.symbol);
    const head = matchKey(ls[0]!);
    const rest = matchKey(ls.slice(1).join(""));
    const restLength = Array.from(rest).length;
    const list = byHead.get(head) ?? [];
    list.push({ rest, restLength, length: Array.from(head).length + restLength, segment });
    byHead.set(head, list);
    heads.add(ls[0]!.normalize("NFC"));
    maxHeadLength = Math.max(maxHeadLength, Array.from(head).length);
  });
  for (const list of byHead.values()) list.sort((a, b) => b.restLength - a.restLength);
  const made = { byHead, maxHeadLength, heads };
  tables.set(inv, made);
  return made;
}

/** U+0361 COMBINING DOUBLE INVERTED BREVE, the tie bar written above. */
export const TIE_BAR = "\u0361";

const LETTER = /^\p{L}/u;
const MODIFIER_LETTER = /^\p{Lm}/u;

/**
 * One segment's written text with tie bars (Handbook of the IPA 1999, from memory: a tie bar joins
 * two symbols that stand for one sound, as in t͡ʃ, and may join a diphthong's letters): a tie bar
 * right before every letter of the segment but its first, letters being the base characters other
 * than modifier letters (ʰ ʷ ː are never tied). So tʃ → t͡ʃ, tʃʰ → t͡ʃʰ, aɪ → a͡ɪ, ãɪ → ã͡ɪ, and a
 * mark after the first letter stays before the tie bar: aːɪ → aː͡ɪ. NFC. One letter: unchanged.
 */
export function withTieBars(text: string): string {
  const ls = letters(text);
  const isLetter = (l: string): boolean => LETTER.test(l) && !MODIFIER_LETTER.test(l);
  if (ls.filter(isLetter).length < 2) return text;
  let out = "";
  let seenLetter = false;
  for (const l of ls) {
    if (isLetter(l)) {
      if (seenLetter) out += TIE_BAR;
      seenLetter = true;
    }
    out += l;
  }
  return out.normalize("NFC");
}
