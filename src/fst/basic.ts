// The rational operations that need no search: union, concatenation, closures, inversion,
// projection, reversal, trimming and emptiness. All pure: each returns a new machine.

import { EPSILON, Fst, expandFinalOutputs, type Label, type StateId } from "./fst.js";

/** Copies `src` into `dst` (states appended) and returns the offset added to its state numbers. */
function copyInto(dst: Fst, src: Fst): number {
  const off = dst.numStates;
  dst.addStates(src.numStates);
  for (let s = 0; s < src.numStates; s++) {
    for (const a of src.arcs(s)) dst.addArc(s + off, a.input, a.output, a.target + off);
    const f = src.finalOutput(s);
    if (f !== undefined) dst.setFinal(s + off, f);
  }
  return off;
}

/** Union: a new start state with ε-arcs to the start of every operand (in argument order). */
export function union(...machines: Fst[]): Fst {
  const r = new Fst();
  const start = r.addState();
  for (const m of machines) {
    if (m.numStates === 0) continue;
    const off = copyInto(r, m);
    r.addArc(start, EPSILON, EPSILON, m.start + off);
  }
  return r;
}

/** Concatenation: ε-arcs from the final states of each operand to the start of the next. */
export function concat(...machines: Fst[]): Fst {
  if (machines.length === 0) {
    const r = new Fst();
    r.setFinal(r.addState());
    return r;
  }
  const parts = machines.map(expandFinalOutputs);
  const r = new Fst();
  if (parts.some((p) => p.numStates === 0)) {
    r.addState();
    return r;
  }
  let prevFinals: StateId[] = [];
  parts.forEach((p, k) => {
    const off = copyInto(r, p);
    if (k === 0) r.setStart(p.start + off);
    for (const f of prevFinals) {
      r.clearFinal(f);
      r.addArc(f, EPSILON, EPSILON, p.start + off);
    }
    prevFinals = [];
    for (let s = 0; s < p.numStates; s++) if (p.isFinal(s)) prevFinals.push(s + off);
  });
  return r;
}

/** Kleene closure `kind`: "*" (zero or more), "+" (one or more) or "?" (zero or one). */
export function closure(fst: Fst, kind: "*" | "+" | "?"): Fst {
  const m = expandFinalOutputs(fst);
  const r = new Fst();
  const start = r.addState();
  if (kind !== "+") r.setFinal(start);
  if (m.numStates === 0) return r;
  const off = copyInto(r, m);
  r.addArc(start, EPSILON, EPSILON, m.start + off);
  if (kind !== "?") {
    for (let s = 0; s < m.numStates; s++) {
      if (m.isFinal(s)) r.addArc(s + off, EPSILON, EPSILON, m.start + off);
    }
  }
  return r;
}

export const star = (fst: Fst): Fst => closure(fst, "*");
export const plus = (fst: Fst): Fst => closure(fst, "+");
export const optional = (fst: Fst): Fst => closure(fst, "?");

/** Maps every arc through `f` (final outputs are expanded into arcs first). */
export function mapArcs(fst: Fst, f: (input: Label, output: Label) => [Label, Label]): Fst {
  const m = expandFinalOutputs(fst);
  const r = new Fst();
  r.addStates(m.numStates);
  if (m.numStates > 0) r.setStart(m.start);
  for (let s = 0; s < m.numStates; s++) {
    for (const a of m.arcs(s)) {
      const [i, o] = f(a.input, a.output);
      r.addArc(s, i, o, a.target);
    }
    if (m.isFinal(s)) r.setFinal(s);
  }
  return r;
}

/** Inversion: swaps input and output on every arc. */
export const invert = (fst: Fst): Fst => mapArcs(fst, (i, o) => [o, i]);

/** Projection onto one side: the acceptor of the input (or output) language. */
export const project = (fst: Fst, side: "input" | "output"): Fst =>
  mapArcs(fst, side === "input" ? (i) => [i, i] : (_i, o) => [o, o]);

/**
 * Reversal: the relation {(rev x, rev y)}. A new start state with ε-arcs to the old final
 * states; the old start state becomes the only final state.
 */
export function reverse(fst: Fst): Fst {
  const m = expandFinalOutputs(fst);
  const r = new Fst();
  const start = r.addState();
  if (m.numStates === 0) return r;
  r.addStates(m.numStates);
  for (let s = 0; s < m.numStates; s++) {
    for (const a of m.arcs(s)) r.addArc(a.target + 1, a.input, a.output, s + 1);
    if (m.isFinal(s)) r.addArc(start, EPSILON, EPSILON, s + 1);
  }
  r.setFinal(m.start + 1);
  return r;
}

