// Lookup tables derived once per Inventory (symbol and diacritic match keys, segments by value) and
// kept in a WeakMap, so the plain Inventory data stays immutable and nothing is recomputed per call.

import { PROSODIC_FEATURES, type Bundle, type Diacritic, type Inventory } from "./types.js";
import { cpLength, matchKey } from "./ipa.js";

export interface Lookup {
  /** Number of non-prosodic features (the prosodic ones are always last). */
  readonly nBase: number;
  /** Matching key (see ipa.ts `prepare`) → segment index. */
  readonly symbolByKey: ReadonlyMap<string, number>;
  /** Longest symbol key, in code points. */
  readonly maxSymbolLength: number;
  /** Matching key of every mark and alias → diacritic. */
  readonly diacriticByKey: ReadonlyMap<string, Diacritic>;
  readonly maxDiacriticLength: number;
  /** Non-prosodic values joined → segment index. */
  readonly segmentByBase: ReadonlyMap<string, number>;
  /** Memo for realise: non-prosodic key → result. */
  readonly realised: Map<string, { ok: true; text: string } | { ok: false; error: string }>;
}

const cache = new WeakMap<Inventory, Lookup>();

/** The non-prosodic part of a bundle as a string key. */
export const baseKey = (b: Bundle, nBase: number): string => b.slice(0, nBase).join("");

export function lookup(inv: Inventory): Lookup {
  const hit = cache.get(inv);
  if (hit) return hit;
  const nBase = inv.features.length - PROSODIC_FEATURES.length;
  const symbolByKey = new Map<string, number>();
  let maxSymbolLength = 1;
  inv.segments.forEach((s, i) => {
    const k = matchKey(s.symbol);
    symbolByKey.set(k, i);
    maxSymbolLength = Math.max(maxSymbolLength, cpLength(k));
  });
  const diacriticByKey = new Map<string, Diacritic>();
  let maxDiacriticLength = 1;
  for (const d of inv.diacritics) {
    for (const m of [d.mark, ...d.aliases]) {
      const k = matchKey(m);
      diacriticByKey.set(k, d);
      maxDiacriticLength = Math.max(maxDiacriticLength, cpLength(k));
    }
  }
  const segmentByBase = new Map<string, number>();
  inv.segments.forEach((s, i) => segmentByBase.set(baseKey(s.bundle, nBase), i));
  const made: Lookup = { nBase, symbolByKey, maxSymbolLength, diacriticByKey, maxDiacriticLength, segmentByBase, realised: new Map() };
  cache.set(inv, made);
  return made;
}
