// The minimal DFA of an acceptor given as typed arc arrays, in canonical state order: the working
// core of `minimise` (acceptors, and transducers as acceptors over input:output pairs). Every step
// works on typed arrays (no arc objects, no string keys per arc), so that minimising after each
// composition of a cascade costs milliseconds, not the composition's tens of milliseconds.

import { FstLimitError } from "./compose.js";
import { IntList, rowsOf, trimTable } from "./table.js";

/** An acceptor as arrays: arc k goes from `tails[k]` to `heads[k]` reading `labels[k]` (0 is ε). */
export interface ArcArrays {
  readonly states: number;
  readonly start: number;
  readonly final: Uint8Array;
  readonly tails: Int32Array;
  readonly labels: Int32Array;
  readonly heads: Int32Array;
}

/** A DFA in canonical form: state 0 is the start; arcs of state s at first[s] … first[s+1]-1, by ascending label. */
export interface CanonicalDfa {
  readonly states: number;
  readonly final: Uint8Array;
  readonly first: Int32Array;
  readonly label: Int32Array;
  readonly target: Int32Array;
}

export interface MinimalDfaOptions {
  /** Subset states allowed when the input is not deterministic (FstLimitError "determinisation" beyond). */
  readonly maxStates?: number;
  /** Called once per subset state made when the input is not deterministic. */
  readonly progress?: () => void;
}

/** A refinable partition of 0 … n-1 (Valmari & Lehtinen 2008). */
class Partition {
  z: number;
  readonly E: Int32Array;
  readonly L: Int32Array;
  readonly S: Int32Array;
  readonly F: Int32Array;
  readonly P: Int32Array;
  readonly M: Int32Array;
  readonly W: Int32Array;
  w = 0;
  constructor(n: number) {
    this.z = n > 0 ? 1 : 0;
    this.E = new Int32Array(n);
    this.L = new Int32Array(n);
    this.S = new Int32Array(n);
    this.F = new Int32Array(n + 1);
    this.P = new Int32Array(n + 1);
    this.M = new Int32Array(n + 1);
    this.W = new Int32Array(n + 1);
    for (let i = 0; i < n; i++) {
      this.E[i] = i;
      this.L[i] = i;
    }
    this.P[0] = n;
  }
  mark(e: number): void {
    const { E, L, S, F, M } = this;
    const s = S[e] as number;
    const i = L[e] as number;
    const j = (F[s] as number) + (M[s] as number);
    E[i] = E[j] as number;
    L[E[i] as number] = i;
    E[j] = e;
    L[e] = j;
    if ((M[s] as number) === 0) this.W[this.w++] = s;
    M[s] = (M[s] as number) + 1;
  }
  split(): void {
    const { E, S, F, P, M } = this;
    while (this.w > 0) {
      const s = this.W[--this.w] as number;
      const j = (F[s] as number) + (M[s] as number);
      if (j === P[s]) {
        M[s] = 0;
        continue;
      }
      const z = this.z;
      // The smaller part becomes the new set: Hopcroft's "process the smaller half".
      if ((M[s] as number) <= (P[s] as number) - j) {
        F[z] = F[s] as number;
        P[z] = j;
        F[s] = j;
      } else {
        P[z] = P[s] as number;
        F[z] = j;
        P[s] = j;
      }
      for (let i = F[z] as number; i < (P[z] as number); i++) S[E[i] as number] = z;
      M[s] = 0;
      M[z] = 0;
      this.z++;
    }
  }
}

/**
 * The coarsest partition of the states of a deterministic machine (every state accessible and
 * co-accessible) that respects `finalClass` (-1: not final; states with different classes are
 * never merged) and the transitions (tail, label, head). Returns the block of each state.
 * O(m log n) (Valmari & Lehtinen, "Efficient minimization of DFAs with partial transition
 * functions", 2008, which refines Hopcroft 1971).
 */
