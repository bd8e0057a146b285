// The IPA tokeniser: a pronunciation string becomes segments (longest match over the inventory's
// symbols, then any declared diacritics), stress marks, syllable breaks and word breaks.

import { diagnostic } from "../diagnostics.js";
import type { Bundle, Diacritic, FeatureValue, Inventory, PronToken, TokeniseResult } from "./types.js";
import { lookup } from "./lookup.js";
import { splitTable } from "./diphthong.js";
import {
  ASCII_PRIMARY,
  ASCII_SECONDARY,
  codePointName,
  isCombining,
  prepare,
  PRIMARY_STRESS,
  SECONDARY_STRESS,
  SYLLABLE_BREAK,
  WORD_BREAK,
  MORPHEME_JOIN,
} from "./ipa.js";

/**
 * Look-alikes typed in place of IPA letters, tried first when suggesting a symbol for an unknown
 * character. Common practice, no source: these are the usual keyboard and broad-transcription
 * substitutes (ASCII r for ɹ, the affricate ligatures ʧ ʤ, the open-mid central ɜ for ɝ, …).
 */
const LOOK_ALIKES: Readonly<Record<string, readonly string[]>> = {
  r: ["ɹ", "ɾ"],
  a: ["ɑ", "æ", "ʌ", "aɪ", "aʊ"],
  e: ["ɛ", "eɪ", "ə"],
  o: ["ɔ", "oʊ"],
  y: ["j"],
  c: ["k", "tʃ"],
  x: ["k", "h"],
  q: ["k"],
  ɐ: ["ə", "ʌ"],
  ɜ: ["ɝ", "ɚ", "ə"],
  ɒ: ["ɑ", "ɔ"],
  ʧ: ["tʃ"],
  ʤ: ["dʒ"],
  ɘ: ["ə"],
  ɵ: ["ə", "ʊ"],
  ɨ: ["ɪ", "ə"],
  ʉ: ["u", "ʊ"],
  ʁ: ["ɹ"],
  ɻ: ["ɹ"],
  ʍ: ["w"],
  ɬ: ["l", "ɫ"],
  ç: ["h", "ʃ"],
  ʲ: ["j"],
};

/** Up to four known symbols that the unknown character at `i` was most likely meant to be. */
function suggest(inv: Inventory, cps: readonly string[], i: number): string[] {
  const c = cps[i]!;
  const known = new Set(inv.segments.map((s) => s.symbol));
  const out: string[] = [];
  const add = (s: string): void => {
    if (known.has(s) && !out.includes(s)) out.push(s);
  };
  for (const s of LOOK_ALIKES[c] ?? []) add(s);
  for (const s of inv.segments) if (Array.from(s.symbol.normalize("NFD"))[0] === c) add(s.symbol);
  const base = c.normalize("NFD").replace(/\p{M}/gu, "");
  if (base !== "" && base !== c) for (const s of inv.segments) if (s.symbol.startsWith(base)) add(s.symbol);
  return out.slice(0, 4);
}

/**
 * Reads an IPA pronunciation.
 *
 * - Segments: longest match over the inventory's symbols, then zero or more declared diacritics
 *   (longest match again), each setting its feature values on the segment, in written order.
 * - Input is compared in NFD with tie bars (U+0361, U+035C) removed and ASCII g read as ɡ, so
 *   `t͡ʃ` and `tʃ`, NFC and NFD, g and ɡ all mean the same.
 * - `ˈ` (or ASCII `'`) primary stress, `ˌ` (or ASCII `,`) secondary stress, `.` syllable break,
 *   `#` word break (between the words of a phrase or the parts of a compound), `+` morpheme join;
 *   white space between segments is ignored. Where joins may stand is the lexicon reader's check.
 * - A symbol of several syllabic letters (a diphthong) is also read with its diacritics after its
 *   first letter, as the writer puts them (`ãɪ`, `aːɪ`; inventory/diphthong.ts).
 * - A segment token's `text` is what was read, NFC, without tie bars; `column` is
 *   `pos.column` plus the code-point offset in `ipa`.
 * An unknown character (or a diacritic with no segment before it) is one error diagnostic with its
 * column and the nearest known symbols.
 */
