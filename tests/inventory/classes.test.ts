// The natural-class finder: agreement with brute force over every partial bundle on small random
// inventories, and known classes of the en-us inventory.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  describeBundle,
  matches,
  naturalClasses,
  segmentsMatching,
  type FeatureValue,
  type Inventory,
  type PartialBundle,
} from "../../src/inventory/index.js";
import { enUs, inventoryOf } from "./helpers.js";

const V: FeatureValue[] = ["+", "-", "0"];

/** Every partial bundle over features 0..n-1 (each absent, +, - or 0): 4^n of them. */
function allPartials(n: number): PartialBundle[] {
  let out: Map<number, FeatureValue>[] = [new Map()];
  for (let f = 0; f < n; f++) {
    const next: Map<number, FeatureValue>[] = [];
    for (const p of out) {
      next.push(p);
      for (const v of V) next.push(new Map(p).set(f, v));
    }
    out = next;
  }
  return out;
}

const ext = (inv: Inventory, p: PartialBundle): string[] => segmentsMatching(inv, p).map((s) => s.symbol);
const sameSet = (a: readonly string[], b: readonly string[]) => a.length === b.length && a.every((x) => b.includes(x));
const names = (inv: Inventory, ps: readonly PartialBundle[]) => ps.map((p) => describeBundle(inv, p)).sort();

/** Brute force: minimal bundles with extension exactly `set`; else the smallest class containing it. */
function brute(inv: Inventory, n: number, set: readonly string[]) {
  const partials = allPartials(n);
  const exact = partials.filter((p) => sameSet(ext(inv, p), set));
  const min = Math.min(...exact.map((p) => p.size));
  const supersets = partials.filter((p) => set.every((s) => ext(inv, p).includes(s)));
  const smallestSize = Math.min(...supersets.map((p) => ext(inv, p).length));
  const smallest = supersets.filter((p) => ext(inv, p).length === smallestSize);
  const minSmall = Math.min(...smallest.map((p) => p.size));
  return {
    exact: exact.filter((p) => p.size === min),
    smallest: smallest.filter((p) => p.size === minSmall),
  };
}

/** A random inventory: up to 5 features, up to 9 distinct segments named s0, s1, … */
const arbInventory = fc
  .integer({ min: 1, max: 5 })
  .chain((n) =>
    fc
      .uniqueArray(fc.array(fc.constantFrom(...V), { minLength: n, maxLength: n }), {
        minLength: 2,
        maxLength: 9,
        selector: (r) => r.join(""),
      })
      .map((rows) => ({ n, rows })),
  )
  .chain(({ n, rows }) =>
    fc.subarray([...rows.keys()], { minLength: 1 }).map((pick) => ({ n, rows, pick })),
  );

describe("naturalClasses", () => {
  it("property: agrees with brute force over all partial bundles", () => {
    fc.assert(
      fc.property(arbInventory, ({ n, rows, pick }) => {
        const feats = Array.from({ length: n }, (_, k) => `f${k}`);
        const csv = ["symbol," + feats.join(","), ...rows.map((r, k) => `s${k},${r.join(",")}`)].join("\n");
        const r = inventoryOf(csv);
        const set = pick.map((k) => `s${k}`);
        const got = naturalClasses(r, set);
        const want = brute(r, n, set);
        expect(got.unknown).toEqual([]);
        expect(names(r, got.exact)).toEqual(names(r, want.exact));
        if (want.exact.length > 0) expect(got.smallest).toBeUndefined();
        else {
          expect(got.smallest).toBeDefined();
          expect(names(r, want.smallest)).toContain(describeBundle(r, got.smallest!.bundle));
          const e = ext(r, got.smallest!.bundle);
          expect([...got.smallest!.extra].sort()).toEqual(e.filter((s) => !set.includes(s)).sort());
        }
      }),
      { numRuns: 300 },
    );
  });

  it("every bundle returned picks out exactly the set (en-us, several sets)", () => {
    const inv = enUs();
    for (const set of [["p", "t", "k"], ["m", "n", "ŋ"], ["i", "u"], ["eɪ", "aɪ", "ɔɪ", "aʊ", "oʊ"], ["s", "z", "ʃ", "ʒ", "tʃ", "dʒ"]]) {
      const r = naturalClasses(inv, set);
      expect(r.exact.length).toBeGreaterThan(0);
      for (const b of r.exact) expect(ext(inv, b).sort()).toEqual([...set].sort());
      const size = r.exact[0]!.size;
      expect(r.exact.every((b) => b.size === size)).toBe(true);
    }
  });

  it("says p t k s is not natural and what the smallest class lets in", () => {
    const inv = enUs();
    const r = naturalClasses(inv, ["p", "t", "k", "s"]);
    expect(r.exact).toEqual([]);
    expect(describeBundle(inv, r.smallest!.bundle)).toBe("[+consonantal -voice]");
    expect(r.smallest!.extra).toEqual(["tʃ", "f", "θ", "ʃ"]);
  });

  it("includes segments written with diacritics in the universe", () => {
    const inv = enUs();
    const r = naturalClasses(inv, ["pʰ", "tʰ", "kʰ"]);
    expect(r.exact.map((b) => describeBundle(inv, b))).toContain("[+consonantal +spread_glottis]");
  });

  it("reports symbols it cannot read and ignores duplicates", () => {
    const inv = enUs();
    const r = naturalClasses(inv, ["p", "p", "q", "tʃx"]);
    expect(r.unknown).toEqual(["q", "tʃx"]);
    expect(r.exact.every((b) => sameSet(ext(inv, b), ["p"]))).toBe(true);
  });

  it("matches checks only the named features", () => {
    const b: FeatureValue[] = ["+", "-", "0"];
    expect(matches(b, new Map())).toBe(true);
    expect(matches(b, new Map([[2, "0"]]))).toBe(true);
    expect(matches(b, new Map([[1, "+"]]))).toBe(false);
  });
});