export function coarsestPartition(
  n: number,
  tails: Int32Array,
  labels: Int32Array,
  heads: Int32Array,
  finalClass: Int32Array,
): Int32Array {
  const m = tails.length;
  const B = new Partition(n);
  const classes = [...new Set(finalClass)].filter((c) => c >= 0).sort((a, b) => a - b);
  for (const c of classes) {
    for (let s = 0; s < n; s++) if (finalClass[s] === c) B.mark(s);
    B.split();
  }
  // Cords: transitions grouped by label.
  const C = new Partition(m);
  const order = byLabel(labels);
  C.z = 0;
  for (let k = 0; k < m; k++) {
    const t = order[k] as number;
    C.E[k] = t;
    C.L[t] = k;
    if (k === 0 || labels[t] !== labels[order[k - 1] as number]) {
      if (C.z > 0) C.P[C.z - 1] = k;
      C.F[C.z] = k;
      C.z++;
    }
    C.S[t] = C.z - 1;
  }
  if (C.z > 0) C.P[C.z - 1] = m;
  // Incoming transitions of each state.
  const inFirst = new Int32Array(n + 1);
  for (let t = 0; t < m; t++) (inFirst[(heads[t] as number) + 1] as number)++;
  for (let s = 0; s < n; s++) inFirst[s + 1] = (inFirst[s + 1] as number) + (inFirst[s] as number);
  const fill = inFirst.slice(0, n);
  const inTr = new Int32Array(m);
  for (let t = 0; t < m; t++) inTr[(fill[heads[t] as number] as number)++] = t;

  let b = 1;
  let c = 0;
  while (c < C.z) {
    for (let i = C.F[c] as number; i < (C.P[c] as number); i++) B.mark(tails[C.E[i] as number] as number);
    B.split();
    c++;
    while (b < B.z) {
      for (let i = B.F[b] as number; i < (B.P[b] as number); i++) {
        const s = B.E[i] as number;
        for (let j = inFirst[s] as number; j < (inFirst[s + 1] as number); j++) C.mark(inTr[j] as number);
      }
      C.split();
      b++;
    }
  }
  return B.S.slice();
}

/** Arc indices ordered by (label, index): a counting sort when the labels are dense enough, else a comparison sort. */
function byLabel(labels: Int32Array): Int32Array {
  const m = labels.length;
  const top = maxLabel(labels);
  if (top > 4 * m + 1024) {
    const all = new Int32Array(m);
    for (let k = 0; k < m; k++) all[k] = k;
    return all.sort((a, b) => labels[a]! - labels[b]! || a - b);
  }
  const first = new Int32Array(top + 2);
  for (let k = 0; k < m; k++) first[labels[k]! + 1]!++;
  for (let l = 0; l <= top; l++) first[l + 1]! += first[l]!;
  const order = new Int32Array(m);
  for (let k = 0; k < m; k++) order[first[labels[k]!]!++] = k;
  return order;
}

function maxLabel(labels: Int32Array): number {
  let m = 0;
  for (let k = 0; k < labels.length; k++) if (labels[k]! > m) m = labels[k]!;
  return m;
}

/** Arc indices grouped by tail (compressed rows), each row by ascending (label, index): two stable counting passes. */
function rowsByLabel(n: number, tails: Int32Array, labels: Int32Array): { first: Int32Array; arc: Int32Array } {
  const order = byLabel(labels);
  const first = new Int32Array(n + 1);
  for (let k = 0; k < tails.length; k++) first[tails[k]! + 1]!++;
  for (let s = 0; s < n; s++) first[s + 1]! += first[s]!;
  const fill = first.slice(0, n);
  const arc = new Int32Array(tails.length);
  for (let i = 0; i < order.length; i++) {
    const k = order[i]!;
    arc[fill[tails[k]!]!++] = k;
  }
  return { first, arc };
}

