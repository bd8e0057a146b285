// Symbol strings as text for derivations and witnesses: the narrow IPA writer's conventions
// (stress marks at the start of stressed syllables, '.' between the others, outer '#' dropped),
// kept as tokens so that changed segments can be marked, and a diff of two forms.

import type { Alphabet } from "../compile/index.js";
import type { Inventory } from "../inventory/types.js";
import { PRIMARY_MARK, SECONDARY_MARK, symbolView, type SymbolView } from "../lexicon/render.js";

/** One written piece of a form: its text and the index of the symbol it writes (-1 for a mark alone). */
export interface Token {
  readonly text: string;
  readonly at: number;
}

export class FormWriter {
  readonly view: SymbolView;
  constructor(readonly alphabet: Alphabet, inventory: Inventory) {
    this.view = symbolView(alphabet, inventory);
  }

  /**
   * Tokens of a '#'-bracketed form, exactly as `renderIpa` writes it: each stretch between
   * boundaries opens with ˈ / ˌ when its first nucleus is stressed, else with '.' after a syllable
   * boundary; a later stressed nucleus of the same stretch gets its mark right before it. Unlike
   * the narrow form, a morpheme join is written ('+').
   */
  tokens(ids: readonly number[]): Token[] {
    const { kind, texts, stress, nucleus } = this.view;
    let from = 0;
    let to = ids.length;
    while (from < to && kind[ids[from]!] === 1) from++;
    while (to > from && kind[ids[to - 1]!] === 1) to--;
    const out: Token[] = [];
    let i = from;
    let opener = 0;
    let openerAt = -1;
    const mark = (st: number): string => (st === 1 ? PRIMARY_MARK : st === 2 ? SECONDARY_MARK : "");
    while (i <= to) {
      let j = i;
      // A morpheme join '+' (kind 4) stays inside its stretch and is shown: explain shows the string the rules see.
      while (j < to && kind[ids[j]!]! >= 3) j++;
      let first = -1;
      for (let k = i; k < j; k++) if (nucleus[ids[k]!] === 1) { first = k; break; }
      const firstMark = first >= 0 ? stress[ids[first]!]! : 0;
      if (opener === 1) out.push({ text: " ", at: openerAt });
      if (firstMark !== 0) out.push({ text: mark(firstMark), at: opener === 2 ? openerAt : -1 });
      else if (opener === 2) out.push({ text: ".", at: openerAt });
      // In a stretch not yet syllabified, a later stressed nucleus's mark goes right after a join
      // that stands before it (as the lexicon writes it: mɪs+ˈpleɪs), else right before the nucleus.
      let joinAt = -1;
      for (let k = i; k < j; k++) {
        const id = ids[k]!;
        if (kind[id] === 4) joinAt = out.length;
        const m = k !== first && nucleus[id] === 1 ? mark(stress[id]!) : "";
        if (m !== "" && joinAt >= 0) {
          out.splice(joinAt + 1, 0, { text: m, at: -1 });
          out.push({ text: texts[id]!, at: k });
        } else out.push({ text: m + texts[id]!, at: k });
        if (nucleus[id] === 1) joinAt = -1;
      }
      if (j >= to) break;
      opener = kind[ids[j]!] === 1 ? 1 : 2;
      openerAt = j;
      i = j + 1;
      while (opener === 1 && i < to && kind[ids[i]!] === 1) i++;
    }
    return out;
  }

  text(ids: readonly number[]): string {
    return this.tokens(ids).map((t) => t.text).join("");
  }

  /** One symbol as text, a nucleus with its stress mark ("ˈi", "i"). */
  symbol(id: number): string {
    const { kind, texts, stress, nucleus } = this.view;
    if (kind[id] === 1) return "#";
    if (kind[id] === 2) return ".";
    const st = nucleus[id] === 1 ? stress[id]! : 0;
    return (st === 1 ? PRIMARY_MARK : st === 2 ? SECONDARY_MARK : "") + (texts[id] ?? "?");
  }
}

/** Display width of a text on a terminal: code points that are not combining marks. */
export const displayWidth = (s: string): number => Array.from(s.replace(/\p{M}/gu, "")).length;

export interface Edit {
  /** Symbols of the old form (indices) and of the new form replaced; either may be empty. */
  readonly from: readonly number[];
  readonly to: readonly number[];
}

/** The edits turning `a` into `b`: runs outside a longest common subsequence, in order. */
export function diff(a: readonly number[], b: readonly number[]): Edit[] {
  const n = a.length, m = b.length;
  const L = Array.from({ length: n + 1 }, () => new Int32Array(m + 1));
  for (let i = n - 1; i >= 0; i--) for (let j = m - 1; j >= 0; j--) L[i]![j] = a[i] === b[j] ? L[i + 1]![j + 1]! + 1 : Math.max(L[i + 1]![j]!, L[i]![j + 1]!);
  const edits: Edit[] = [];
  let i = 0, j = 0;
  let from: number[] = [], to: number[] = [];
  const flush = (): void => { if (from.length > 0 || to.length > 0) edits.push({ from, to }); from = []; to = []; };
  while (i < n || j < m) {
    if (i < n && j < m && a[i] === b[j]) { flush(); i++; j++; }
    else if (j < m && (i >= n || L[i]![j + 1]! >= L[i + 1]![j]!)) to.push(j++);
    else from.push(i++);
  }
  flush();
  return edits;
}
