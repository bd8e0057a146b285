// Worked examples from the literature (sources named beside each), and unit tests of the symbol
// table, serialisation (round trip, corruption detection) and DOT export.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  EPSILON,
  Fst,
  SymbolTable,
  acceptorOf,
  applyAll,
  closure,
  compose,
  determiniseTransducer,
  deserialise,
  deserialiseDeterministic,
  deserialiseFunctional,
  equivalent,
  freezeDeterministic,
  freezeFunctional,
  isFunctional,
  minimise,
  reverse,
  serialise,
  serialiseDeterministic,
  serialiseFunctional,
  toDot,
  transducerOf,
  type Label,
} from "../../src/fst/index.js";
import { allStrings, arbFst, arbSequential, relation, sameSet } from "./brute.js";

const a = 1, b = 2, c = 3, d = 4, e = 5;

/** Number of accepting paths of an acyclic machine reading `input` (dynamic programming). */
function countPaths(f: Fst, s: number, input: readonly Label[], pos: number): number {
  let n = pos === input.length && f.isFinal(s) ? 1 : 0;
  for (const arc of f.arcs(s)) {
    if (arc.input === EPSILON) n += countPaths(f, arc.target, input, pos);
    else if (pos < input.length && arc.input === input[pos]) n += countPaths(f, arc.target, input, pos + 1);
  }
  return n;
}

describe("worked examples", () => {
  it("composition of [a:b]+ with [b:c]+ is [a:c]+", () => {
    // From memory: Jurafsky & Martin, Speech and Language Processing (2nd ed., 2009), ch. 3 —
    // the composition of [a:b]+ and [b:c]+ gives [a:c]+.
    const ab = closure(transducerOf([a], [b]), "+");
    const bc = closure(transducerOf([b], [c]), "+");
    const ac = closure(transducerOf([a], [c]), "+");
    const composed = compose(ab, bc);
    expect(equivalent(composed, ac)).toBe(true);
    expect(applyAll(composed, [a, a, a]).outputs).toEqual([[c, c, c]]);
    expect(applyAll(composed, []).outputs).toEqual([]);
  });

  it("the ε-filter gives one path where ε-moves of both machines could interleave", () => {
    // From memory: Mohri, Pereira & Riley, "Weighted finite-state transducers in speech
    // recognition" (2002), the ε-composition figure: T1 = a:a b:ε c:ε d:d, T2 = a:d ε:e d:a;
    // T1 ∘ T2 maps abcd to dea, and without a filter several redundant paths would do so.
    const t1 = transducerOf([a, b, c, d], [a, EPSILON, EPSILON, d]);
    const t2 = transducerOf([a, EPSILON, d], [d, e, a]);
    const r = compose(t1, t2);
    expect(applyAll(r, [a, b, c, d]).outputs).toEqual([[d, e, a]]);
    expect(countPaths(r, r.start, [a, b, c, d], 0)).toBe(1);
    expect(sameSet(relation(r, 4, 4), new Set(["1,2,3,4|4,5,1"]))).toBe(true);
  });

  it("minimising the subset-construction DFA of (a|b)*abb merges A and C", () => {
    // From memory: Aho, Lam, Sethi & Ullman, Compilers (2nd ed., 2006), §3.7.1 and §3.9.6 — the
    // DFA for (a|b)*abb from the subset construction has states A–E (E accepting); minimisation
    // finds A and C equivalent and leaves 4 states.
    const f = new Fst();
    const [A, B, C, D, E] = [0, 1, 2, 3, 4];
    f.addStates(5);
    const table: [number, number, number][] = [
      [A, B, C], [B, B, D], [C, B, C], [D, B, E], [E, B, C],
    ];
    for (const [s, onA, onB] of table) {
      f.addArc(s, a, a, onA);
      f.addArc(s, b, b, onB);
    }
    f.setFinal(E);
    const m = minimise(f);
    expect(m.numStates).toBe(4);
    for (const w of allStrings(2, 7)) {
      const ends = w.length >= 3 && w.slice(-3).join(",") === "1,2,2";
      expect(applyAll(m, w).outputs.length === 1).toBe(ends);
    }
  });

  it("a right-context rule is functional but not subsequential; the functional runner still runs it", () => {
    // Common practice, no source: "a → b / _ c* d" needs unbounded lookahead (twins property fails),
    // so no deterministic left-to-right transducer computes it.
    // Over {a, c, d}: a becomes b when the next non-c symbol is d. State 1 has guessed "rewrite"
    // and checks c* d; state 2 has guessed "keep" and checks c* (a | end).
    const keep = new Fst();
    keep.addStates(3);
    keep.setFinal(0);
    keep.setFinal(2);
    for (const x of [c, d]) keep.addArc(0, x, x, 0);
    keep.addArc(0, a, b, 1);
    keep.addArc(0, a, a, 2);
    keep.addArc(1, c, c, 1);
    keep.addArc(1, d, d, 0);
    keep.addArc(2, c, c, 2);
    keep.addArc(2, a, b, 1);
    keep.addArc(2, a, a, 2);
    // Without the check of the "keep" branch the machine is optional, hence not functional.
    const loose = new Fst();
    loose.addStates(2);
    loose.setFinal(0);
    for (const x of [a, c, d]) loose.addArc(0, x, x, 0);
    loose.addArc(0, a, b, 1);
    loose.addArc(1, c, c, 1);
    loose.addArc(1, d, d, 0);
    expect(isFunctional(keep).functional).toBe(true);
    expect(isFunctional(loose).functional).toBe(false);
    const det = determiniseTransducer(keep);
    expect(det.ok).toBe(false);
    if (!det.ok) expect(det.reason).toBe("not-subsequential");
    const run = freezeFunctional(keep);
    expect(run.ok).toBe(true);
    if (!run.ok) return;
    const out: Label[] = [];
    expect(run.runner.run([a, c, c, d, a, c], out)).toBe(true);
    expect(out).toEqual([b, c, c, d, a, c]);
  });
});