/** A DFA (arcs by ascending label per state, every state accessible) of the same language. */
interface Dfa {
  states: number;
  start: number;
  final: Uint8Array;
  tails: Int32Array;
  labels: Int32Array;
  heads: Int32Array;
}

/**
 * The subset construction (Rabin & Scott 1959) with ε-closures taken on the fly (each subset is
 * ε-closed, as after closure-based ε-removal). A deterministic input is taken as it is (arcs put
 * in label order; its inaccessible states are trimmed afterwards).
 */
function subsets(a: ArcArrays, options: MinimalDfaOptions): Dfa {
  const n = a.states;
  const { first, arc } = rowsByLabel(n, a.tails, a.labels);
  let det = true;
  let epsilons = false;
  for (let s = 0; s < n && det; s++) {
    for (let i = first[s]!; i < first[s + 1]!; i++) {
      const l = a.labels[arc[i]!]!;
      if (l === 0) epsilons = true;
      if (l === 0 || (i > first[s]! && a.labels[arc[i - 1]!] === l)) { det = false; break; }
    }
  }
  if (det) {
    return { states: n, start: a.start, final: a.final, tails: gather(a.tails, arc), labels: gather(a.labels, arc), heads: gather(a.heads, arc) };
  }
  if (!epsilons) for (let k = 0; k < a.labels.length && !epsilons; k++) epsilons = a.labels[k] === 0;
  const maxStates = options.maxStates ?? 2_000_000;
  const mark = new Int32Array(n).fill(-1);
  let stamp = 0;
  /** Adds every state reachable by ε arcs to `set` (ascending, distinct) and sorts it again. */
  const close = (set: number[]): number[] => {
    if (!epsilons) return set;
    stamp++;
    for (const s of set) mark[s] = stamp;
    const before = set.length;
    for (let k = 0; k < set.length; k++) {
      const s = set[k]!;
      // ε arcs come first in a row (label 0).
      for (let i = first[s]!; i < first[s + 1]! && a.labels[arc[i]!] === 0; i++) {
        const t = a.heads[arc[i]!]!;
        if (mark[t] !== stamp) {
          mark[t] = stamp;
          set.push(t);
        }
      }
    }
    return set.length === before ? set : set.sort((x, y) => x - y);
  };
  const ids = new Map<string, number>();
  const members: number[][] = [];
  const final = new IntList();
  const idOf = (set: number[]): number => {
    const key = set.length === 1 ? String(set[0]) : set.join(",");
    let id = ids.get(key);
    if (id === undefined) {
      id = members.length;
      if (id >= maxStates) throw new FstLimitError("determinisation", maxStates);
      options.progress?.();
      ids.set(key, id);
      members.push(set);
      let f = 0;
      for (const s of set) if (a.final[s] === 1) f = 1;
      final.push(f);
    }
    return id;
  };
  idOf(close([a.start]));
  const tails = new IntList();
  const labels = new IntList();
  const heads = new IntList();
  // (label, target) of the members' arcs as label·n + target, sorted numerically.
  let keys = new Float64Array(64);
  for (let id = 0; id < members.length; id++) {
    const set = members[id]!;
    let m = 0;
    for (const s of set) {
      for (let i = first[s]!; i < first[s + 1]!; i++) {
        const j = arc[i]!;
        const l = a.labels[j]!;
        if (l === 0) continue;
        if (m === keys.length) { const k2 = new Float64Array(m * 2); k2.set(keys); keys = k2; }
        keys[m++] = l * n + a.heads[j]!;
      }
    }
    // A single member's row is already by label; targets of one label need sorting only when several.
    const sorted = set.length === 1 ? keys.subarray(0, m) : keys.subarray(0, m).sort();
    let k = 0;
    while (k < m) {
      const label = Math.floor(sorted[k]! / n);
      const targets: number[] = [];
      for (; k < m && Math.floor(sorted[k]! / n) === label; k++) targets.push(sorted[k]! - label * n);
      if (targets.length > 1) {
        targets.sort((x, y) => x - y);
        let u = 1;
        for (let v = 1; v < targets.length; v++) if (targets[v] !== targets[u - 1]) targets[u++] = targets[v]!;
        targets.length = u;
      }
      const to = idOf(close(targets));
      tails.push(id);
      labels.push(label);
      heads.push(to);
    }
  }
  return {
    states: members.length, start: 0, final: Uint8Array.from(final.view()),
    tails: tails.view(), labels: labels.view(), heads: heads.view(),
  };
}

