// Minimisation: Hopcroft's partition refinement for deterministic acceptors (in the form of
// Valmari & Lehtinen for partial transition functions), and two documented methods for
// transducers (output pushing for sequential machines, pair encoding for the rest).

import { canonicalOrder, trim } from "./basic.js";
import { determinise, type DeterminiseOptions } from "./determinise.js";
import { addChain, removeInputEpsilons, type StrArc, type StrMachine } from "./epsilon.js";
import { EPSILON, Fst, expandFinalOutputs, type Label } from "./fst.js";

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
  const order = Array.from({ length: m }, (_, k) => k).sort((a, b) => (labels[a] as number) - (labels[b] as number) || a - b);
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

/** True when the machine has no ε-input arcs and at most one arc per input label and state. */
export function isDeterministic(fst: Fst): boolean {
  for (let s = 0; s < fst.numStates; s++) {
    const seen = new Set<number>();
    for (const a of fst.arcs(s)) {
      if (a.input === EPSILON || seen.has(a.input)) return false;
      seen.add(a.input);
    }
  }
  return true;
}

/**
 * True when the machine is sequential in chain form: every state either has no ε-input arc and
 * distinct input labels, or is a non-final chain state with exactly one arc, whose input is ε
 * (the form `determiniseTransducer` produces, where string outputs are chains).
 */
export function isSequential(fst: Fst): boolean {
  for (let s = 0; s < fst.numStates; s++) {
    const arcs = fst.arcs(s);
    if (arcs.some((a) => a.input === EPSILON)) {
      if (arcs.length !== 1 || fst.isFinal(s)) return false;
      continue;
    }
    const seen = new Set<number>();
    for (const a of arcs) {
      if (seen.has(a.input)) return false;
      seen.add(a.input);
    }
  }
  return true;
}

/** Minimal DFA of a trimmed deterministic string machine whose arcs are keyed by `code`. */
function minimiseStr(m: StrMachine, startOutput: readonly Label[]): Fst {
  const n = m.arcs.length;
  const codes = new Map<string, number>();
  const code = (k: string): number => {
    let c = codes.get(k);
    if (c === undefined) {
      c = codes.size;
      codes.set(k, c);
    }
    return c;
  };
  const tails: number[] = [];
  const labels: number[] = [];
  const heads: number[] = [];
  for (let s = 0; s < n; s++) {
    for (const a of m.arcs[s] as StrArc[]) {
      tails.push(s);
      labels.push(code(`${a.input}|${a.output.join(",")}`));
      heads.push(a.target);
    }
  }
  const finalCodes = new Map<string, number>();
  const finalClass = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) {
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f === undefined) continue;
    const k = f.join(",");
    let c = finalCodes.get(k);
    if (c === undefined) {
      c = finalCodes.size;
      finalCodes.set(k, c);
    }
    finalClass[s] = c;
  }
  const block = coarsestPartition(n, Int32Array.from(tails), Int32Array.from(labels), Int32Array.from(heads), finalClass);
  let blocks = 0;
  for (const b of block) blocks = Math.max(blocks, b + 1);
  const r = new Fst();
  r.addStates(blocks);
  const done = new Uint8Array(blocks);
  for (let s = 0; s < n; s++) {
    const b = block[s] as number;
    if (done[b] === 1) continue;
    done[b] = 1;
    for (const a of m.arcs[s] as StrArc[]) addChain(r, b, a.input, a.output, block[a.target] as number);
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f !== undefined) r.setFinal(b, f);
  }
  const start = block[m.start] as number;
  if (startOutput.length === 0) {
    r.setStart(start);
  } else {
    // Output written before any input is read: a fresh start state that copies the start
    // state's arcs and final output with that output in front (no ε-input chain is needed).
    const s0 = r.addState();
    r.setStart(s0);
    const rep = Array.from(block).indexOf(start);
    for (const a of m.arcs[rep] as StrArc[]) addChain(r, s0, a.input, [...startOutput, ...a.output], block[a.target] as number);
    const f = (m.finals[rep] as (readonly Label[])[])[0];
    if (f !== undefined) r.setFinal(s0, [...startOutput, ...f]);
  }
  return canonicalOrder(trim(r));
}

/**
 * Output pushing for a deterministic string machine (Mohri 1997/2000): P(q) is the longest common
 * prefix of every output written on a path from q to acceptance, computed as the greatest fixed
 * point of P(q) = lcp({final output of q} ∪ {o·P(r) | q -a:o→ r}). Every arc q -a:o→ r then writes
 * P(q)⁻¹·o·P(r), every final output f becomes P(q)⁻¹·f, and P(start) is written before anything
 * is read. The relation is unchanged and outputs are written as early as possible.
 */
