// The minimal DFA of an acceptor given as typed arc arrays, in canonical state order: the working
// core of `minimise` (acceptors, and transducers as acceptors over input:output pairs). Every step
// works on typed arrays (no arc objects, no string keys per arc), so that minimising after each
// composition of a cascade costs milliseconds, not the composition's tens of milliseconds.

import { FstLimitError } from "./compose.js";

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
  if (top > 4 * m + 1024) return Int32Array.from({ length: m }, (_, k) => k).sort((a, b) => labels[a]! - labels[b]! || a - b);
  const first = new Int32Array(top + 2);
  for (let k = 0; k < m; k++) first[labels[k]! + 1]!++;
  for (let l = 0; l <= top; l++) first[l + 1]! += first[l]!;
  const order = new Int32Array(m);
  for (let k = 0; k < m; k++) order[first[labels[k]!]!++] = k;
  return order;
}

/** Arc indices grouped by tail state (compressed rows), each row in arc order. */
function rowsOf(n: number, tails: Int32Array): { first: Int32Array; arc: Int32Array } {
  const first = new Int32Array(n + 1);
  for (let k = 0; k < tails.length; k++) first[tails[k]! + 1]!++;
  for (let s = 0; s < n; s++) first[s + 1]! += first[s]!;
  const fill = first.slice(0, n);
  const arc = new Int32Array(tails.length);
  for (let k = 0; k < tails.length; k++) arc[fill[tails[k]!]!++] = k;
  return { first, arc };
}

/** True when no arc reads ε and no state has two arcs with one label. */
function deterministic(a: ArcArrays, first: Int32Array, arc: Int32Array): boolean {
  const seen = new Int32Array(maxLabel(a.labels) + 1).fill(-1);
  for (let s = 0; s < a.states; s++) {
    for (let i = first[s]!; i < first[s + 1]!; i++) {
      const l = a.labels[arc[i]!]!;
      if (l === 0 || seen[l] === s) return false;
      seen[l] = s;
    }
  }
  return true;
}

function maxLabel(labels: Int32Array): number {
  let m = 0;
  for (let k = 0; k < labels.length; k++) if (labels[k]! > m) m = labels[k]!;
  return m;
}

/** A growable Int32 list. */
class IntList {
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
 * ε-closed, as after closure-based ε-removal). A deterministic input is taken as it is.
 */
function subsets(a: ArcArrays, options: MinimalDfaOptions): Dfa {
  const n = a.states;
  const { first, arc } = rowsOf(n, a.tails);
  if (deterministic(a, first, arc)) {
    // Rows in ascending label order; states as they are (the inaccessible ones are trimmed later).
    const tails = new Int32Array(a.tails.length);
    const labels = new Int32Array(a.tails.length);
    const heads = new Int32Array(a.tails.length);
    let k = 0;
    const row: number[] = [];
    for (let s = 0; s < n; s++) {
      row.length = 0;
      for (let i = first[s]!; i < first[s + 1]!; i++) row.push(arc[i]!);
      row.sort((x, y) => a.labels[x]! - a.labels[y]!);
      for (const j of row) {
        tails[k] = s;
        labels[k] = a.labels[j]!;
        heads[k] = a.heads[j]!;
        k++;
      }
    }
    return { states: n, start: a.start, final: a.final, tails, labels, heads };
  }
  const maxStates = options.maxStates ?? 2_000_000;
  const mark = new Int32Array(n).fill(-1);
  let stamp = 0;
  /** Sorts `set` ascending after adding every state reachable by ε arcs. */
  const close = (set: number[]): number[] => {
    stamp++;
    for (const s of set) mark[s] = stamp;
    for (let k = 0; k < set.length; k++) {
      const s = set[k]!;
      for (let i = first[s]!; i < first[s + 1]!; i++) {
        const j = arc[i]!;
        if (a.labels[j] !== 0) continue;
        const t = a.heads[j]!;
        if (mark[t] !== stamp) {
          mark[t] = stamp;
          set.push(t);
        }
      }
    }
    return set.sort((x, y) => x - y);
  };
  const ids = new Map<string, number>();
  const members: number[][] = [];
  const final: number[] = [];
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
  const pairs: number[] = [];
  const order: number[] = [];
  for (let id = 0; id < members.length; id++) {
    pairs.length = 0;
    for (const s of members[id]!) {
      for (let i = first[s]!; i < first[s + 1]!; i++) {
        const j = arc[i]!;
        if (a.labels[j] !== 0) pairs.push(a.labels[j]!, a.heads[j]!);
      }
    }
    order.length = 0;
    for (let k = 0; k < pairs.length; k += 2) order.push(k);
    order.sort((x, y) => pairs[x]! - pairs[y]! || pairs[x + 1]! - pairs[y + 1]!);
    let k = 0;
    while (k < order.length) {
      const label = pairs[order[k]!]!;
      const targets: number[] = [];
      for (; k < order.length && pairs[order[k]!] === label; k++) {
        const t = pairs[order[k]! + 1]!;
        if (targets[targets.length - 1] !== t) targets.push(t);
      }
      const to = idOf(close(targets));
      tails.push(id);
      labels.push(label);
      heads.push(to);
    }
  }
  return {
    states: members.length, start: 0, final: Uint8Array.from(final),
    tails: tails.view(), labels: labels.view(), heads: heads.view(),
  };
}

