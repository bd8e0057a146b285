// Property tests of the decision procedures and boolean operations: complement, difference,
// equivalence, the shortest distinguishing input, the functionality test and minimality
// (Myhill–Nerode state counts), all against brute-force enumeration.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  EPSILON,
  Fst,
  compose,
  complement,
  determinise,
  difference,
  equivalent,
  freezeFunctional,
  isFunctional,
  minimise,
  removeEpsilon,
  reverse,
  shortestDifference,
  type Label,
} from "../../src/fst/index.js";
import { allStrings, arbFst, arbSequential, determiniseWithin, language, sameSet, transduce } from "./brute.js";

const runs = { numRuns: 150 };
const acceptor = arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, acceptor: true });
const transducer = arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, finalOutputs: true });
/** Functional machines: sequential ones, their reversals (functional, usually not sequential) and cascades of those. */
const functional = fc.oneof(
  arbSequential(3, 2),
  arbSequential(3, 2).map(reverse),
  fc.tuple(arbSequential(3, 2).map(reverse), arbSequential(3, 2)).map(([a, b]) => compose(a, b)),
);
const L = 4;

/** Brute-force acceptance by simulating the state sets of the (possibly nondeterministic) acceptor. */
function subsetAfter(fst: Fst, set: number[], w: readonly Label[]): number[] {
  const close = (xs: number[]): number[] => {
    const seen = new Set(xs);
    const stack = [...xs];
    while (stack.length > 0) {
      const s = stack.pop() as number;
      for (const a of fst.arcs(s)) if (a.input === EPSILON && !seen.has(a.target)) { seen.add(a.target); stack.push(a.target); }
    }
    return [...seen].sort((x, y) => x - y);
  };
  let cur = close(set);
  for (const x of w) {
    const next: number[] = [];
    for (const s of cur) for (const a of fst.arcs(s)) if (a.input === x) next.push(a.target);
    cur = close([...new Set(next)]);
  }
  return cur;
}
const accepts = (fst: Fst, set: number[], w: readonly Label[]): boolean => subsetAfter(fst, set, w).some((s) => fst.isFinal(s));

describe("boolean operations on acceptors", () => {
  it("complement over {1, 2} is every other string", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        const la = language(a, L);
        const want = new Set(allStrings(2, L).map((w) => w.join(",")).filter((w) => !la.has(w)));
        expect(sameSet(language(complement(a, [1, 2]), L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("difference a − b", () => {
    fc.assert(
      fc.property(acceptor, acceptor, (a, b) => {
        const lb = language(b, L);
        const want = new Set([...language(a, L)].filter((w) => !lb.has(w)));
        expect(sameSet(language(difference(a, b), L), want)).toBe(true);
      }),
      runs,
    );
  });
});

describe("minimisation reaches the Myhill–Nerode state count", () => {
  it("state count = number of distinct non-empty residual languages (brute force)", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        const m = minimise(a);
        const n = m.numStates;
        // Nerode classes: residuals u⁻¹L for u reaching a distinct NFA state set. A minimal DFA of
        // n states reaches each state within n-1 symbols and separates two states with a suffix of
        // at most n-2 symbols, so lengths ≤ n are exhaustive.
        const sigs = new Set<string>();
        const bySet = new Map<string, string>();
        for (const u of allStrings(2, n)) {
          const set = subsetAfter(a, [a.start], u);
          const k = set.join(",");
          let sig = bySet.get(k);
          if (sig === undefined) {
            sig = allStrings(2, n).map((w) => (accepts(a, set, w) ? "1" : "0")).join("");
            bySet.set(k, sig);
          }
          if (sig.includes("1")) sigs.add(sig);
        }
        expect(n).toBe(Math.max(1, sigs.size));
      }),
      { numRuns: 120 },
    );
  });

  it("minimising twice changes nothing; determinising a minimal DFA keeps its size", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        const m = minimise(a);
        expect(minimise(m).numStates).toBe(m.numStates);
        expect(minimise(determinise(m)).numStates).toBe(m.numStates);
      }),
      runs,
    );
  });
});

