// keyOrder (lexicon/derivation.ts) orders the variant trace's outputs as their keys — the ids
// joined with ',' — sort as strings, without building the keys: the order of the variants and of
// their steps in JSON Lines rests on it.

import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { keyOrder } from "../../src/lexicon/derivation.js";

const sign = (x: number): number => (x < 0 ? -1 : x > 0 ? 1 : 0);
const byKey = (a: readonly number[], b: readonly number[]): number => {
  const x = a.join(",");
  const y = b.join(",");
  return x < y ? -1 : x > y ? 1 : 0;
};

// Ids near powers of ten make the cases where one decimal text begins the other (1, 10, 100, 12).
const id = fc.oneof(fc.nat(30), fc.constantFrom(1, 9, 10, 11, 19, 100, 101, 109, 110, 999, 1000), fc.nat(1_000_000));

describe("keyOrder", () => {
  test("has the sign of the joined keys' string order (property)", () => {
    fc.assert(
      fc.property(fc.array(id, { maxLength: 8 }), fc.array(id, { maxLength: 8 }), (a, b) => {
        expect(sign(keyOrder(a, b))).toBe(byKey(a, b));
        // Lists that share a beginning differ after it.
        const c = [...a, ...b];
        expect(sign(keyOrder(a, c))).toBe(byKey(a, c));
      }),
      { numRuns: 5000 },
    );
  });

  test("puts a decimal text before the longer ones it begins", () => {
    expect(keyOrder([1], [12])).toBeLessThan(0);
    expect(keyOrder([2], [12])).toBeGreaterThan(0);
    expect(keyOrder([1, 5], [10, 3])).toBeLessThan(0);
    expect(keyOrder([10], [1, 0])).toBeGreaterThan(0);
    expect(keyOrder([], [0])).toBeLessThan(0);
    expect(keyOrder([3, 4], [3, 4])).toBe(0);
  });
});
