// The packed two-pass runner (src/fst/bimachine.ts: one-load tables, the batch loop) against the
// searching runner it packs (FunctionalRunner.runSearching), on random functional machines with
// string outputs, copies and final outputs, and on large batches with long entries, too little
// output room at first, and symbols outside the alphabet.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Fst, freezeFunctional, reverse, type FunctionalRunner, type Label } from "../../src/fst/index.js";
import { arbFst, arbSequential } from "./brute.js";

/** Random functional runners: reversed sequential machines (functional, not subsequential), and small machines with ε-input arcs (string outputs) that pass the functionality test. */
const arbRunner: fc.Arbitrary<FunctionalRunner | null> = fc.oneof(
  arbSequential(5, 4).map((t) => reverse(t)),
  arbFst({ maxStates: 4, labels: 4, maxArcs: 10, epsilon: true, epsilonInputForward: true, finalOutputs: true }),
).map((m) => {
  const r = freezeFunctional(m);
  return r.ok ? r.runner : null;
});

/** Words over 0 … 6: labels 1 … 4 are the machines' own, 0 (ε) and 5, 6 lie outside the input alphabet. */
const word = fc.array(fc.oneof({ weight: 12, arbitrary: fc.integer({ min: 1, max: 4 }) }, { weight: 1, arbitrary: fc.constantFrom(0, 5, 6, -1) }), { maxLength: 8 });

function pack(words: readonly (readonly number[])[]): { input: Int32Array; at: Int32Array } {
  const at = new Int32Array(words.length + 1);
  words.forEach((w, i) => (at[i + 1] = at[i]! + w.length));
  const input = new Int32Array(at[words.length]!);
  words.forEach((w, i) => input.set(w, at[i]!));
  return { input, at };
}

/** The batch loop to the end, growing the output array from `room` symbols as PreferredRunner does. */
function runAll(r: FunctionalRunner, input: Int32Array, at: Int32Array, room: number): { out: Int32Array; outAt: Int32Array; ok: Uint8Array; calls: number } {
  const entries = at.length - 1;
  let out = new Int32Array(room);
  const outAt = new Int32Array(entries + 1);
  const ok = new Uint8Array(entries).fill(7);
  let done = 0;
  let calls = 0;
  while (done < entries) {
    done = r.runBatch(input, at, out, outAt, ok, done);
    calls++;
    if (done < entries) {
      const bigger = new Int32Array(Math.max(1, out.length * 2));
      bigger.set(out);
      out = bigger;
    }
  }
  return { out, outAt, ok, calls };
}

function expectSame(r: FunctionalRunner, words: readonly (readonly number[])[], room: number): void {
  const { input, at } = pack(words);
  const b = runAll(r, input, at, room);
  words.forEach((w, e) => {
    const want: Label[] = [];
    const accepted = r.runSearching(w, want);
    const one: Label[] = [];
    expect(r.packed()!.run(w, one), `run of [${w}]`).toBe(accepted);
    if (accepted) expect(one).toEqual(want);
    expect(b.ok[e], `entry ${e} [${w}]`).toBe(accepted ? 1 : 0);
    expect(Array.from(b.out.subarray(b.outAt[e]!, b.outAt[e + 1]!)), `entry ${e} [${w}]`).toEqual(accepted ? want : []);
  });
}

describe("the packed two-pass runner = the searching runner", () => {
  it("one entry at a time and in batches, with too little output room at first", () => {
    let packed = 0;
    fc.assert(
      fc.property(arbRunner, fc.array(word, { maxLength: 20 }), fc.integer({ min: 0, max: 12 }), (r, words, room) => {
        if (r === null || r.packed() === null) return;
        packed++;
        expectSame(r, words, room);
      }),
      { numRuns: 300 },
    );
    // The generator must reach the packed runner most of the time (else the property says little).
    expect(packed).toBeGreaterThan(150);
  });

  it("large batches, and entries of thousands of symbols", () => {
    fc.assert(
      fc.property(arbRunner, fc.array(word, { minLength: 1, maxLength: 6 }), fc.nat(), (r, words, seed) => {
        if (r === null || r.packed() === null) return;
        // About 7 000 symbols in 1 500 entries, then one entry of 5 000 symbols of the alphabet.
        const many: number[][] = [];
        for (let k = 0; many.length < 1500; k++) many.push(words[(k + seed) % words.length]!);
        const long = Array.from({ length: 5000 }, (_, i) => 1 + ((i * 7 + seed) % 4));
        expectSame(r, [...many, long, ...many.slice(0, 10)], 64);
      }),
      { numRuns: 30 },
    );
  });

  it("a machine that accepts nothing rejects every entry of a batch", () => {
    const f = new Fst();
    f.addStates(2);
    f.addArc(0, 1, 2, 1);
    f.addArc(1, 2, 1, 0);
    const r = freezeFunctional(f);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.runner.packed()).not.toBeNull();
    expectSame(r.runner, [[1, 2], [], [1], [3, 0]], 4);
  });
});
