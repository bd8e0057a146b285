// A transducer as flat typed arrays (one entry per arc, arcs grouped by source state in order):
// the form composition writes and minimisation reads, so that a cascade's composition followed by
// minimisation builds no arc objects in between.

import { Fst } from "./fst.js";

/** Arc k goes from `tails[k]` to `heads[k]`, reading `inputs[k]` and writing `outputs[k]` (0 is ε); tails ascend. No final outputs. */
export interface ArcTable {
  readonly states: number;
  readonly start: number;
  readonly final: Uint8Array;
  readonly tails: Int32Array;
  readonly inputs: Int32Array;
  readonly outputs: Int32Array;
  readonly heads: Int32Array;
}

/** A growable Int32 list. */
export class IntList {
  data = new Int32Array(64);
  length = 0;
  push(x: number): void {
    if (this.length === this.data.length) {
      const d = new Int32Array(this.data.length * 2);
      d.set(this.data);
      this.data = d;
    }
    this.data[this.length++] = x;
  }
  view(): Int32Array {
    return this.data.subarray(0, this.length);
  }
}

/** The arcs of a machine without final outputs (callers expand them first), state by state. */
export function tableOf(fst: Fst): ArcTable {
  const n = fst.numStates;
  const m = fst.numArcs();
  const tails = new Int32Array(m);
  const inputs = new Int32Array(m);
  const outputs = new Int32Array(m);
  const heads = new Int32Array(m);
  const final = new Uint8Array(n);
  let k = 0;
  for (let s = 0; s < n; s++) {
    for (const a of fst.arcs(s)) {
      tails[k] = s;
      inputs[k] = a.input;
      outputs[k] = a.output;
      heads[k] = a.target;
      k++;
    }
    if (fst.isFinal(s)) final[s] = 1;
  }
  return { states: n, start: n > 0 ? fst.start : 0, final, tails, inputs, outputs, heads };
}

/** The table as a machine (same states and arcs in the same order). */
export function fstOf(t: ArcTable): Fst {
  const r = new Fst();
  r.addStates(Math.max(1, t.states));
  r.setStart(t.start);
  for (let k = 0; k < t.tails.length; k++) r.addArc(t.tails[k]!, t.inputs[k]!, t.outputs[k]!, t.heads[k]!);
  for (let s = 0; s < t.states; s++) if (t.final[s] === 1) r.setFinal(s);
  return r;
}

/** Arc indices grouped by `by[k]` (compressed rows over 0 … n-1), each row in arc order. */
export function rowsOf(n: number, by: Int32Array): { first: Int32Array; arc: Int32Array } {
  const first = new Int32Array(n + 1);
  for (let k = 0; k < by.length; k++) first[by[k]! + 1]!++;
  for (let s = 0; s < n; s++) first[s + 1]! += first[s]!;
  const fill = first.slice(0, n);
  const arc = new Int32Array(by.length);
  for (let k = 0; k < by.length; k++) arc[fill[by[k]!]!++] = k;
  return { first, arc };
}

/**
 * The states accessible from `start` and co-accessible to a final state (`start` is always kept),
 * as `trim` in basic.ts decides them.
 */
export function usefulStates(n: number, start: number, final: Uint8Array, tails: Int32Array, heads: Int32Array): Uint8Array {
  const keep = new Uint8Array(n);
  if (n === 0) return keep;
  const fwd = rowsOf(n, tails);
  const acc = new Uint8Array(n);
  const stack = [start];
  acc[start] = 1;
  while (stack.length > 0) {
    const s = stack.pop()!;
    for (let i = fwd.first[s]!; i < fwd.first[s + 1]!; i++) {
      const t = heads[fwd.arc[i]!]!;
      if (acc[t] === 0) { acc[t] = 1; stack.push(t); }
    }
  }
  const back = rowsOf(n, heads);
  for (let s = 0; s < n; s++) if (final[s] === 1) { keep[s] = 1; stack.push(s); }
  while (stack.length > 0) {
    const s = stack.pop()!;
    for (let i = back.first[s]!; i < back.first[s + 1]!; i++) {
      const p = tails[back.arc[i]!]!;
      if (keep[p] === 0) { keep[p] = 1; stack.push(p); }
    }
  }
  for (let s = 0; s < n; s++) keep[s] &= acc[s]!;
  keep[start] = 1;
  return keep;
}