function pushOutputs(m: StrMachine): { machine: StrMachine; startOutput: readonly Label[] } {
  const n = m.arcs.length;
  const P: (Label[] | undefined)[] = new Array<Label[] | undefined>(n).fill(undefined);
  const lcp = (a: Label[] | undefined, b: Label[]): Label[] => {
    if (a === undefined) return b;
    let k = 0;
    while (k < a.length && k < b.length && a[k] === b[k]) k++;
    return a.slice(0, k);
  };
  let changed = true;
  while (changed) {
    changed = false;
    for (let q = n - 1; q >= 0; q--) {
      let v: Label[] | undefined;
      const f = (m.finals[q] as (readonly Label[])[])[0];
      if (f !== undefined) v = f.slice();
      for (const a of m.arcs[q] as StrArc[]) {
        const pr = P[a.target];
        if (pr === undefined) continue;
        v = lcp(v, [...a.output, ...pr]);
      }
      const old = P[q];
      if (v !== undefined && (old === undefined || old.length !== v.length)) {
        P[q] = v;
        changed = true;
      }
    }
  }
  const arcs: StrArc[][] = [];
  const finals: (readonly Label[])[][] = [];
  for (let q = 0; q < n; q++) {
    const pq = (P[q] ?? []).length;
    arcs.push(
      (m.arcs[q] as StrArc[]).map((a) => ({
        input: a.input,
        output: [...a.output, ...(P[a.target] ?? [])].slice(pq),
        target: a.target,
      })),
    );
    finals.push((m.finals[q] as (readonly Label[])[]).map((f) => f.slice(pq)));
  }
  return { machine: { start: m.start, arcs, finals }, startOutput: P[m.start] ?? [] };
}

/**
 * Minimisation.
 * - Acceptors: subset construction when needed, trimming, then Hopcroft refinement. The result
 *   is the minimal partial DFA (its states are the non-empty Myhill–Nerode classes).
 * - Sequential transducers (`isSequential`): outputs are pushed toward the start, then each arc's
 *   (input, output string) pair and each final output are treated as letters of an acceptor and
 *   refined by Hopcroft — the minimal sequential transducer (Mohri 2000). Output strings are
 *   written back as chains.
 * - Other transducers: each arc's (input, output) pair is encoded as one letter, the encoded
 *   acceptor is determinised and minimised, and the letters decoded. The relation is unchanged;
 *   the result is minimal among machines deterministic on the pair alphabet, which is a
 *   normal form but not always the smallest transducer.
 * `options` bound the subset constructions involved (`maxStates`, and `progress` per state made).
 */
export function minimise(fst: Fst, options: DeterminiseOptions = {}): Fst {
  if (fst.isAcceptor()) {
    const d = trim(isDeterministic(fst) ? fst : determinise(fst, options));
    const m: StrMachine = {
      start: d.start,
      arcs: Array.from({ length: d.numStates }, (_, s) => d.arcs(s).map((a) => ({ input: a.input, output: [a.input], target: a.target }))),
      finals: Array.from({ length: d.numStates }, (_, s) => (d.isFinal(s) ? [[]] : [])),
    };
    const r = minimiseStr(m, []);
    // Acceptor arcs were chains of one label: input = output, as before.
    return r;
  }
  if (isSequential(fst)) {
    const free = removeInputEpsilons(fst);
    if (free.ok && free.machine.finals.every((f) => f.length <= 1)) {
      const pushed = pushOutputs(free.machine);
      return minimiseStr(pushed.machine, pushed.startOutput);
    }
  }
  const m = expandFinalOutputs(fst);
  const pairs = new Map<number, number>();
  const decode: [Label, Label][] = [[EPSILON, EPSILON]];
  const enc = new Fst();
  enc.addStates(m.numStates);
  if (m.numStates > 0) enc.setStart(m.start);
  for (let s = 0; s < m.numStates; s++) {
    for (const a of m.arcs(s)) {
      let c = 0;
      if (a.input !== EPSILON || a.output !== EPSILON) {
        const key = a.input * 0x80000000 + a.output;
        const known = pairs.get(key);
        if (known === undefined) {
          c = decode.length;
          pairs.set(key, c);
          decode.push([a.input, a.output]);
        } else c = known;
      }
      enc.addArc(s, c, c, a.target);
    }
    if (m.isFinal(s)) enc.setFinal(s);
  }
  const min = minimise(enc, options);
  const r = new Fst();
  r.addStates(min.numStates);
  r.setStart(min.start);
  for (let s = 0; s < min.numStates; s++) {
    for (const a of min.arcs(s)) {
      const [i, o] = decode[a.input] as [Label, Label];
      r.addArc(s, i, o, a.target);
    }
    if (min.isFinal(s)) r.setFinal(s);
  }
  return r;
}
