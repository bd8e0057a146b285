// Composition of transducers with the ε-sequencing filter of Mohri, Pereira & Riley, and
// intersection of acceptors (composition of identity relations).

import { EPSILON, Fst, FstError, expandFinalOutputs } from "./fst.js";
import { IntList, fstOf, sortedRows, trimTable, type ArcTable, type SortedArcs } from "./table.js";

export type { SortedArcs } from "./table.js";

/** Thrown when an operation would build a machine larger than the limit it was given. */
export class FstLimitError extends FstError {
  constructor(
    readonly operation: string,
    readonly limit: number,
  ) {
    super(`${operation} exceeded the limit of ${limit} states`);
    this.name = "FstLimitError";
  }
}

/** The arcs of `fst` as sorted rows: by (input, output, target) or by (output, input, target). */
export function sortedArcs(fst: Fst, by: "input" | "output"): SortedArcs {
  const n = fst.numStates;
  const first = new Int32Array(n + 1);
  for (let s = 0; s < n; s++) first[s + 1] = (first[s] as number) + fst.arcs(s).length;
  const m = first[n] as number;
  const input = new Int32Array(m);
  const output = new Int32Array(m);
  const target = new Int32Array(m);
  for (let s = 0; s < n; s++) {
    const list = fst.arcs(s).slice();
    if (by === "input") list.sort((a, b) => a.input - b.input || a.output - b.output || a.target - b.target);
    else list.sort((a, b) => a.output - b.output || a.input - b.input || a.target - b.target);
    let k = first[s] as number;
    for (const a of list) {
      input[k] = a.input;
      output[k] = a.output;
      target[k] = a.target;
      k++;
    }
  }
  return { first, input, output, target };
}

