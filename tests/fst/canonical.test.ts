// The minimiser's canonical form, against a reference written out plainly here: subset
// construction (`determinise`), trimming, Moore's partition refinement by signatures (Moore 1956,
// from memory) and breadth-first renumbering by ascending label (`canonicalOrder`). The compiled
// machines and the cache depend on this exact form (state numbers and arc order), so `minimise`
// must give the same machine as the reference, not only the same relation. Also: composition into
// an arc table and `minimiseTable` give the machines that `compose` and `minimise` give.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  EPSILON, Fst, canonicalOrder, emptyFst, compose, composeTable, determinise, expandFinalOutputs, fstOf, isSequential,
  minimise, minimiseTable, minimiseToTable, reverse, sortedArcs, sortedRows, tableOf, trim, trimTable, type Label,
} from "../../src/fst/index.js";
import { arbFst, arbSequential } from "./brute.js";

const runs = { numRuns: 200 };
const acceptor = arbFst({ maxStates: 5, labels: 3, maxArcs: 12, epsilon: true, acceptor: true });
const transducer = arbFst({ maxStates: 5, labels: 3, maxArcs: 12, epsilon: true, finalOutputs: true });

/** Structural equality: start, finals with their outputs, and every state's arcs in order. */
function same(a: Fst, b: Fst): boolean {
  if (a.numStates !== b.numStates || a.start !== b.start) return false;
  for (let s = 0; s < a.numStates; s++) {
    if ((a.finalOutput(s) ?? ["-"]).join(",") !== (b.finalOutput(s) ?? ["-"]).join(",")) return false;
    const x = a.arcs(s), y = b.arcs(s);
    if (x.length !== y.length) return false;
    for (let k = 0; k < x.length; k++) if (x[k]!.input !== y[k]!.input || x[k]!.output !== y[k]!.output || x[k]!.target !== y[k]!.target) return false;
  }
  return true;
}

/** The reference minimal DFA of an acceptor in canonical order (the empty language: one state, no arcs). */
function referenceAcceptor(fst: Fst): Fst {
  const d = trim(determinise(fst));
  const n = d.numStates;
  if (!Array.from({ length: n }, (_, s) => d.isFinal(s)).some(Boolean)) return emptyFst();
  let cls = Array.from({ length: n }, (_, s) => (d.isFinal(s) ? 1 : 0));
  for (;;) {
    const sig = (s: number): string => `${cls[s]}|${d.arcs(s).map((a) => `${a.input}>${cls[a.target]}`).sort().join(" ")}`;
    const ids = new Map<string, number>();
    const next = Array.from({ length: n }, (_, s) => {
      const k = sig(s);
      if (!ids.has(k)) ids.set(k, ids.size);
      return ids.get(k)!;
    });
    const before = new Set(cls).size;
    cls = next;
    if (ids.size === before) break;
  }
  const q = new Fst();
  const blocks = new Set(cls).size;
  q.addStates(blocks);
  q.setStart(cls[d.start]!);
  const done = new Set<number>();
  for (let s = 0; s < n; s++) {
    if (done.has(cls[s]!)) continue;
    done.add(cls[s]!);
    for (const a of d.arcs(s)) q.addArc(cls[s]!, a.input, a.input, cls[a.target]!);
    if (d.isFinal(s)) q.setFinal(cls[s]!);
  }
  return canonicalOrder(trim(q));
}

/** The reference for a transducer that is not sequential: pairs coded in order of first use, the acceptor's reference, decoded. */
function referencePairs(fst: Fst): Fst {
  const m = expandFinalOutputs(fst);
  const codes = new Map<string, number>();
  const decode: [Label, Label][] = [[EPSILON, EPSILON]];
  const enc = new Fst();
  enc.addStates(m.numStates);
  enc.setStart(m.start);
  for (let s = 0; s < m.numStates; s++) {
    for (const a of m.arcs(s)) {
      let c = 0;
      if (a.input !== EPSILON || a.output !== EPSILON) {
        const k = `${a.input}:${a.output}`;
        if (!codes.has(k)) { codes.set(k, decode.length); decode.push([a.input, a.output]); }
        c = codes.get(k)!;
      }
      enc.addArc(s, c, c, a.target);
    }
    if (m.isFinal(s)) enc.setFinal(s);
  }
  const r = referenceAcceptor(enc);
  const out = new Fst();
  out.addStates(r.numStates);
  out.setStart(r.start);
  for (let s = 0; s < r.numStates; s++) {
    for (const a of r.arcs(s)) out.addArc(s, decode[a.input]![0], decode[a.input]![1], a.target);
    if (r.isFinal(s)) out.setFinal(s);
  }
  return out;
}

describe("canonical minimisation", () => {
  it("an acceptor's minimal machine is the reference's, state for state and arc for arc", () => {
    fc.assert(fc.property(acceptor, (a) => { expect(same(minimise(a), referenceAcceptor(a))).toBe(true); }), runs);
  });

  it("a transducer that is not sequential gives the reference's pair-coded machine", () => {
    fc.assert(
      fc.property(transducer, (t) => {
        fc.pre(!t.isAcceptor() && !isSequential(t));
        expect(same(minimise(t), referencePairs(t))).toBe(true);
      }),
      runs,
    );
  });

  it("two machines of one pair language minimise to the same machine (the numbering depends on the language alone)", () => {
    fc.assert(
      fc.property(acceptor, (a) => {
        // The same language written twice over: a fresh start with an ε arc, and the states reversed.
        const n = a.numStates;
        const b = new Fst();
        b.addStates(n + 1);
        b.setStart(n);
        b.addArc(n, EPSILON, EPSILON, n - 1 - a.start);
        for (let s = 0; s < n; s++) {
          for (const x of [...a.arcs(s)].reverse()) b.addArc(n - 1 - s, x.input, x.output, n - 1 - x.target);
          if (a.isFinal(s)) b.setFinal(n - 1 - s);
        }
        expect(same(minimise(b), minimise(a))).toBe(true);
      }),
      runs,
    );
  });
});

describe("arc tables", () => {
  const functional = fc.oneof(transducer, arbSequential(3, 3), arbSequential(3, 3).map(reverse));

  it("tableOf and fstOf round-trip a machine without final outputs; trimTable is trim", () => {
    fc.assert(
      fc.property(transducer, (t) => {
        const m = expandFinalOutputs(t);
        expect(same(fstOf(tableOf(m)), m)).toBe(true);
        expect(same(fstOf(trimTable(tableOf(m))), trim(m))).toBe(true);
      }),
      runs,
    );
  });

  it("composeTable then minimiseTable is minimise after compose, machine for machine", () => {
    fc.assert(
      fc.property(functional, functional, (a, b) => {
        const c = compose(a, b);
        const m = minimise(c);
        expect(same(minimiseTable(composeTable(a, b)), m)).toBe(true);
        // The accumulator of a fold kept as a table composes as the machine it describes.
        const left = minimiseToTable(composeTable(a, b));
        if (!(left instanceof Fst)) {
          expect(same(fstOf(left), m)).toBe(true);
          expect(same(fstOf(composeTable(left, b)), compose(m, b))).toBe(true);
          expect(same(fstOf(composeTable(b, left)), compose(b, m))).toBe(true);
        }
      }),
      runs,
    );
  });

  it("sortedRows sorts a table's arcs as sortedArcs sorts the machine's", () => {
    fc.assert(
      fc.property(transducer, (t) => {
        const m = expandFinalOutputs(t);
        for (const by of ["input", "output"] as const) expect(sortedRows(tableOf(m), by)).toEqual(sortedArcs(m, by));
      }),
      runs,
    );
  });
});