describe("symbol table", () => {
  it("numbers names in insertion order, ε is 0, round-trips through its name list", () => {
    const t = new SymbolTable();
    expect(t.add("#")).toBe(1);
    expect(t.add(".")).toBe(2);
    expect(t.add("tʰ")).toBe(3);
    expect(t.add("#")).toBe(1);
    expect(t.name(0)).toBe("ε");
    expect(t.label("tʰ")).toBe(3);
    const u = SymbolTable.fromNames(t.toJSON());
    expect(u.toJSON()).toEqual(t.toJSON());
  });
});

describe("serialisation", () => {
  const machine = arbFst({ maxStates: 5, labels: 300, maxArcs: 12, epsilon: true, finalOutputs: true });

  it("round-trips machines exactly", () => {
    fc.assert(
      fc.property(machine, (f) => {
        const back = deserialise(serialise(f));
        expect(back.ok).toBe(true);
        if (back.ok) expect(serialise(back.value)).toEqual(serialise(f));
      }),
      { numRuns: 100 },
    );
  });

  it("detects every flipped byte and every truncation", () => {
    fc.assert(
      fc.property(machine, fc.nat(), fc.integer({ min: 1, max: 255 }), (f, at, x) => {
        const bytes = serialise(f);
        const bad = bytes.slice();
        const k = at % bytes.length;
        bad[k] = (bad[k] as number) ^ x;
        expect(deserialise(bad).ok).toBe(false);
        expect(deserialise(bytes.slice(0, k)).ok).toBe(false);
      }),
      { numRuns: 200 },
    );
  });

  it("round-trips both runners, which then run the same", () => {
    fc.assert(
      fc.property(arbSequential(3, 2), (t) => {
        const det = freezeDeterministic(minimise(t));
        const det2 = deserialiseDeterministic(serialiseDeterministic(det));
        const fun = freezeFunctional(reverse(t));
        expect(det2.ok).toBe(true);
        expect(fun.ok).toBe(true);
        if (!det2.ok || !fun.ok) return;
        const fun2 = deserialiseFunctional(serialiseFunctional(fun.runner));
        expect(fun2.ok).toBe(true);
        if (!fun2.ok) return;
        for (const w of allStrings(2, 4)) {
          const [o1, o2, o3, o4]: Label[][] = [[], [], [], []];
          expect(det2.value.run(w, o2)).toBe(det.run(w, o1));
          expect(o2).toEqual(o1);
          expect(fun2.value.run(w, o4)).toBe(fun.runner.run(w, o3));
          expect(o4).toEqual(o3);
        }
        expect(deserialiseFunctional(serialiseDeterministic(det)).ok).toBe(false);
      }),
      { numRuns: 100 },
    );
  });
});

describe("DOT export", () => {
  it("names labels through the caller's function and marks start and final states", () => {
    const names = ["ε", "#", ".", "t", "tʰ"];
    const f = transducerOf([1, 3], [1, 4]);
    f.setFinal(2, [2]);
    const dot = toDot(f, { labelName: (l) => names[l] ?? "?", title: 'aspirate "t"' });
    expect(dot).toContain("digraph fst {");
    expect(dot).toContain('label="aspirate \\"t\\""');
    expect(dot).toContain("start -> 0;");
    expect(dot).toContain('0 -> 1 [label="#"];');
    expect(dot).toContain('1 -> 2 [label="t:tʰ"];');
    expect(dot).toContain('2 [shape=doublecircle, label="2 / ."];');
    expect(toDot(acceptorOf([3]))).toContain('0 -> 1 [label="3"];');
  });
});