/** Brute-force check of a claimed shortest difference (or of equivalence up to length L). */
function checkDifference(a: Fst, b: Fst, outs: (f: Fst, w: Label[]) => string[]): void {
  const d = shortestDifference(a, b);
  const strings = allStrings(2, L + 1);
  const differs = (w: Label[]): boolean => JSON.stringify(outs(a, w)) !== JSON.stringify(outs(b, w));
  if (d === null) {
    for (const w of strings) expect(differs(w)).toBe(false);
    expect(equivalent(a, b)).toBe(true);
  } else {
    expect(differs([...d.input])).toBe(true);
    for (const w of strings) if (w.length < d.input.length) expect(differs(w)).toBe(false);
    expect(d.outputsA.map((o) => o.join(","))).toEqual(outs(a, [...d.input]));
    expect(equivalent(a, b)).toBe(false);
  }
}

describe("equivalence and the shortest distinguishing input", () => {
  const acc = (f: Fst, w: Label[]): string[] => (accepts(f, [f.start], w) ? [w.join(",")] : []);
  const out = (f: Fst, w: Label[]): string[] => transduce(f, w, 24);

  it("acceptors: random pairs, and a machine against its own minimal and ε-free forms", () => {
    fc.assert(
      fc.property(acceptor, acceptor, (a, b) => {
        checkDifference(a, b, acc);
        expect(equivalent(a, minimise(a))).toBe(true);
        expect(equivalent(removeEpsilon(a), determinise(a))).toBe(true);
      }),
      runs,
    );
  });

  it("functional transducers: random pairs, and against their sequential and minimal forms", () => {
    fc.assert(
      fc.property(functional, functional, (a, b) => {
        checkDifference(a, b, out);
        expect(equivalent(a, minimise(a))).toBe(true);
        const d = determiniseWithin(a);
        if (d?.ok === true) expect(equivalent(a, d.fst)).toBe(true);
      }),
      { numRuns: 120 },
    );
  });

  it("a one-symbol change is found at the right input", () => {
    fc.assert(
      fc.property(arbSequential(3, 2), (a) => {
        // a followed by renaming output 1 → 2 differs exactly on the inputs whose output has a 1.
        const d = shortestDifference(a, compose(a, renamer()));
        const witness = allStrings(2, L).find((w) => transduce(a, w, 24).some((o) => o.split(",").includes("1")));
        if (witness === undefined) return;
        expect(d).not.toBeNull();
        expect(d?.input.length).toBeLessThanOrEqual(witness.length);
      }),
      runs,
    );
  });
});

/** The one-state transducer writing 2 for both 1 and 2. */
function renamer(): Fst {
  const f = new Fst();
  f.addState();
  f.addArc(0, 1, 2, 0);
  f.addArc(0, 2, 2, 0);
  f.setFinal(0);
  return f;
}

describe("functionality", () => {
  it("isFunctional agrees with brute force; its witness has two outputs", () => {
    fc.assert(
      fc.property(fc.oneof(functional, transducer), (t) => {
        const f = isFunctional(t);
        if (f.functional) {
          for (const w of allStrings(2, L)) expect(transduce(t, w, 12).length).toBeLessThanOrEqual(1);
        } else {
          const counts = [4, 8, 12].map((k) => transduce(t, [...f.input], k).length);
          expect(Math.max(...counts)).toBeGreaterThan(1);
        }
      }),
      runs,
    );
  });

  it("freezeFunctional runs every functional machine like the relation, and reports the others", () => {
    fc.assert(
      fc.property(fc.oneof(functional, functional, transducer), (t) => {
        const r = freezeFunctional(t);
        if (!r.ok) {
          expect(isFunctional(t).functional).toBe(false);
          return;
        }
        // run() goes through the packed one-load tables (bimachine.ts); runSearching() is the
        // searching loop they replace: both must be the relation.
        expect(r.runner.packed()).not.toBeNull();
        for (const w of allStrings(2, L)) {
          const want = transduce(t, w, 12);
          for (const run of [(o: Label[]) => r.runner.run(w, o), (o: Label[]) => r.runner.runSearching(w, o)]) {
            const out: Label[] = [];
            const ok = run(out);
            expect(ok).toBe(want.length === 1);
            if (ok) expect(out.join(",")).toBe(want[0]);
          }
        }
      }),
      runs,
    );
  });
});