/** First index in keys[lo, hi) whose value is ≥ x (keys sorted ascending there). */
function lowerBound(keys: Int32Array, lo: number, hi: number, x: number): number {
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((keys[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export interface ComposeOptions {
  /** Throw FstLimitError when the result would exceed this many states (default 5 000 000). */
  readonly maxStates?: number;
  /** Trim the result (default true). */
  readonly trim?: boolean;
  /** Called once per result state as it is made; it may throw to abandon the work (a caller's time or memory budget). */
  readonly progress?: () => void;
}

/**
 * Composition a ∘ b: the relation {(x, z) | (x, y) ∈ a, (y, z) ∈ b}.
 *
 * Method: the pair construction of Mohri, Pereira & Riley ("Weighted automata algorithms",
 * 2002/2009) with their two-state ε-sequencing filter, so that every pair of paths gives exactly
 * one path of the result. Filter state 0 allows `a` to move alone on an arc with output ε
 * (b stays), or `b` alone on an arc with input ε (a stays, filter → 1); in filter state 1 only
 * `b` may move alone. A real match (a's output = b's input ≠ ε) resets the filter to 0. So
 * between two matches all of a's ε-output moves come before all of b's ε-input moves.
 *
 * Matching uses a's arcs sorted by output and b's sorted by input; for each output label of a,
 * the block of b's arcs with that input is found by binary search, so no state scans the whole
 * alphabet. Pair states are hashed as (p·|b| + q)·2 + filter and numbered in breadth-first
 * order of discovery (deterministic).
 */
export function compose(a: Fst, b: Fst, options: ComposeOptions = {}): Fst {
  return fstOf(composeTable(a, b, options));
}

/** `compose` as an arc table (the same states, arcs and order), without building the machine. */
export function composeTable(a: Fst | ArcTable, b: Fst | ArcTable, options: ComposeOptions = {}): ArcTable {
  const maxStates = options.maxStates ?? 5_000_000;
  const A = a instanceof Fst ? expandFinalOutputs(a) : a;
  const B = b instanceof Fst ? expandFinalOutputs(b) : b;
  const states = (x: Fst | ArcTable): number => (x instanceof Fst ? x.numStates : x.states);
  const isFinal = (x: Fst | ArcTable): ((s: number) => boolean) => (x instanceof Fst ? (s) => x.isFinal(s) : (s) => x.final[s] === 1);
  if (states(A) === 0 || states(B) === 0) {
    const none = new Int32Array(0);
    return { states: 1, start: 0, final: new Uint8Array(1), tails: none, inputs: none, outputs: none, heads: none };
  }
  const sa = A instanceof Fst ? sortedArcs(A, "output") : sortedRows(A, "output");
  const sb = B instanceof Fst ? sortedArcs(B, "input") : sortedRows(B, "input");
  const finalA = isFinal(A), finalB = isFinal(B);
  const nB = states(B);
  // Pair states by (p·|b| + q)·2 + filter: a dense table when the product is small (a cascade's
  // accumulator against one step), else a hash map.
  const space = states(A) * nB * 2;
  const dense = space <= 1 << 22 ? new Int32Array(space).fill(-1) : null;
  const ids = new Map<number, number>();
  const qp = new IntList();
  const qq = new IntList();
  const qf = new IntList();
  const tails = new IntList();
  const inputs = new IntList();
  const outputs = new IntList();
  const heads = new IntList();
  const final = new IntList();
  const idOf = (p: number, q: number, f: number): number => {
    const key = (p * nB + q) * 2 + f;
    let id = dense !== null ? dense[key]! : ids.get(key) ?? -1;
    if (id < 0) {
      id = qp.length;
      if (id >= maxStates) throw new FstLimitError("composition", maxStates);
      options.progress?.();
      if (dense !== null) dense[key] = id;
      else ids.set(key, id);
      qp.push(p);
      qq.push(q);
      qf.push(f);
    }
    return id;
  };
  const arc = (from: number, input: number, output: number, to: number): void => {
    tails.push(from);
    inputs.push(input);
    outputs.push(output);
    heads.push(to);
  };
  idOf(A.start, B.start, 0);
  for (let id = 0; id < qp.length; id++) {
    const p = qp.data[id]!;
    const q = qq.data[id]!;
    const f = qf.data[id]!;
    final.push(finalA(p) && finalB(q) ? 1 : 0);
    const aEnd = sa.first[p + 1] as number;
    const bEnd = sb.first[q + 1] as number;
    let i = sa.first[p] as number;
    // a moves alone on its ε-output arcs (only before any lone move of b).
    for (; i < aEnd && sa.output[i] === EPSILON; i++) {
      if (f === 0) arc(id, sa.input[i]!, EPSILON, idOf(sa.target[i]!, q, 0));
    }
    let j = sb.first[q] as number;
    // b moves alone on its ε-input arcs.
    for (; j < bEnd && sb.input[j] === EPSILON; j++) {
      arc(id, EPSILON, sb.output[j]!, idOf(p, sb.target[j]!, 1));
    }
    // Real matches: a's output label y against b's arcs with input y.
    while (i < aEnd && j < bEnd) {
      const y = sa.output[i] as number;
      j = lowerBound(sb.input, j, bEnd, y);
      if (j >= bEnd) break;
      if ((sb.input[j] as number) !== y) {
        i = lowerBound(sa.output, i, aEnd, sb.input[j] as number);
        continue;
      }
      let iEnd = i;
      while (iEnd < aEnd && sa.output[iEnd] === y) iEnd++;
      let jEnd = j;
      while (jEnd < bEnd && sb.input[jEnd] === y) jEnd++;
      for (let ii = i; ii < iEnd; ii++) {
        for (let jj = j; jj < jEnd; jj++) arc(id, sa.input[ii]!, sb.output[jj]!, idOf(sa.target[ii]!, sb.target[jj]!, 0));
      }
      i = iEnd;
      j = jEnd;
    }
  }
  const t: ArcTable = {
    states: qp.length, start: 0, final: Uint8Array.from(final.view()),
    tails: tails.view(), inputs: inputs.view(), outputs: outputs.view(), heads: heads.view(),
  };
  return options.trim === false ? t : trimTable(t);
}

/** Intersection of two acceptors: the strings both accept. Throws FstError for transducers. */
export function intersect(a: Fst, b: Fst, options: ComposeOptions = {}): Fst {
  if (!a.isAcceptor() || !b.isAcceptor()) throw new FstError("intersect needs two acceptors");
  return compose(a, b, options);
}

/** Composes a cascade left to right: ((m₁ ∘ m₂) ∘ m₃) ∘ … */
export function composeAll(machines: readonly Fst[], options: ComposeOptions = {}): Fst {
  if (machines.length === 0) throw new FstError("composeAll needs at least one machine");
  let acc = machines[0] as Fst;
  for (let k = 1; k < machines.length; k++) acc = compose(acc, machines[k] as Fst, options);
  return acc;
}