/** States reachable from the start state. */
export function accessible(fst: Fst): Uint8Array {
  const seen = new Uint8Array(fst.numStates);
  if (fst.numStates === 0) return seen;
  const stack = [fst.start];
  seen[fst.start] = 1;
  while (stack.length > 0) {
    const s = stack.pop() as StateId;
    for (const a of fst.arcs(s)) {
      if (seen[a.target] === 0) {
        seen[a.target] = 1;
        stack.push(a.target);
      }
    }
  }
  return seen;
}

/** States from which a final state can be reached. */
export function coaccessible(fst: Fst): Uint8Array {
  const n = fst.numStates;
  const predFirst = new Int32Array(n + 1);
  for (let s = 0; s < n; s++) for (const a of fst.arcs(s)) predFirst[a.target + 1]++;
  for (let s = 0; s < n; s++) (predFirst[s + 1] as number) += predFirst[s] as number;
  const fill = predFirst.slice(0, n);
  const preds = new Int32Array(predFirst[n] as number);
  for (let s = 0; s < n; s++) for (const a of fst.arcs(s)) preds[(fill[a.target] as number)++] = s;
  const seen = new Uint8Array(n);
  const stack: number[] = [];
  for (let s = 0; s < n; s++) {
    if (fst.isFinal(s)) {
      seen[s] = 1;
      stack.push(s);
    }
  }
  while (stack.length > 0) {
    const s = stack.pop() as number;
    for (let k = predFirst[s] as number; k < (predFirst[s + 1] as number); k++) {
      const p = preds[k] as number;
      if (seen[p] === 0) {
        seen[p] = 1;
        stack.push(p);
      }
    }
  }
  return seen;
}

/**
 * Trimming: keeps the states that are both accessible and co-accessible, in their original
 * order. The start state is always kept (a machine of one non-final state is the empty relation).
 */
export function trim(fst: Fst): Fst {
  if (fst.numStates === 0) return keepStates(fst, new Uint8Array(0));
  const acc = accessible(fst);
  const co = coaccessible(fst);
  const keep = new Uint8Array(fst.numStates);
  for (let s = 0; s < fst.numStates; s++) keep[s] = acc[s] === 1 && co[s] === 1 ? 1 : 0;
  keep[fst.start] = 1;
  return keepStates(fst, keep);
}

/** The sub-machine on the states marked in `keep`, renumbered in order. */
export function keepStates(fst: Fst, keep: Uint8Array): Fst {
  const r = new Fst();
  if (fst.numStates === 0) {
    r.addState();
    return r;
  }
  const map = new Int32Array(fst.numStates).fill(-1);
  for (let s = 0; s < fst.numStates; s++) if (keep[s] === 1) map[s] = r.addState();
  r.setStart(map[fst.start] as number);
  for (let s = 0; s < fst.numStates; s++) {
    const from = map[s] as number;
    if (from < 0) continue;
    for (const a of fst.arcs(s)) {
      const to = map[a.target] as number;
      if (to >= 0) r.addArc(from, a.input, a.output, to);
    }
    const f = fst.finalOutput(s);
    if (f !== undefined) r.setFinal(from, f);
  }
  return r;
}

/** True when the machine accepts nothing (no final state is reachable from the start). */
export function isEmpty(fst: Fst): boolean {
  if (fst.numStates === 0) return true;
  const acc = accessible(fst);
  for (let s = 0; s < fst.numStates; s++) if (acc[s] === 1 && fst.isFinal(s)) return false;
  return true;
}

/** Renumbers states in breadth-first order from the start, arcs visited in sorted order. */
export function canonicalOrder(fst: Fst): Fst {
  if (fst.numStates === 0) return fst.clone();
  const sorted = fst.clone();
  sorted.sortArcs("input");
  const map = new Int32Array(fst.numStates).fill(-1);
  const order: number[] = [fst.start];
  map[fst.start] = 0;
  for (let k = 0; k < order.length; k++) {
    for (const a of sorted.arcs(order[k] as number)) {
      if (map[a.target] === -1) {
        map[a.target] = order.length;
        order.push(a.target);
      }
    }
  }
  for (let s = 0; s < fst.numStates; s++) {
    if (map[s] === -1) {
      map[s] = order.length;
      order.push(s);
    }
  }
  const r = new Fst();
  r.addStates(order.length);
  r.setStart(0);
  for (const s of order) {
    for (const a of sorted.arcs(s)) r.addArc(map[s] as number, a.input, a.output, map[a.target] as number);
    const f = fst.finalOutput(s);
    if (f !== undefined) r.setFinal(map[s] as number, f);
  }
  return r;
}
