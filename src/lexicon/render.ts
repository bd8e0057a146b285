// Narrow IPA from machine output: symbol ids → text with stress marks at the start of stressed
// syllables and '.' between the others (Handbook of the IPA, 1999: the stress mark precedes the
// syllable it marks and serves as its boundary).

import type { Inventory } from "../inventory/types.js";
import type { Alphabet } from "../compile/alphabet.js";
import { FIRST_SEGMENT, SYLL, WORD } from "../compile/alphabet.js";

/** Flat per-id tables, built once per alphabet, read for every symbol of every entry. */
export interface SymbolView {
  readonly texts: readonly string[];
  /** 0 ε, 1 '#', 2 '.', 3 segment. */
  readonly kind: Uint8Array;
  /** 1 primary, 2 secondary, 0 anything else (unstressed, unassigned, non-nucleus). */
  readonly stress: Uint8Array;
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
  kind[WORD] = 1;
  kind[SYLL] = 2;
  texts[WORD] = "#";
  texts[SYLL] = ".";
  const iStress = inventory.featureIndex.get("stress");
  const iPrimary = inventory.featureIndex.get("primary");
  const iSyllabic = inventory.featureIndex.get("syllabic");
  for (const s of alphabet.segments) {
    kind[s.id] = 3;
    texts[s.id] = s.text;
    const nucleus = iSyllabic !== undefined && s.bundle[iSyllabic] === "+";
    if (!nucleus || iStress === undefined || iPrimary === undefined) continue;
    if (s.bundle[iStress] === "+") stress[s.id] = s.bundle[iPrimary] === "+" ? 1 : 2;
  }
  if (alphabet.segments.length > 0 && alphabet.segments[0]!.id !== FIRST_SEGMENT) {
    throw new Error("alphabet segments must start at FIRST_SEGMENT");
  }
  return { texts, kind, stress };
}

export interface RenderOptions {
  /** Write '.' between unstressed syllables (default true); stress marks are always written. */
  readonly syllables?: boolean;
}

/**
 * Renders one entry. Outer '#' are dropped, an inner '#' (between words of a phrase) becomes a
 * space, each syllable is prefixed by ˈ / ˌ when its nucleus is stressed, otherwise by '.' when it
 * is not the first of its word.
 */
export function renderIpa(ids: ArrayLike<number>, view: SymbolView, opts: RenderOptions = {}): string {
  const dots = opts.syllables ?? true;
  let out = "";
  let syl = "";
  let sylStress = 0;
  let firstInWord = true;
  let wordOpen = false;
  const flush = (): void => {
    if (syl === "") return;
    if (sylStress === 1) out += PRIMARY_MARK;
    else if (sylStress === 2) out += SECONDARY_MARK;
    else if (!firstInWord && dots) out += ".";
    out += syl;
    syl = "";
    sylStress = 0;
    firstInWord = false;
  };
  for (let i = 0; i < ids.length; i++) {
    const id = ids[i]!;
    const k = view.kind[id];
    if (k === 3) {
      if (!wordOpen) {
        if (out !== "") out += " ";
        wordOpen = true;
        firstInWord = true;
      }
      syl += view.texts[id];
      const st = view.stress[id]!;
      if (st !== 0 && (sylStress === 0 || st < sylStress)) sylStress = st;
    } else if (k === 2) {
      flush();
    } else if (k === 1) {
      flush();
      wordOpen = false;
    }
  }
  flush();
  return out.normalize("NFC");
}
