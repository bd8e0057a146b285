// Property tests of the rational operations, composition, ε-removal, determinisation and
// minimisation against brute-force enumeration of the relation on all strings up to a length.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  EPSILON,
  applyAll,
  closure,
  compose,
  concat,
  determinise,
  freezeDeterministic,
  intersect,
  invert,
  isDeterministic,
  isSequential,
  minimise,
  project,
  removeEpsilon,
  reverse,
  union,
  type Fst,
  type Label,
} from "../../src/fst/index.js";
import { allStrings, arbFst, arbSequential, determiniseWithin, key, language, outputsOf, relation, sameSet, transduce } from "./brute.js";

const runs = { numRuns: 150 };
const transducer = arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, finalOutputs: true });
const acceptor = arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, acceptor: true });
const L = 3;

const split = (k: string): [string, string] => k.split("|") as [string, string];
const parts = (s: string): string[] => (s === "" ? [] : s.split(","));

describe("rational operations", () => {
  it("union is the union of relations", () => {
    fc.assert(
      fc.property(transducer, transducer, (a, b) => {
        const want = new Set([...relation(a, L, L), ...relation(b, L, L)]);
        expect(sameSet(relation(union(a, b), L, L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("concatenation pairs every split of input and output", () => {
    fc.assert(
      fc.property(transducer, transducer, (a, b) => {
        const want = new Set<string>();
        for (const p of relation(a, L, L)) {
          for (const q of relation(b, L, L)) {
            const [x1, y1] = split(p).map(parts) as [string[], string[]];
            const [x2, y2] = split(q).map(parts) as [string[], string[]];
            if (x1.length + x2.length <= L && y1.length + y2.length <= L) want.add(`${[...x1, ...x2].join(",")}|${[...y1, ...y2].join(",")}`);
          }
        }
        expect(sameSet(relation(concat(a, b), L, L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("star, plus and optional of an acceptor", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        const base = [...language(a, L)].map(parts);
        const starred = new Set<string>([""]);
        let frontier = new Set<string>([""]);
        for (let k = 0; k < L + 1; k++) {
          const next = new Set<string>();
          for (const w of frontier) for (const b of base) {
            const v = [...parts(w), ...b];
            if (v.length <= L && !starred.has(v.join(","))) next.add(v.join(","));
          }
          for (const v of next) starred.add(v);
          frontier = next;
        }
        expect(sameSet(language(closure(a, "*"), L), starred)).toBe(true);
        const plusWant = new Set<string>();
        for (const w of starred) for (const b of base) {
          const v = [...parts(w), ...b];
          if (v.length <= L) plusWant.add(v.join(","));
        }
        expect(sameSet(language(closure(a, "+"), L), plusWant)).toBe(true);
        expect(sameSet(language(closure(a, "?"), L), new Set([...language(a, L), ""]))).toBe(true);
      }),
      runs,
    );
  });

  it("inversion swaps the sides of every pair", () => {
    fc.assert(
      fc.property(transducer, (a) => {
        const want = new Set([...relation(a, L, L)].map((k) => { const [x, y] = split(k); return `${y}|${x}`; }));
        expect(sameSet(relation(invert(a), L, L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("reversal reverses both sides", () => {
    fc.assert(
      fc.property(transducer, (a) => {
        const want = new Set([...relation(a, L, L)].map((k) => {
          const [x, y] = split(k).map(parts) as [string[], string[]];
          return `${x.reverse().join(",")}|${y.reverse().join(",")}`;
        }));
        expect(sameSet(relation(reverse(a), L, L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("projections give the domain and the range", () => {
    fc.assert(
      fc.property(transducer, (a) => {
        const dom = new Set([...relation(a, L, 0, "output")].map((k) => split(k)[0]));
        expect(sameSet(language(project(a, "input"), L), dom)).toBe(true);
        const rng = new Set([...relation(a, 0, L, "input")].map((k) => split(k)[1]));
        expect(sameSet(language(project(a, "output"), L), rng)).toBe(true);
      }),
      runs,
    );
  });
});

describe("composition", () => {
  // The left machine has no ε-input cycle, so for |x| ≤ L its outputs are bounded and the
  // brute-force join over the middle string is exact.
  const left = arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, epsilonInputForward: true, finalOutputs: true });

  it("a ∘ b is the join of the two relations", () => {
    fc.assert(
      fc.property(left, transducer, (a, b) => {
        const ly = L + (L + 1) * a.numStates + 2;
        const want = new Set<string>();
        for (const k of relation(a, L, ly)) {
          const [x, y] = split(k);
          for (const z of transduce(b, parts(y).map(Number), L)) want.add(`${x}|${z}`);
        }
        expect(sameSet(relation(compose(a, b), L, L), want)).toBe(true);
      }),
      runs,
    );
  });

  it("intersection of acceptors is the intersection of languages", () => {
    fc.assert(
      fc.property(acceptor, acceptor, (a, b) => {
        const lb = language(b, L);
        const want = new Set([...language(a, L)].filter((w) => lb.has(w)));
        expect(sameSet(language(intersect(a, b), L), want)).toBe(true);
      }),
      runs,
    );
  });
});

describe("ε-removal, determinisation, minimisation", () => {
  it("removeEpsilon keeps the relation and leaves no ε:ε arc", () => {
    fc.assert(
      fc.property(transducer, (a) => {
        const r = removeEpsilon(a);
        expect(sameSet(relation(r, L, L), relation(a, L, L))).toBe(true);
        for (let s = 0; s < r.numStates; s++) for (const x of r.arcs(s)) expect(x.input === EPSILON && x.output === EPSILON).toBe(false);
      }),
      runs,
    );
  });

  it("determinise gives a deterministic acceptor of the same language", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        const d = determinise(a);
        expect(isDeterministic(d)).toBe(true);
        expect(sameSet(language(d, 5), language(a, 5))).toBe(true);
      }),
      runs,
    );
  });

  it("minimise keeps the language of acceptors and the relation of transducers", () => {
    fc.assert(
      fc.property(acceptor, transducer, (a, t) => {
        const m = minimise(a);
        expect(isDeterministic(m)).toBe(true);
        expect(sameSet(language(m, 5), language(a, 5))).toBe(true);
        expect(sameSet(relation(minimise(t), L, L), relation(t, L, L))).toBe(true);
      }),
      runs,
    );
  });

  it("determiniseTransducer: sequential result with the same relation, or a true report", () => {
    const functional = fc.oneof(arbSequential(3, 2), arbSequential(3, 2).map(reverse), transducer);
    let beyond = 0;
    fc.assert(
      fc.property(functional, (t) => {
        const r = determiniseWithin(t);
        if (r === null) {
          beyond++;
          return;
        }
        if (r.ok) {
          expect(isSequential(r.fst)).toBe(true);
          expect(sameSet(relation(r.fst, L, 10), relation(t, L, 10))).toBe(true);
          const m = minimise(r.fst);
          expect(isSequential(m)).toBe(true);
          expect(realStates(m)).toBeLessThanOrEqual(realStates(r.fst) + 1);
          expect(minimise(m).numStates).toBe(m.numStates);
          expect(sameSet(relation(m, L, 10), relation(t, L, 10))).toBe(true);
        } else if (r.reason === "not-functional") {
          // The witness input has two outputs; they show within a small output window.
          const windows = [4, 8, 12].map((w) => transduce(t, r.input, w).length);
          expect(Math.max(...windows)).toBeGreaterThan(1);
        }
      }),
      runs,
    );
    // Nearly every machine was decided within the limit.
    expect(beyond).toBeLessThan(runs.numRuns / 10);
  });
});

describe("running", () => {
  it("applyAll returns exactly the outputs of the relation", () => {
    fc.assert(
      fc.property(arbFst({ maxStates: 4, labels: 2, maxArcs: 9, epsilon: true, epsilonInputForward: true, finalOutputs: true }), (t) => {
        const rel = relation(t, L, 64);
        for (const x of allStrings(2, L)) {
          const got = applyAll(t, x, 1000);
          expect(got.capped).toBe(false);
          expect(got.outputs.map((o: Label[]) => o.join(","))).toEqual(outputsOf(rel, x).sort((p, q) => cmpKey(p, q)));
        }
      }),
      runs,
    );
  });

  it("the frozen sequential runner agrees with the relation", () => {
    fc.assert(
      fc.property(arbSequential(4, 3), (t: Fst) => {
        const run = freezeDeterministic(minimise(t));
        const rel = relation(t, 4, 16);
        for (const x of allStrings(3, 4)) {
          const out: Label[] = [];
          const ok = run.run(x, out);
          const want = outputsOf(rel, x);
          expect(ok).toBe(want.length === 1);
          if (ok) expect(key(x, out)).toBe(`${x.join(",")}|${want[0]}`);
          expect(run.accepts(x)).toBe(ok);
        }
      }),
      { numRuns: 100 },
    );
  });
});

function cmpKey(p: string, q: string): number {
  const a = parts(p).map(Number);
  const b = parts(q).map(Number);
  for (let k = 0; k < Math.min(a.length, b.length); k++) if (a[k] !== b[k]) return (a[k] as number) - (b[k] as number);
  return a.length - b.length;
}

/** States that are not ε-input chain links (those only spell out a string output). */
function realStates(f: Fst): number {
  let n = 0;
  for (let s = 0; s < f.numStates; s++) if (!f.arcs(s).some((a) => a.input === EPSILON)) n++;
  return n;
}

describe("batch running", () => {
  it("runBatch gives each entry the output of run, and rejects the same entries", () => {
    fc.assert(
      fc.property(arbSequential(4, 3), fc.array(fc.array(fc.integer({ min: 0, max: 4 }), { maxLength: 6 }), { maxLength: 12 }), (t, words) => {
        const run = freezeDeterministic(minimise(t));
        const at = Int32Array.from([0, ...words.map((_, k) => words.slice(0, k + 1).reduce((n, w) => n + w.length, 0))]);
        const input = Int32Array.from(words.flat());
        const out = new Int32Array(input.length * run.maxArcOutput + words.length * run.maxFinalOutput + 1);
        const outAt = new Int32Array(words.length + 1);
        const ok = new Uint8Array(words.length);
        const accepted = run.runBatch(input, at, out, outAt, ok);
        expect(run.runBatch(input, at, new Int32Array(0), outAt, ok)).toBe(-2);
        run.runBatch(input, at, out, outAt, ok);
        let n = 0;
        words.forEach((w, e) => {
          const o: Label[] = [];
          const good = run.run(w, o);
          expect(ok[e] === 1).toBe(good);
          if (good) {
            n++;
            expect(Array.from(out.subarray(outAt[e] as number, outAt[e + 1] as number))).toEqual(o);
          }
        });
        expect(accepted).toBe(n);
      }),
      { numRuns: 200 },
    );
  });
});
