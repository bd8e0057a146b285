// The symbols a transducer may change (fst/untouched.ts), against an exhaustive search of its
// outputs (brute.ts): on random machines, every string made only of unmarked symbols is copied by
// every accepting path.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Fst } from "../../src/fst/fst.js";
import { touchedSymbols, touches } from "../../src/fst/untouched.js";
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
