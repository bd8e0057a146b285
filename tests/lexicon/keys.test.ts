// Entry keys (src/lexicon/keys.ts) against a plain count per word in a map: the same index for
// every row, whatever order the words come in, with or without the counts of an earlier part.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { EntryKeys, keyOf } from "../../src/lexicon/keys.js";

const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 415263 : Date.now() % 2 ** 31));
console.log(`keys.test: fast-check seed ${SEED} (STRATA_FC_SEED replays it)`);

const model = (before: readonly (readonly [string, number])[], words: readonly string[]): number[] => {
  const seen = new Map(before);
  return words.map((w) => {
    const n = (seen.get(w) ?? 0) + 1;
    seen.set(w, n);
    return n;
  });
};

describe("EntryKeys", () => {
  it("counts each word's rows as a map does, sorted or not", () => {
    const word = fc.constantFrom("a", "b", "ab", "b#", "tram", "Tram", "zoo", "é", "", "a b");
    // Mostly sorted runs with some out of order, as lexicons are.
    const words = fc.oneof(fc.array(word, { maxLength: 40 }), fc.array(word, { maxLength: 40 }).map((w) => [...w].sort()));
    const before = fc.uniqueArray(fc.tuple(word, fc.integer({ min: 1, max: 4 })), { selector: (t) => t[0], maxLength: 5 });
    fc.assert(
      fc.property(before, words, (b, ws) => {
        const keys = new EntryKeys(b.length > 0 ? b : undefined);
        expect(ws.map((w) => keys.count(w))).toEqual(model(b, ws));
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });

  it("counts as a map does over lists long enough to grow its tables", () => {
    const word = fc.string({ unit: fc.constantFrom("a", "b", "z", "é", "😀", "\ud800"), minLength: 0, maxLength: 12 });
    fc.assert(
      fc.property(fc.array(word, { minLength: 2000, maxLength: 4000 }), fc.nat({ max: 50 }), (ws, shuffled) => {
        const sorted = [...ws].sort();
        // Sorted, with a few words moved out of order.
        for (let k = 0; k < shuffled; k++) sorted.push(ws[(k * 7919) % ws.length]!);
        const keys = new EntryKeys();
        expect(sorted.map((w) => keys.count(w))).toEqual(model([], sorted));
      }),
      { seed: SEED, numRuns: 20 },
    );
  });

  it("gives the id when there is one, else word#index", () => {
    const keys = new EntryKeys();
    expect(keys.next("tram")).toBe("tram#1");
    expect(keys.next("tram", "")).toBe("tram#2");
    expect(keys.next("tram", "t9")).toBe("t9");
    expect(keys.next("bus")).toBe("bus#1");
    expect(keys.next("tram")).toBe("tram#4");
    expect(keyOf("a", undefined, 3)).toBe("a#3");
  });
});