/** values[order[k]] for every k. */
function gather(values: Int32Array, order: Int32Array): Int32Array {
  const r = new Int32Array(order.length);
  for (let k = 0; k < order.length; k++) r[k] = values[order[k]!]!;
  return r;
}

const EMPTY: CanonicalDfa = { states: 1, final: new Uint8Array(1), first: new Int32Array(2), label: new Int32Array(0), target: new Int32Array(0) };

/**
 * The minimal DFA of the acceptor's language (its non-empty Myhill–Nerode classes), with states
 * numbered breadth-first from the start, arcs visited by ascending label, and each state's arcs in
 * ascending label order. This numbering depends on the language alone, so any two acceptors of
 * one language give equal arrays. An empty language gives one non-final state.
 *
 * Method: subset construction with on-the-fly ε-closures (a deterministic input is used as it is),
 * trimming, then Hopcroft's partition refinement (`coarsestPartition`, Valmari & Lehtinen 2008).
 */
export function minimalDfa(a: ArcArrays, options: MinimalDfaOptions = {}): CanonicalDfa {
  if (a.states === 0) return EMPTY;
  const d = subsets(a, options);
  // The useful states renumbered in order, with the arcs between them (rows stay by label).
  const t = trimTable({ states: d.states, start: d.start, final: d.final, tails: d.tails, inputs: d.labels, outputs: d.labels, heads: d.heads });
  const n = t.states;
  const { tails, inputs: labels, heads } = t;
  const m = tails.length;
  const finalClass = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) if (t.final[s] === 1) finalClass[s] = 0;
  // Only the start kept (trimming always keeps it) and not final: the empty language.
  if (!finalClass.includes(0)) return EMPTY;
  const block = coarsestPartition(n, tails, labels, heads, finalClass);
  // One representative per block, with its arcs (already by ascending label); breadth-first renumbering.
  const rows = rowsOf(n, tails);
  let blocks = 0;
  for (let s = 0; s < n; s++) if (block[s]! + 1 > blocks) blocks = block[s]! + 1;
  const rep = new Int32Array(blocks).fill(-1);
  for (let s = 0; s < n; s++) if (rep[block[s]!] === -1) rep[block[s]!] = s;
  const id = new Int32Array(blocks).fill(-1);
  const order = new Int32Array(blocks);
  let made = 0;
  const startBlock = block[t.start]!;
  id[startBlock] = made;
  order[made++] = startBlock;
  const first = new Int32Array(blocks + 1);
  const label = new Int32Array(m);
  const target = new Int32Array(m);
  let k = 0;
  for (let i = 0; i < made; i++) {
    const s = rep[order[i]!]!;
    for (let j = rows.first[s]!; j < rows.first[s + 1]!; j++) {
      const e = rows.arc[j]!;
      const b = block[heads[e]!]!;
      if (id[b] === -1) { id[b] = made; order[made++] = b; }
      label[k] = labels[e]!;
      target[k] = id[b]!;
      k++;
    }
    first[i + 1] = k;
  }
  const final = new Uint8Array(made);
  for (let i = 0; i < made; i++) if (finalClass[rep[order[i]!]!] === 0) final[i] = 1;
  return { states: made, final, first: first.subarray(0, made + 1), label: label.subarray(0, k), target: target.subarray(0, k) };
}