/** The states that are accessible from the start and co-accessible to a final state. */
function useful(d: Dfa): Uint8Array {
  const n = d.states;
  const fwd = rowsOf(n, d.tails);
  const acc = new Uint8Array(n);
  const stack = [d.start];
  acc[d.start] = 1;
  while (stack.length > 0) {
    const s = stack.pop()!;
    for (let i = fwd.first[s]!; i < fwd.first[s + 1]!; i++) {
      const t = d.heads[fwd.arc[i]!]!;
      if (acc[t] === 0) { acc[t] = 1; stack.push(t); }
    }
  }
  const back = rowsOf(n, d.heads);
  const co = new Uint8Array(n);
  for (let s = 0; s < n; s++) if (d.final[s] === 1 && acc[s] === 1) { co[s] = 1; stack.push(s); }
  while (stack.length > 0) {
    const s = stack.pop()!;
    for (let i = back.first[s]!; i < back.first[s + 1]!; i++) {
      const p = d.tails[back.arc[i]!]!;
      if (co[p] === 0 && acc[p] === 1) { co[p] = 1; stack.push(p); }
    }
  }
  return co;
}

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
  if (a.states === 0) return { states: 1, final: new Uint8Array(1), first: new Int32Array(2), label: new Int32Array(0), target: new Int32Array(0) };
  const d = subsets(a, options);
  const keep = useful(d);
  if (keep[d.start] === 0) return { states: 1, final: new Uint8Array(1), first: new Int32Array(2), label: new Int32Array(0), target: new Int32Array(0) };
  // Renumber the useful states (in order) and keep the arcs between them (rows stay by label).
  const map = new Int32Array(d.states).fill(-1);
  let n = 0;
  for (let s = 0; s < d.states; s++) if (keep[s] === 1) map[s] = n++;
  let m = 0;
  for (let k = 0; k < d.tails.length; k++) if (map[d.tails[k]!]! >= 0 && map[d.heads[k]!]! >= 0) m++;
  const tails = new Int32Array(m);
  const labels = new Int32Array(m);
  const heads = new Int32Array(m);
  m = 0;
  for (let k = 0; k < d.tails.length; k++) {
    const t = map[d.tails[k]!]!, h = map[d.heads[k]!]!;
    if (t < 0 || h < 0) continue;
    tails[m] = t;
    labels[m] = d.labels[k]!;
    heads[m] = h;
    m++;
  }
  const finalClass = new Int32Array(n).fill(-1);
  for (let s = 0; s < d.states; s++) if (keep[s] === 1 && d.final[s] === 1) finalClass[map[s]!] = 0;
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
  const startBlock = block[map[d.start]!]!;
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
