// Boolean operations on acceptors over a declared alphabet (complement, difference), the
// functionality test, equivalence of acceptors and of functional transducers, and the shortest
// input on which two machines differ.

import { project, trim } from "./basic.js";
import { FstLimitError, sortedArcs } from "./compose.js";
import { determinise, witnessThrough } from "./determinise.js";
import { removeEpsilon, removeInputEpsilons, type StrArc, type StrMachine } from "./epsilon.js";
import { EPSILON, Fst, FstError, type Label } from "./fst.js";
import { applyAll } from "./frozen.js";

/** The target of state s on label x in a deterministic machine's sorted rows, or -1. */
function step(rows: ReturnType<typeof sortedArcs>, s: number, x: Label): number {
  let lo = rows.first[s] as number;
  let hi = rows.first[s + 1] as number;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((rows.input[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo < (rows.first[s + 1] as number) && rows.input[lo] === x ? (rows.target[lo] as number) : -1;
}

function requireAcceptor(f: Fst, op: string): void {
  if (!f.isAcceptor()) throw new FstError(`${op} works on acceptors`);
}

/**
 * Complement of an acceptor relative to alphabet*: determinise, add a sink state, complete every
 * state over `alphabet`, and swap final and non-final states. Labels of `a` outside the alphabet
 * are dropped (strings containing them are not in alphabet* anyway).
 */
export function complement(a: Fst, alphabet: readonly Label[]): Fst {
  requireAcceptor(a, "complement");
  const sigma = [...new Set(alphabet)].filter((l) => l !== EPSILON).sort((x, y) => x - y);
  const d = determinise(a);
  const rows = sortedArcs(d, "input");
  const r = new Fst();
  r.addStates(d.numStates + 1);
  r.setStart(d.start);
  const sink = d.numStates;
  for (let s = 0; s < d.numStates; s++) {
    for (const x of sigma) {
      const t = step(rows, s, x);
      r.addArc(s, x, x, t < 0 ? sink : t);
    }
    if (!d.isFinal(s)) r.setFinal(s);
  }
  for (const x of sigma) r.addArc(sink, x, x, sink);
  r.setFinal(sink);
  return trim(r);
}

/**
 * Difference a − b of two acceptors: the strings a accepts and b does not. Product of a (ε-free)
 * with the subset construction of b, where b's side may fall into an implicit sink.
 */
export function difference(a: Fst, b: Fst): Fst {
  requireAcceptor(a, "difference");
  requireAcceptor(b, "difference");
  const A = removeEpsilon(a);
  const D = determinise(b);
  const rows = sortedArcs(D, "input");
  const r = new Fst();
  const ids = new Map<number, number>();
  const qa: number[] = [];
  const qd: number[] = [];
  const idOf = (p: number, d: number): number => {
    const key = p * (D.numStates + 1) + (d + 1);
    let id = ids.get(key);
    if (id === undefined) {
      id = qa.length;
      ids.set(key, id);
      qa.push(p);
      qd.push(d);
      r.addState();
    }
    return id;
  };
  idOf(A.start, D.numStates > 0 ? D.start : -1);
  for (let id = 0; id < qa.length; id++) {
    const p = qa[id] as number;
    const d = qd[id] as number;
    if (A.isFinal(p) && (d < 0 || !D.isFinal(d))) r.setFinal(id);
    for (const arc of A.arcs(p)) {
      const t = d < 0 ? -1 : step(rows, d, arc.input);
      r.addArc(id, arc.input, arc.input, idOf(arc.target, t));
    }
  }
  return trim(r);
}

/** The outcome of the functionality test. */
export type FunctionalityResult =
  | { readonly functional: true }
  /** `input` has at least two different outputs. */
  | { readonly functional: false; readonly input: readonly Label[] };

/** Delay between two outputs: which side is ahead and by what, or a mismatch (neither a prefix). */
type Delay = { readonly ahead: 0 | 1 | 2; readonly rest: readonly Label[] } | null;

/** Combines delay d with new outputs x (side 1) and y (side 2). */
function advance(d: Delay, x: readonly Label[], y: readonly Label[]): Delay {
  if (d === null) return null;
  const u = d.ahead === 1 ? [...d.rest, ...x] : x;
  const v = d.ahead === 2 ? [...d.rest, ...y] : y;
  const n = Math.min(u.length, v.length);
  for (let k = 0; k < n; k++) if (u[k] !== v[k]) return null;
  if (u.length > n) return { ahead: 1, rest: u.slice(n) };
  if (v.length > n) return { ahead: 2, rest: v.slice(n) };
  return { ahead: 0, rest: [] };
}

const delayKey = (d: Delay): string => (d === null ? "x" : `${d.ahead}:${d.rest.join(",")}`);

/**
 * Pairs (p, q) of M1 × M2 from which some common input is accepted by both (forward exploration
 * on equal input labels, then backward reachability from pairs of final states).
 */
function usefulPairs(m1: StrMachine, m2: StrMachine): Set<number> {
  const n2 = m2.arcs.length;
  const seen = new Set<number>([m1.start * n2 + m2.start]);
  const order = [m1.start * n2 + m2.start];
  const preds = new Map<number, number[]>();
  for (let k = 0; k < order.length; k++) {
    const pq = order[k] as number;
    const p = Math.floor(pq / n2);
    const q = pq % n2;
    for (const a of m1.arcs[p] as StrArc[]) {
      for (const b of m2.arcs[q] as StrArc[]) {
        if (a.input !== b.input) continue;
        const t = a.target * n2 + b.target;
        const list = preds.get(t);
        if (list === undefined) preds.set(t, [pq]);
        else list.push(pq);
        if (!seen.has(t)) {
          seen.add(t);
          order.push(t);
        }
      }
    }
  }
  const useful = new Set<number>();
  const stack: number[] = [];
  for (const pq of order) {
    const p = Math.floor(pq / n2);
    const q = pq % n2;
    if ((m1.finals[p] as Label[][]).length > 0 && (m2.finals[q] as Label[][]).length > 0) {
      useful.add(pq);
      stack.push(pq);
    }
  }
  while (stack.length > 0) {
    const pq = stack.pop() as number;
    for (const r of preds.get(pq) ?? []) {
      if (!useful.has(r)) {
        useful.add(r);
        stack.push(r);
      }
    }
  }
  return useful;
}

/**
 * The shortest input accepted by both string machines on which some path of M1 and some path of
 * M2 write different outputs, or null. Breadth-first search over (p, q, delay) restricted to
 * useful pairs; a mismatch is absorbing, and a witness is a pair of final states whose final
 * outputs do not close the delay. When M1 ∪ M2 is functional on the common domain, each useful
 * pair has one delay (Béal, Carton, Prieur & Sakarovitch, "Squaring transducers", 2003), so the
 * search is finite; otherwise a witness exists and breadth-first order reaches it.
 */
function outputConflict(m1: StrMachine, m2: StrMachine, limit: number): Label[] | null {
  const n2 = m2.arcs.length;
  const useful = usefulPairs(m1, m2);
  const startPair = m1.start * n2 + m2.start;
  if (!useful.has(startPair)) return null;
  const seen = new Map<string, number>();
  const nodes: { pq: number; d: Delay; parent: number; label: Label }[] = [];
  const push = (pq: number, d: Delay, parent: number, label: Label): void => {
    const key = `${pq}|${delayKey(d)}`;
    if (seen.has(key)) return;
    if (nodes.length >= limit) throw new FstLimitError("the output comparison", limit);
    seen.set(key, nodes.length);
    nodes.push({ pq, d, parent, label });
  };
  const path = (k: number): Label[] => {
    const w: Label[] = [];
    for (let x = k; x > 0; x = (nodes[x] as { parent: number }).parent) w.push((nodes[x] as { label: Label }).label);
    return w.reverse();
  };
  push(startPair, { ahead: 0, rest: [] }, -1, EPSILON);
  for (let k = 0; k < nodes.length; k++) {
    const { pq, d } = nodes[k] as { pq: number; d: Delay };
    const p = Math.floor(pq / n2);
    const q = pq % n2;
    for (const f1 of m1.finals[p] as Label[][]) {
      for (const f2 of m2.finals[q] as Label[][]) {
        const e = advance(d, f1, f2);
        if (e === null || e.ahead !== 0) return path(k);
      }
    }
    const arcs2 = (m2.arcs[q] as StrArc[]).slice().sort((x, y) => x.input - y.input);
    const arcs1 = (m1.arcs[p] as StrArc[]).slice().sort((x, y) => x.input - y.input);
    for (const a of arcs1) {
      for (const b of arcs2) {
        if (a.input !== b.input) continue;
        const t = a.target * n2 + b.target;
        if (!useful.has(t)) continue;
        push(t, advance(d, a.output, b.output), k, a.input);
      }
    }
  }
  return null;
}

/**
 * Functionality test: is there at most one output for every input? Runs the delay search of the
 * squared machine (the machine against itself) and returns an input with two outputs when not.
 */
export function isFunctional(fst: Fst, limit = 2_000_000): FunctionalityResult {
  const free = removeInputEpsilons(fst);
  if (!free.ok) return { functional: false, input: witnessThrough(free.trimmed, free.state) };
  const w = outputConflict(free.machine, free.machine, limit);
  return w === null ? { functional: true } : { functional: false, input: w };
}

/** An input on which two machines differ, with the outputs of each (sorted; for acceptors [input] or []). */
export interface Difference {
  readonly input: readonly Label[];
  readonly outputsA: readonly (readonly Label[])[];
  readonly outputsB: readonly (readonly Label[])[];
}

/** Shortest (then least in label order) string accepted by exactly one of two acceptors, or null. */
function domainDifference(a: Fst, b: Fst): Label[] | null {
  const da = determinise(a);
  const db = determinise(b);
  const ra = sortedArcs(da, "input");
  const rb = sortedArcs(db, "input");
  const nb = db.numStates + 1;
  const seen = new Map<number, number>();
  const nodes: { p: number; q: number; parent: number; label: Label }[] = [];
  const push = (p: number, q: number, parent: number, label: Label): void => {
    const key = (p + 1) * nb + (q + 1);
    if (seen.has(key)) return;
    seen.set(key, nodes.length);
    nodes.push({ p, q, parent, label });
  };
  push(da.start, db.start, -1, EPSILON);
  for (let k = 0; k < nodes.length; k++) {
    const { p, q } = nodes[k] as { p: number; q: number };
    const fa = p >= 0 && da.isFinal(p);
    const fb = q >= 0 && db.isFinal(q);
    if (fa !== fb) {
      const w: Label[] = [];
      for (let x = k; x > 0; x = (nodes[x] as { parent: number }).parent) w.push((nodes[x] as { label: Label }).label);
      return w.reverse();
    }
    const labels = new Set<number>();
    if (p >= 0) for (let i = ra.first[p] as number; i < (ra.first[p + 1] as number); i++) labels.add(ra.input[i] as number);
    if (q >= 0) for (let i = rb.first[q] as number; i < (rb.first[q + 1] as number); i++) labels.add(rb.input[i] as number);
    for (const x of [...labels].sort((u, v) => u - v)) {
      push(p >= 0 ? step(ra, p, x) : -1, q >= 0 ? step(rb, q, x) : -1, k, x);
    }
  }
  return null;
}

/**
 * The shortest input on which `a` and `b` differ, or null when they are equivalent. Acceptors
 * differ on a string one accepts and the other does not (product of the two subset
 * constructions, breadth-first, labels ascending: the shortest, then least, such string).
 * Transducers must be functional (FstError otherwise): they differ where exactly one accepts the
 * input, or where both do with different outputs (the delay search above); the shorter witness
 * is returned.
 */
export function shortestDifference(a: Fst, b: Fst, limit = 2_000_000): Difference | null {
  const acceptors = a.isAcceptor() && b.isAcceptor();
  const dom = domainDifference(project(a, "input"), project(b, "input"));
  let input = dom;
  if (!acceptors) {
    for (const [name, m] of [["first", a], ["second", b]] as const) {
      const f = isFunctional(m, limit);
      if (!f.functional) {
        throw new FstError(`shortestDifference compares functional transducers; the ${name} machine has two outputs for input [${f.input.join(" ")}]`);
      }
    }
    const fa = removeInputEpsilons(a);
    const fb = removeInputEpsilons(b);
    if (fa.ok && fb.ok) {
      const out = outputConflict(fa.machine, fb.machine, limit);
      if (out !== null && (input === null || out.length < input.length)) input = out;
    }
  }
  if (input === null) return null;
  return { input, outputsA: applyAll(a, input, 2).outputs, outputsB: applyAll(b, input, 2).outputs };
}

/** Equivalence of two acceptors, or of two functional transducers (same domain, same outputs). */
export function equivalent(a: Fst, b: Fst): boolean {
  return shortestDifference(a, b) === null;
}