/** Trimming (basic.ts `trim`) of a table: the useful states renumbered in order, the arcs between them in order. */
export function trimTable(t: ArcTable): ArcTable {
  if (t.states === 0) return { ...t, states: 1, start: 0, final: new Uint8Array(1) };
  const keep = usefulStates(t.states, t.start, t.final, t.tails, t.heads);
  const map = new Int32Array(t.states).fill(-1);
  let n = 0;
  for (let s = 0; s < t.states; s++) if (keep[s] === 1) map[s] = n++;
  if (n === t.states) return t;
  let m = 0;
  for (let k = 0; k < t.tails.length; k++) if (map[t.tails[k]!]! >= 0 && map[t.heads[k]!]! >= 0) m++;
  const tails = new Int32Array(m), inputs = new Int32Array(m), outputs = new Int32Array(m), heads = new Int32Array(m);
  m = 0;
  for (let k = 0; k < t.tails.length; k++) {
    const a = map[t.tails[k]!]!, b = map[t.heads[k]!]!;
    if (a < 0 || b < 0) continue;
    tails[m] = a;
    inputs[m] = t.inputs[k]!;
    outputs[m] = t.outputs[k]!;
    heads[m] = b;
    m++;
  }
  const final = new Uint8Array(n);
  for (let s = 0; s < t.states; s++) if (keep[s] === 1 && t.final[s] === 1) final[map[s]!] = 1;
  return { states: n, start: map[t.start]!, final, tails, inputs, outputs, heads };
}

/** Typed-array arc lists (compressed sparse rows), sorted by one side. */
export interface SortedArcs {
  /** Arcs of state s are at first[s] … first[s+1]-1. */
  readonly first: Int32Array;
  readonly input: Int32Array;
  readonly output: Int32Array;
  readonly target: Int32Array;
}

/** `order` stably re-sorted by `keys[order[i]]` (a counting pass; a comparison sort when the keys are sparse). */
function stableBy(order: Int32Array, keys: Int32Array): Int32Array {
  let top = 0;
  for (let k = 0; k < keys.length; k++) if (keys[k]! > top) top = keys[k]!;
  if (top > 4 * keys.length + 1024) {
    const rank = new Int32Array(order.length);
    order.forEach((k, i) => { rank[k] = i; });
    return Int32Array.from(order).sort((x, y) => keys[x]! - keys[y]! || rank[x]! - rank[y]!);
  }
  const first = new Int32Array(top + 2);
  for (let k = 0; k < keys.length; k++) first[keys[k]! + 1]!++;
  for (let l = 0; l <= top; l++) first[l + 1]! += first[l]!;
  const out = new Int32Array(order.length);
  for (let i = 0; i < order.length; i++) { const k = order[i]!; out[first[keys[k]!]!++] = k; }
  return out;
}

/**
 * The table's arcs as rows sorted like `sortedArcs` (compose.ts): by (input, output, target) or by
 * (output, input, target) — least significant key first, in stable counting passes.
 */
export function sortedRows(t: ArcTable, by: "input" | "output"): SortedArcs {
  const m = t.tails.length;
  let order: Int32Array = new Int32Array(m);
  for (let k = 0; k < m; k++) order[k] = k;
  order = stableBy(order, t.heads);
  order = stableBy(order, by === "input" ? t.outputs : t.inputs);
  order = stableBy(order, by === "input" ? t.inputs : t.outputs);
  order = stableBy(order, t.tails);
  const first = new Int32Array(t.states + 1);
  for (let k = 0; k < m; k++) first[t.tails[k]! + 1]!++;
  for (let s = 0; s < t.states; s++) first[s + 1]! += first[s]!;
  const input = new Int32Array(m), output = new Int32Array(m), target = new Int32Array(m);
  for (let i = 0; i < m; i++) {
    const k = order[i]!;
    input[i] = t.inputs[k]!;
    output[i] = t.outputs[k]!;
    target[i] = t.heads[k]!;
  }
  return { first, input, output, target };
}