export function tokenise(
  inv: Inventory,
  ipa: string,
  pos: { file: string; line: number; column: number } = { file: "<ipa>", line: 1, column: 1 },
): TokeniseResult {
  const lk = lookup(inv);
  const { cps, cols } = prepare(ipa);
  const n = cps.length;
  const tokens: PronToken[] = [];
  const column = (k: number): number => pos.column + (k < n ? cols[k]! : Array.from(ipa).length);
  let i = 0;
  while (i < n) {
    const c = cps[i]!;
    if (/\s/u.test(c)) {
      i++;
      continue;
    }
    if (c === PRIMARY_STRESS || c === ASCII_PRIMARY) {
      tokens.push({ kind: "stress", level: "primary", column: column(i) });
      i++;
      continue;
    }
    if (c === SECONDARY_STRESS || c === ASCII_SECONDARY) {
      tokens.push({ kind: "stress", level: "secondary", column: column(i) });
      i++;
      continue;
    }
    if (c === SYLLABLE_BREAK) {
      tokens.push({ kind: "syllable", column: column(i) });
      i++;
      continue;
    }
    if (c === WORD_BREAK) {
      tokens.push({ kind: "word", column: column(i) });
      i++;
      continue;
    }
    if (c === MORPHEME_JOIN) {
      tokens.push({ kind: "join", column: column(i) });
      i++;
      continue;
    }
    let len = Math.min(lk.maxSymbolLength, n - i);
    let segIndex: number | undefined;
    for (; len > 0; len--) {
      segIndex = lk.symbolByKey.get(len === 1 ? c : len === 2 ? c + cps[i + 1]! : cps.slice(i, i + len).join(""));
      if (segIndex !== undefined) break;
    }
    if (segIndex === undefined && matchSplit(inv, lk, cps, i) !== undefined) segIndex = -1;
    if (segIndex === undefined) {
      const where = { file: pos.file, line: pos.line, column: column(i), length: 1 };
      const stray = matchDiacritic(lk.diacriticByKey, lk.maxDiacriticLength, cps, i);
      if (stray) {
        return { ok: false, error: diagnostic("error", "ipa/stray-diacritic", `The diacritic ${codePointName(stray.d.mark)} '${stray.d.mark}' (${stray.d.name}) has no segment before it.`, where) };
      }
      const shown = isCombining(c) ? `the combining mark ${codePointName(c)}` : `'${c}' (${codePointName(c)})`;
      const near = suggest(inv, cps, i);
      const hint = near.length > 0 ? `; nearest known: ${near.join(" ")}` : "";
      const after = isCombining(c) && tokens.length > 0 && i > 0 ? " is not a declared diacritic" : " is not in the inventory";
      return { ok: false, error: diagnostic("error", "ipa/unknown-symbol", `Unknown symbol: ${shown}${after}${hint}.`, where) };
    }
    // A diphthong written with its marks after its first letter (diphthong.ts): taken when it is
    // a longer symbol than the plain longest match (ãɪ is nasal aɪ, not nasal a then ɪ).
    const split = matchSplit(inv, lk, cps, i);
    let bundle: Bundle;
    let j: number;
    if (split !== undefined && split.length > len) {
      bundle = split.bundle;
      j = split.end;
    } else {
      bundle = inv.segments[segIndex]!.bundle;
      j = i + len;
    }
    for (;;) {
      const m = matchDiacritic(lk.diacriticByKey, lk.maxDiacriticLength, cps, j);
      if (!m) break;
      const next: FeatureValue[] = bundle.slice();
      for (const [f, v] of m.d.sets) next[f] = v;
      bundle = next;
      j += m.length;
    }
    tokens.push({ kind: "segment", bundle, text: cps.slice(i, j).join("").normalize("NFC"), column: column(i) });
    i = j;
  }
  return { ok: true, tokens };
}

/**
 * A symbol of several letters read with diacritics after its first letter (`ãɪ`, `aːɪ`): the first
 * letter, one or more declared diacritics, then the rest of the symbol. Returns the bundle with
 * those diacritics applied, the index after the rest, and the symbol's own length in code points.
 */
function matchSplit(inv: Inventory, lk: ReturnType<typeof lookup>, cps: readonly string[], at: number): { bundle: Bundle; end: number; length: number } | undefined {
  const table = splitTable(inv);
  if (table.byHead.size === 0) return undefined;
  for (let h = Math.min(table.maxHeadLength, cps.length - at - 1); h > 0; h--) {
    const cands = table.byHead.get(h === 1 ? cps[at]! : cps.slice(at, at + h).join(""));
    if (cands === undefined) continue;
    let j = at + h;
    const marks: Diacritic[] = [];
    for (;;) {
      const m = matchDiacritic(lk.diacriticByKey, lk.maxDiacriticLength, cps, j);
      if (!m) break;
      marks.push(m.d);
      j += m.length;
    }
    if (marks.length === 0) continue;
    for (const c of cands) {
      if (cps.slice(j, j + c.restLength).join("") !== c.rest) continue;
      let bundle: Bundle = inv.segments[c.segment]!.bundle;
      for (const d of marks) {
        const next: FeatureValue[] = bundle.slice();
        for (const [f, v] of d.sets) next[f] = v;
        bundle = next;
      }
      return { bundle, end: j + c.restLength, length: c.length };
    }
  }
  return undefined;
}

function matchDiacritic(
  table: ReadonlyMap<string, Diacritic>,
  maxLength: number,
  cps: readonly string[],
  at: number,
): { d: Diacritic; length: number } | undefined {
  for (let len = Math.min(maxLength, cps.length - at); len > 0; len--) {
    const d = table.get(len === 1 ? cps[at]! : cps.slice(at, at + len).join(""));
    if (d) return { d, length: len };
  }
  return undefined;
}
