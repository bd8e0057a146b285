// The symbols a transducer may change (fst/untouched.ts), against an exhaustive search of its
// outputs (brute.ts): on random machines, every string made only of unmarked symbols is copied by
// every accepting path. The blocks' tables as bit masks (TouchMasks) agree with `touches` block by block.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Fst } from "../../src/fst/fst.js";
import { runsBlock, touchedSymbols, touches, TouchMasks } from "../../src/fst/untouched.js";
import { allStrings, arbFst, transduce } from "./brute.js";

const LABELS = 3;
// Acceptors (every arc a copy) with some transducer arcs in: most machines get a table, some marks.
const machine = fc.oneof(
  arbFst({ maxStates: 4, labels: LABELS, maxArcs: 10, epsilon: true, acceptor: true }),
  arbFst({ maxStates: 4, labels: LABELS, maxArcs: 10, epsilon: true, finalOutputs: true }),
  fc.tuple(arbFst({ maxStates: 4, labels: LABELS, maxArcs: 10, acceptor: true }), fc.nat(3), fc.integer({ min: 1, max: LABELS }), fc.integer({ min: 0, max: LABELS })).map(([f, s, i, o]) => {
    if (s < f.numStates) f.addArc(s, i, o, s);
    return f;
  }),
);

describe("touchedSymbols", () => {
  it("marks every symbol whose copy is not certain (property)", () => {
    let checked = 0;
    fc.assert(
      fc.property(machine, (f) => {
        const t = touchedSymbols(f);
        if (t === null) return;
        for (let n = 0; n <= 4; n++) {
          for (const x of allStrings(LABELS, n)) {
            if (touches(t, x)) continue;
            checked++;
            for (const y of transduce(f, x, 8)) expect(y).toBe(x.join(","));
          }
        }
      }),
      { numRuns: 1500 },
    );
    expect(checked).toBeGreaterThan(1000);
  });

  it("marks the rewritten symbol only, and gives up on a machine that writes without reading", () => {
    // a → b anywhere, c and b copied.
    const f = new Fst();
    const s = f.addState();
    f.setFinal(s);
    f.addArc(s, 1, 2, s);
    f.addArc(s, 2, 2, s);
    f.addArc(s, 3, 3, s);
    expect([...touchedSymbols(f)!]).toEqual([0, 1, 0, 0]);
    expect(touches(touchedSymbols(f)!, [2, 3, 3])).toBe(false);
    expect(touches(touchedSymbols(f)!, [2, 1])).toBe(true);
    // A label the machine never reads counts as touched.
    expect(touches(touchedSymbols(f)!, [7])).toBe(true);
    f.addArc(s, 0, 3, s);
    expect(touchedSymbols(f)).toBeNull();
    const g = new Fst();
    g.setFinal(g.addState(), [1]);
    expect(touchedSymbols(g)).toBeNull();
  });
});

describe("TouchMasks", () => {
  // Tables of different lengths (a symbol past a table's end counts as touched), some blocks with
  // none (always run), and cascades of more than 32 blocks (masks of several words).
  const table = fc.option(fc.array(fc.integer({ min: 0, max: 1 }), { maxLength: 9 }).map((a) => Uint8Array.from(a)), { nil: null, freq: 4 });
  it("runs a block exactly when touches() says the word holds a symbol it may change (property)", () => {
    let skipped = 0;
    fc.assert(
      fc.property(fc.array(table, { minLength: 1, maxLength: 70, size: "max" }), fc.array(fc.array(fc.integer({ min: 0, max: 11 }), { maxLength: 8 }), { minLength: 1, maxLength: 10 }), (tables, words) => {
        const masks = new TouchMasks(tables);
        const mask = new Int32Array(masks.width);
        for (const w of words) {
          masks.fill(w, mask);
          tables.forEach((t, k) => {
            const runs = t === null || touches(t, w);
            if (!runs) skipped++;
            expect(runsBlock(mask, k)).toBe(runs);
          });
        }
      }),
      { numRuns: 300 },
    );
    expect(skipped).toBeGreaterThan(1000);
  });
});
