// Test helpers that write words as short IPA-like text (`#ˈpa.ta#`) and read them back, over any
// inventory, without the lexicon reader: `#` and `.` stay symbols, stress marks go to the next nucleus.

import type { FeatureValue, Inventory } from "../../src/inventory/types.js";
import { resolveSymbol } from "../../src/interp/segments.js";
import { symsToIpa } from "../../src/interp/io.js";
import type { Sym, Word } from "../../src/interp/types.js";
import { JOIN_EDGE, SYLLABLE_EDGE, WORD_EDGE } from "../../src/interp/types.js";

/**
 * Read `text` into symbols: `#`, `.`, `+`, `ˈ`/`ˌ` (or `'`/`,`) and segments (longest run that the
 * inventory reads, diacritics included; spaces are ignored). The word is bracketed with `#` if
 * it is not already. Nuclei take the stress convention of the lexicon reader: with any mark,
 * marked nuclei are [+stress ±primary] and the others [-stress -primary]; with none, [0 0].
 */
export function symsOf(text: string, inv: Inventory): Sym[] {
  const cps = [...text.normalize("NFC")];
  const syl = inv.featureIndex.get("syllabic") as number;
  const si = inv.featureIndex.get("stress") as number;
  const pi = inv.featureIndex.get("primary") as number;
  const anyMark = cps.some((c) => c === "ˈ" || c === "ˌ" || c === "'" || c === ",");
  const out: Sym[] = [];
  let pending: "primary" | "secondary" | null = null;
  let i = 0;
  while (i < cps.length) {
    const c = cps[i] as string;
    if (c === " ") { i++; continue; }
    if (c === "#") { out.push(WORD_EDGE); i++; continue; }
    if (c === ".") { out.push(SYLLABLE_EDGE); i++; continue; }
    if (c === "+") { out.push(JOIN_EDGE); i++; continue; }
    if (c === "ˈ" || c === "'") { pending = "primary"; i++; continue; }
    if (c === "ˌ" || c === ",") { pending = "secondary"; i++; continue; }
    let found = false;
    for (let len = Math.min(6, cps.length - i); len >= 1; len--) {
      const piece = cps.slice(i, i + len).join("");
      const b = resolveSymbol(inv, piece);
      if (b === null) continue;
      const bundle = [...b] as FeatureValue[];
      if (bundle[syl] === "+" && anyMark) {
        bundle[si] = pending === null ? "-" : "+";
        bundle[pi] = pending === "primary" ? "+" : "-";
        pending = null;
      }
      out.push({ kind: "segment", bundle });
      i += len;
      found = true;
      break;
    }
    if (!found) throw new Error(`cannot read '${cps[i]}' at ${i} in '${text}'`);
  }
  if (out[0]?.kind !== "boundary" || out[0].which !== "word") out.unshift(WORD_EDGE);
  const last = out[out.length - 1] as Sym;
  if (out.length === 1 || last.kind !== "boundary" || last.which !== "word") out.push(WORD_EDGE);
  return out;
}

/** The word as narrow IPA with `.` and stress marks (`#` edges dropped). */
export const ipaOf = (w: Word, inv: Inventory): string => symsToIpa(w, inv, { syllables: true });
