// Natural classes: every minimal feature bundle that picks out exactly a given set of segments from
// the inventory, or, when there is none, the smallest natural class containing the set.

import type { Bundle, FeatureValue, Inventory, PartialBundle } from "./types.js";
import { baseKey, lookup } from "./lookup.js";
import { bundleOf } from "./bundles.js";
import { realise } from "./realise.js";

export interface NaturalClassResult {
  /** Every bundle with the fewest features whose extension is exactly the set; empty if none. */
  readonly exact: PartialBundle[];
  /** When `exact` is empty: one minimal bundle for the smallest natural class containing the set,
   *  and the symbols (inventory order) it lets in beyond the set. */
  readonly smallest?: { readonly bundle: PartialBundle; readonly extra: string[] };
  /** Symbols that are not one readable segment (ignored by the search). */
  readonly unknown: string[];
}

type Bits = Uint32Array;

const bitsEqual = (a: Bits, b: Bits): boolean => a.every((w, k) => w === b[k]);
const bitsAnd = (a: Bits, b: Bits): Bits => a.map((w, k) => w & b[k]!);

/**
 * All subsets of `cands` of the least size whose extensions intersect to `target`.
 * Every candidate's extension contains `target`. Search by increasing size over combinations in
 * candidate order; a candidate that does not shrink the running intersection is skipped, since a
 * subset containing it is never minimal (dropping it leaves the intersection unchanged).
 */
function minimalSubsets(cands: readonly { ext: Bits }[], target: Bits, all: Bits): number[][] {
  for (let size = 0; size <= cands.length; size++) {
    const found: number[][] = [];
    const pick: number[] = [];
    const walk = (from: number, acc: Bits): void => {
      if (pick.length === size) {
        if (bitsEqual(acc, target)) found.push([...pick]);
        return;
      }
      for (let k = from; k <= cands.length - (size - pick.length); k++) {
        const next = bitsAnd(acc, cands[k]!.ext);
        if (bitsEqual(next, acc)) continue;
        pick.push(k);
        walk(k + 1, next);
        pick.pop();
      }
    };
    walk(0, all);
    if (found.length > 0) return found;
  }
  return [];
}

/**
 * Natural-class search over the inventory's segments plus any requested segment that is not in
 * the inventory (e.g. pʰ written with a diacritic), on non-prosodic features.
 *
 * A bundle picks out exactly the set only if each of its values is shared by every member, so the
 * candidates are those shared (feature, value) pairs; their full intersection is the smallest
 * natural class containing the set (any class containing the set is a superset of it).
 */
export function naturalClasses(inv: Inventory, symbols: readonly string[]): NaturalClassResult {
  const { nBase } = lookup(inv);
  const unknown: string[] = [];
  const universe: { symbol: string; bundle: Bundle }[] = inv.segments.map((s) => ({ symbol: s.symbol, bundle: s.bundle }));
  const position = new Map<string, number>(universe.map((u, k) => [baseKey(u.bundle, nBase), k] as const));
  const members: number[] = [];
  for (const sym of symbols) {
    const b = bundleOf(inv, sym);
    if (!b) {
      unknown.push(sym);
      continue;
    }
    const key = baseKey(b, nBase);
    let at = position.get(key);
    if (at === undefined) {
      const written = realise(inv, b);
      at = universe.length;
      universe.push({ symbol: written.ok ? written.text : sym, bundle: b });
      position.set(key, at);
    }
    if (!members.includes(at)) members.push(at);
  }
  if (members.length === 0) return { exact: [], unknown };

  const words = Math.ceil(universe.length / 32);
  const make = (pred: (k: number) => boolean): Bits => {
    const b = new Uint32Array(words);
    universe.forEach((_, k) => {
      if (pred(k)) b[k >>> 5] = (b[k >>> 5]! | (1 << (k & 31))) >>> 0;
    });
    return b;
  };
  const all = make(() => true);
  const goal = make((k) => members.includes(k));
  const first = universe[members[0]!]!.bundle;
  const cands: { f: number; v: FeatureValue; ext: Bits }[] = [];
  for (let f = 0; f < nBase; f++) {
    const v = first[f]!;
    if (!members.every((m) => universe[m]!.bundle[f] === v)) continue;
    const ext = make((k) => universe[k]!.bundle[f] === v);
    if (bitsEqual(ext, all)) continue; // never part of a minimal bundle
    cands.push({ f, v, ext });
  }
  const closure = cands.reduce((acc, c) => bitsAnd(acc, c.ext), all);
  const toBundle = (pick: number[]): PartialBundle => new Map(pick.map((k) => [cands[k]!.f, cands[k]!.v] as const));
  if (bitsEqual(closure, goal)) {
    return { exact: minimalSubsets(cands, goal, all).map(toBundle), unknown };
  }
  const [best] = minimalSubsets(cands, closure, all);
  const extra = universe.filter((_, k) => (closure[k >>> 5]! >>> (k & 31)) & 1 && !members.includes(k)).map((u) => u.symbol);
  return { exact: [], smallest: { bundle: toBundle(best ?? []), extra }, unknown };
}
