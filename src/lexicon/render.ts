// Narrow IPA from machine output: symbol ids → text with stress marks at the start of stressed
// syllables and '.' between the others (Handbook of the IPA, 1999: the stress mark precedes the
// syllable it marks and serves as its boundary).

import type { Inventory } from "../inventory/types.js";
import type { Alphabet } from "../compile/alphabet.js";
import { FIRST_SEGMENT, JOIN, SYLL, WORD } from "../compile/alphabet.js";

/** Flat per-id tables, built once per alphabet, read for every symbol of every entry. */
export interface SymbolView {
  readonly texts: readonly string[];
  /** 0 ε, 1 '#', 2 '.', 3 segment, 4 '+'. */
  readonly kind: Uint8Array;
  /** 1 primary, 2 secondary, 0 anything else (unstressed, unassigned, non-nucleus). */
  readonly stress: Uint8Array;
  /** 1 for [+syllabic] segments. */
  readonly nucleus: Uint8Array;
}

// Unicode Spacing Modifier Letters: U+02C8 MODIFIER LETTER VERTICAL LINE (primary stress),
// U+02CC MODIFIER LETTER LOW VERTICAL LINE (secondary stress) — IPA Handbook 1999.
export const PRIMARY_MARK = "\u02C8";
export const SECONDARY_MARK = "\u02CC";

export function symbolView(alphabet: Alphabet, inventory: Inventory): SymbolView {
  const n = alphabet.size;
  const texts: string[] = new Array<string>(n).fill("");
  const kind = new Uint8Array(n);
  const stress = new Uint8Array(n);
  const nucleusOf = new Uint8Array(n);
  kind[WORD] = 1;
  kind[SYLL] = 2;
  kind[JOIN] = 4;
  texts[WORD] = "#";
  texts[SYLL] = ".";
  texts[JOIN] = "+";
  const iStress = inventory.featureIndex.get("stress");
  const iPrimary = inventory.featureIndex.get("primary");
  const iSyllabic = inventory.featureIndex.get("syllabic");
  for (const s of alphabet.segments) {
    kind[s.id] = 3;
    texts[s.id] = s.text;
    const nucleus = iSyllabic !== undefined && s.bundle[iSyllabic] === "+";
    if (nucleus) nucleusOf[s.id] = 1;
    if (!nucleus || iStress === undefined || iPrimary === undefined) continue;
    if (s.bundle[iStress] === "+") stress[s.id] = s.bundle[iPrimary] === "+" ? 1 : 2;
  }
  if (alphabet.segments.length > 0 && alphabet.segments[0]!.id !== FIRST_SEGMENT) {
    throw new Error("alphabet segments must start at FIRST_SEGMENT");
  }
  return { texts, kind, stress, nucleus: nucleusOf };
}

export interface RenderOptions {
  /** Write '.' between unstressed syllables (default true); stress marks are always written. */
  readonly syllables?: boolean;
  /** Write each morpheme join '+' (the broad form; default false: narrow forms leave joins out). */
  readonly joins?: boolean;
}

/**
 * Renders one entry, exactly as the interpreter's `symsToIpa` writes symbol arrays: outer '#'
 * dropped, an inner run of '#' (between words of a phrase) becomes one space; each stretch between
 * boundaries is prefixed by ˈ / ˌ when its first nucleus is stressed, otherwise by '.' when a
 * syllable boundary opened it; a later stressed nucleus in the same stretch (a word not
 * syllabified) gets its mark right before it.
 */
export function renderIpa(ids: ArrayLike<number>, view: SymbolView, opts: RenderOptions = {}): string {
  const dots = opts.syllables ?? true;
  const joins = opts.joins ?? false;
  const { kind, texts, stress } = view;
  let from = 0;
  let to = ids.length;
  while (from < to && kind[ids[from]!] === 1) from++;
  while (to > from && kind[ids[to - 1]!] === 1) to--;
  let text = "";
  let i = from;
  let opener = 0; // 0 start, 1 word, 2 syllable
  while (i <= to) {
    let j = i;
    while (j < to && kind[ids[j]!]! >= 3) j++;
    let firstNucleus = -1;
    let firstMark = 0;
    for (let k = i; k < j; k++) {
      if (view.nucleus[ids[k]!] === 1) {
        firstNucleus = k;
        firstMark = stress[ids[k]!]!;
        break;
      }
    }
    if (opener === 1) text += " ";
    if (firstMark === 1) text += PRIMARY_MARK;
    else if (firstMark === 2) text += SECONDARY_MARK;
    else if (opener === 2 && dots) text += ".";
    for (let k = i; k < j; k++) {
      const id = ids[k]!;
      if (kind[id] === 4) {
        if (joins) text += "+";
        continue;
      }
      if (k !== firstNucleus && view.nucleus[id] === 1) {
        const st = stress[id];
        if (st === 1) text += PRIMARY_MARK;
        else if (st === 2) text += SECONDARY_MARK;
      }
      text += texts[id];
    }
    if (j >= to) break;
    opener = kind[ids[j]!] === 1 ? 1 : 2;
    i = j + 1;
    while (opener === 1 && i < to && kind[ids[i]!] === 1) i++;
  }
  return text;
}
