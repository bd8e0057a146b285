// Frozen machines for hot paths: a general typed-array form (compressed sparse rows) that
// returns every output of an input, and a dense-table runner for sequential machines.

import { sortedArcs } from "./compose.js";
import { removeInputEpsilons, type StrArc, type StrMachine } from "./epsilon.js";
import { EPSILON, Fst, FstError, type Label } from "./fst.js";
import { isSequential } from "./minimise.js";

/** All distinct outputs of one input, sorted; `capped` when more existed than were kept. */
export interface ApplyResult {
  readonly outputs: Label[][];
  readonly capped: boolean;
}

function compareLabels(a: readonly Label[], b: readonly Label[]): number {
  const n = Math.min(a.length, b.length);
  for (let k = 0; k < n; k++) if (a[k] !== b[k]) return (a[k] as number) - (b[k] as number);
  return a.length - b.length;
}

/**
 * Any machine in compressed sparse rows: the arcs of state s are at first[s] … first[s+1]-1,
 * sorted by (input, output, target); ε-input arcs therefore come first. The final output of s is
 * finalLabels[finalFirst[s] … finalFirst[s+1]-1] when isFinal[s] = 1.
 */
export class FrozenFst {
  constructor(
    readonly start: number,
    readonly first: Int32Array,
    readonly input: Int32Array,
    readonly output: Int32Array,
    readonly target: Int32Array,
    readonly isFinal: Uint8Array,
    readonly finalFirst: Int32Array,
    readonly finalLabels: Int32Array,
  ) {}

  /** One more than the largest output label: the stride of applyAll's trie keys. */
  private get labelSpan(): number {
    if (this.span === 0) {
      let most = 0;
      for (let k = 0; k < this.output.length; k++) if (this.output[k]! > most) most = this.output[k]!;
      for (let k = 0; k < this.finalLabels.length; k++) if (this.finalLabels[k]! > most) most = this.finalLabels[k]!;
      this.span = most + 1;
    }
    return this.span;
  }

  private span = 0;

  get numStates(): number {
    return this.isFinal.length;
  }

  get numArcs(): number {
    return this.input.length;
  }

  /**
   * Every distinct output of `input`, sorted, at most `cap` of them. The search is depth-first over
   * configurations (state, position, output so far), each visited once, so ε-input cycles that
   * write nothing terminate; one that writes output has infinitely many outputs and ends the
   * search with `capped` once `cap` outputs or `maxConfigurations` configurations are reached.
   * When capped, which outputs were kept follows the (deterministic) search order.
   */
  applyAll(input: ArrayLike<Label>, cap = 64, maxConfigurations = 1_000_000): ApplyResult {
    const n = input.length;
    if (this.numStates === 0) return { outputs: [], capped: false };
    // Output strings as nodes of a trie: node 0 is the empty string. The trie's edges and the
    // configurations seen are keyed by numbers, not strings (no string built per arc): an edge by
    // node × labelSpan + label, a configuration by (node × (n + 1) + position) × states + state,
    // exact below 2^53.
    const labelSpan = this.labelSpan;
    const states = this.numStates;
    const parent: number[] = [-1];
    const last: number[] = [EPSILON];
    const child = new Map<number, number>();
    const extend = (node: number, l: Label): number => {
      if (l === EPSILON) return node;
      const key = node * labelSpan + l;
      let c = child.get(key);
      if (c === undefined) {
        c = parent.length;
        parent.push(node);
        last.push(l);
        child.set(key, c);
      }
      return c;
    };
    const seen = new Set<number>();
    const results = new Set<number>();
    const stack: number[] = [this.start, 0, 0];
    seen.add(this.start);
    let capped = false;
    while (stack.length > 0) {
      const node = stack.pop() as number;
      const pos = stack.pop() as number;
      const s = stack.pop() as number;
      if (pos === n && this.isFinal[s] === 1) {
        let r = node;
        for (let k = this.finalFirst[s] as number; k < (this.finalFirst[s + 1] as number); k++) r = extend(r, this.finalLabels[k] as number);
        if (!results.has(r)) {
          if (results.size >= cap) {
            capped = true;
            break;
          }
          results.add(r);
        }
      }
      const end = this.first[s + 1] as number;
      const x = pos < n ? (input[pos] as number) : -1;
      for (let k = this.first[s] as number; k < end; k++) {
        const i = this.input[k] as number;
        let np: number;
        if (i === EPSILON) np = pos;
        else if (i === x) np = pos + 1;
        else if (i > x) break;
        else continue;
        const t = this.target[k] as number;
        const nn = extend(node, this.output[k] as number);
        const key = (nn * (n + 1) + np) * states + t;
        if (seen.has(key)) continue;
        if (seen.size >= maxConfigurations) {
          capped = true;
          break;
        }
        seen.add(key);
        stack.push(t, np, nn);
      }
      if (capped) break;
    }
    const outputs = [...results].map((r) => {
      const w: Label[] = [];
      for (let x = r; x > 0; x = parent[x] as number) w.push(last[x] as number);
      return w.reverse();
    });
    outputs.sort(compareLabels);
    return { outputs, capped };
  }
}

/** The compressed-sparse-row form of any machine. */
export function freeze(fst: Fst): FrozenFst {
  const n = fst.numStates;
  const { first, input, output, target } = sortedArcs(fst, "input");
  const isFinal = new Uint8Array(n);
  const finalFirst = new Int32Array(n + 1);
  const finalLabels: number[] = [];
  for (let s = 0; s < n; s++) {
    const f = fst.finalOutput(s);
    if (f !== undefined) {
      isFinal[s] = 1;
      finalLabels.push(...f);
    }
    finalFirst[s + 1] = finalLabels.length;
  }
  return new FrozenFst(n > 0 ? fst.start : 0, first, input, output, target, isFinal, finalFirst, Int32Array.from(finalLabels));
}

/** Every distinct output of `input` (sorted, at most `cap`). Freezes first: freeze once to apply often. */
export function applyAll(fst: Fst | FrozenFst, input: ArrayLike<Label>, cap = 64): ApplyResult {
  return (fst instanceof FrozenFst ? fst : freeze(fst)).applyAll(input, cap);
}

/**
 * Input-symbol classes: labels that every state treats alike (same target and output) share a
 * class, so dense tables have one column per class instead of one per label. Class 0 holds the
 * labels no state reads. The standard alphabet compression of table-driven scanners.
 */
export function inputClasses(m: StrMachine, outputKey: (a: StrArc) => string): { classOf: Int32Array; classes: number } {
  let maxLabel = 0;
  for (const list of m.arcs) for (const a of list) maxLabel = Math.max(maxLabel, a.input);
  const sig: string[][] = Array.from({ length: maxLabel + 1 }, () => []);
  m.arcs.forEach((list, s) => {
    for (const a of list) (sig[a.input] as string[]).push(`${s}>${a.target}:${outputKey(a)}`);
  });
  const classOf = new Int32Array(maxLabel + 1);
  const ids = new Map<string, number>([["", 0]]);
  for (let l = 1; l <= maxLabel; l++) {
    const key = (sig[l] as string[]).join(" ");
    let c = ids.get(key);
    if (c === undefined) {
      c = ids.size;
      ids.set(key, c);
    }
    classOf[l] = c;
  }
  return { classOf, classes: ids.size };
}

/** Output code of an arc that writes the symbol it reads (identity arcs share input classes). */
export const COPY = -0x80000000;

/** Output code of an arc: 0 nothing, COPY the input symbol, > 0 that label, < 0 a string in the pool. */
export function outputCode(input: Label, output: readonly Label[], intern: (w: readonly Label[]) => number): number {
  if (output.length === 0) return 0;
  if (output.length === 1) return output[0] === input ? COPY : (output[0] as number);
  return -(intern(output) + 1);
}

/** The class key of an arc's output: identity arcs get one key whatever their label. */
export const outputKey = (a: StrArc): string => (a.output.length === 1 && a.output[0] === a.input ? "=" : a.output.join(","));

/** The packed one-load table of `DeterministicRunner.packed`, or null when the machine does not fit it. */
function packTable(next: Int32Array, out: Int32Array, states: number): Int32Array | null {
  if (states >= 1 << 21) return null;
  const packed = new Int32Array(next.length);
  for (let k = 0; k < next.length; k++) {
    const t = next[k] as number;
    const o = out[k] as number;
    if (t < 0) {
      packed[k] = -1;
      continue;
    }
    let code: number;
    if (o === 0) code = 0;
    else if (o === COPY) code = 1;
    else if (o > 0 && o < 1023) code = o + 1;
    else return null;
    packed[k] = (t << 10) | code;
  }
  return packed;
}

/**
 * A pool of output strings for frozen tables, each stored once as length, labels…;
 * `intern` returns a string's offset. Shared by the deterministic and the functional runners.
 */
export function stringPool(): { readonly pool: number[]; readonly intern: (w: readonly Label[]) => number } {
  const pool: number[] = [];
  const poolAt = new Map<string, number>();
  const intern = (w: readonly Label[]): number => {
    const key = w.join(",");
    let at = poolAt.get(key);
    if (at === undefined) {
      at = pool.length;
      pool.push(w.length, ...w);
      poolAt.set(key, at);
    }
    return at;
  };
  return { pool, intern };
}

/** Copies the pool string at `at` (length, labels…) to out[n…]; returns the new length or -2 when full. */
function writeString(pool: Int32Array, at: number, out: Int32Array, n: number): number {
  const len = pool[at] as number;
  if (n + len > out.length) return -2;
  for (let k = 1; k <= len; k++) out[n++] = pool[at + k] as number;
  return n;
}

/**
 * The fast runner of a sequential machine: one dense row per state and one column per input
 * class. Per input symbol the loop does a class lookup, a table lookup and writes the output
 * (`out` code 0: nothing, > 0: that label, < 0: a string at pool[-code-1] = length, labels…).
 * When every label is its own class the class lookup is skipped.
 */
export class DeterministicRunner {
  constructor(
    readonly start: number,
    readonly classes: number,
    readonly classOf: Int32Array,
    readonly next: Int32Array,
    readonly out: Int32Array,
    /** -1: not final; otherwise the offset of the final output in `pool`. */
    readonly finalAt: Int32Array,
    readonly pool: Int32Array,
  ) {
    let identity = classes === classOf.length;
    for (let l = 1; identity && l < classOf.length; l++) if (classOf[l] !== l) identity = false;
    this.identity = identity;
    let maxArc = 1;
    for (const o of out) if (o < 0 && o !== COPY) maxArc = Math.max(maxArc, pool[-o - 1] as number);
    let maxFinal = 0;
    for (const f of finalAt) if (f >= 0) maxFinal = Math.max(maxFinal, pool[f] as number);
    this.maxArcOutput = maxArc;
    this.maxFinalOutput = maxFinal;
    this.packed = packTable(next, out, finalAt.length);
  }

  /**
   * When every arc writes at most one label below 1023 and there are fewer than 2²¹ states: one
   * Int32 per transition, target << 10 | code (code 0: nothing, 1: the symbol read, c ≥ 2: label
   * c-1), -1 for none. A step is then one load, as in a bare table walk.
   */
  readonly packed: Int32Array | null;

  /** Longest output of one arc (at least 1) and of a final state: the room a run can need. */
  readonly maxArcOutput: number;
  readonly maxFinalOutput: number;

  /** True when class c is label c for every label (the class lookup is skipped). */
  readonly identity: boolean;

  get numStates(): number {
    return this.finalAt.length;
  }

  /** Scratch output buffer reused between calls (grown on demand). */
  private scratch = new Int32Array(256);

  /** Runs `input`; appends the output to `out` and returns true, or returns false when rejected. */
  run(input: ArrayLike<Label>, out: Label[]): boolean {
    for (;;) {
      const n = this.runInto(input, this.scratch);
      if (n === -2) {
        this.scratch = new Int32Array(this.scratch.length * 4);
        continue;
      }
      if (n < 0) return false;
      for (let k = 0; k < n; k++) out.push(this.scratch[k] as number);
      return true;
    }
  }

  /**
   * The hot loop: runs input[from … to) writing the output into `out`; returns the output length,
   * -1 when the input is rejected, -2 when `out` is too small.
   */
  runInto(input: ArrayLike<Label>, out: Int32Array, from = 0, to = input.length): number {
    // With room for the longest possible output (and one spare cell), the loop needs no capacity checks.
    if (out.length > (to - from) * this.maxArcOutput + this.maxFinalOutput) return this.runFast(input, out, from, to, 0);
    const { next, classes, classOf, pool } = this;
    const codes = this.out;
    const cap = out.length;
    const nc = classOf.length;
    let n = 0;
    let s = this.start;
    for (let i = from; i < to; i++) {
      const x = input[i] as number;
      if (x >>> 0 >= nc) return -1;
      const idx = s * classes + (classOf[x] as number);
      s = next[idx] as number;
      if (s < 0) return -1;
      const o = codes[idx] as number;
      if (o === COPY || o > 0) {
        if (n >= cap) return -2;
        out[n++] = o > 0 ? o : x;
      } else if (o < 0) {
        n = writeString(pool, -o - 1, out, n);
        if (n < 0) return -2;
      }
    }
    const f = this.finalAt[s] as number;
    if (f < 0) return -1;
    return writeString(pool, f, out, n);
  }

  /**
   * `runInto` when `out` is known to be large enough (one spare cell), writing from out[start]:
   * returns the end of the output, or -1. Class 0 (unknown labels, ε) has no arcs.
   */
  private runFast(input: ArrayLike<Label>, out: Int32Array, from: number, to: number, start: number): number {
    const { classOf, classes } = this;
    const nc = classOf.length;
    const identity = this.identity;
    let n = start;
    let s = this.start;
    const packed = this.packed;
    if (packed !== null) {
      for (let i = from; i < to; i++) {
        const x = input[i] as number;
        if (x >>> 0 >= nc) return -1;
        const c = packed[s * classes + (identity ? x : (classOf[x] as number))] as number;
        if (c < 0) return -1;
        s = c >> 10;
        const v = c & 1023;
        out[n] = v === 1 ? x : v - 1;
        n += v === 0 ? 0 : 1;
      }
    } else {
      const next = this.next;
      const codes = this.out;
      for (let i = from; i < to; i++) {
        const x = input[i] as number;
        if (x >>> 0 >= nc) return -1;
        const idx = s * classes + (identity ? x : (classOf[x] as number));
        s = next[idx] as number;
        if (s < 0) return -1;
        const o = codes[idx] as number;
        if (o > 0) out[n++] = o;
        else if (o === COPY) out[n++] = x;
        else if (o < 0) n = writeString(this.pool, -o - 1, out, n);
      }
    }
    const f = this.finalAt[s] as number;
    if (f < 0) return -1;
    return writeString(this.pool, f, out, n);
  }

  /**
   * Runs many entries in one call (the lexicon runner's hot path): entry e is
   * input[at[e] … at[e+1]); its output is written to out[outAt[e] … outAt[e+1]) and ok[e] is 1,
   * or ok[e] is 0 and outAt[e+1] = outAt[e] when it is rejected. Returns the number of accepted
   * entries, or -2 when `out` is too small (size it as input length × maxArcOutput + entries ×
   * maxFinalOutput to be safe).
   */
  runBatch(input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array): number {
    const entries = at.length - 1;
    if (out.length < (at[entries] as number) * this.maxArcOutput + entries * this.maxFinalOutput + 1) return -2;
    outAt[0] = 0;
    const packed = this.packed;
    if (packed !== null) {
      return this.identity
        ? this.runBatchPacked(packed, input, at, out, outAt, ok)
        : this.runBatchPackedClasses(packed, input, at, out, outAt, ok);
    }
    let n = 0;
    let accepted = 0;
    for (let e = 0; e < entries; e++) {
      const begin = n;
      const r = this.runFast(input, out, at[e] as number, at[e + 1] as number, n);
      if (r < 0) {
        n = begin;
        ok[e] = 0;
      } else {
        n = r;
        ok[e] = 1;
        accepted++;
      }
      outAt[e + 1] = n;
    }
    return accepted;
  }

  /** `runBatch` on the packed table when every label is its own class, the whole loop inline. */
  private runBatchPacked(packed: Int32Array, input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array): number {
    const { finalAt, pool, classOf } = this;
    const width = this.classes;
    const nc = classOf.length;
    const entries = at.length - 1;
    let n = 0;
    let accepted = 0;
    for (let e = 0; e < entries; e++) {
      const begin = n;
      let s = this.start;
      const end = at[e + 1] as number;
      for (let i = at[e] as number; i < end; i++) {
        const x = input[i] as number;
        if (x >>> 0 >= nc) {
          s = -1;
          break;
        }
        const c = packed[s * width + x] as number;
        if (c < 0) {
          s = -1;
          break;
        }
        s = c >> 10;
        const v = c & 1023;
        out[n] = v === 1 ? x : v - 1;
        n += v === 0 ? 0 : 1;
      }
      const f = s < 0 ? -1 : (finalAt[s] as number);
      if (f < 0) {
        n = begin;
        ok[e] = 0;
      } else {
        const len = pool[f] as number;
        for (let k = 1; k <= len; k++) out[n++] = pool[f + k] as number;
        ok[e] = 1;
        accepted++;
      }
      outAt[e + 1] = n;
    }
    return accepted;
  }

  /** `runBatch` on the packed table with a class lookup per symbol, the whole loop inline. */
  private runBatchPackedClasses(packed: Int32Array, input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array): number {
    const { finalAt, pool, classOf } = this;
    const width = this.classes;
    const nc = classOf.length;
    const entries = at.length - 1;
    let n = 0;
    let accepted = 0;
    for (let e = 0; e < entries; e++) {
      const begin = n;
      let s = this.start;
      const end = at[e + 1] as number;
      for (let i = at[e] as number; i < end; i++) {
        const x = input[i] as number;
        if (x >>> 0 >= nc) {
          s = -1;
          break;
        }
        const c = packed[s * width + (classOf[x] as number)] as number;
        if (c < 0) {
          s = -1;
          break;
        }
        s = c >> 10;
        const v = c & 1023;
        out[n] = v === 1 ? x : v - 1;
        n += v === 0 ? 0 : 1;
      }
      const f = s < 0 ? -1 : (finalAt[s] as number);
      if (f < 0) {
        n = begin;
        ok[e] = 0;
      } else {
        const len = pool[f] as number;
        for (let k = 1; k <= len; k++) out[n++] = pool[f + k] as number;
        ok[e] = 1;
        accepted++;
      }
      outAt[e + 1] = n;
    }
    return accepted;
  }

  /** True when the machine accepts `input`. */
  accepts(input: ArrayLike<Label>): boolean {
    const { next, classes, classOf } = this;
    let s = this.start;
    for (let i = 0; i < input.length; i++) {
      const x = input[i] as number;
      if (x >>> 0 >= classOf.length) return false;
      s = next[s * classes + (classOf[x] as number)] as number;
      if (s < 0) return false;
    }
    return (this.finalAt[s] as number) >= 0;
  }
}

/**
 * Freezes a sequential machine (`isSequential`: deterministic on input, string outputs as chains
 * of ε-input arcs, such as `determinise`, `determiniseTransducer` and `minimise` produce) into
 * dense tables. Throws FstError for any other machine; see `freezeFunctional` for functional
 * machines that are not sequential.
 */
export function freezeDeterministic(fst: Fst): DeterministicRunner {
  if (!isSequential(fst)) throw new FstError("freezeDeterministic needs a sequential machine (deterministic on input)");
  const free = removeInputEpsilons(fst);
  if (!free.ok) throw new FstError("freezeDeterministic: the machine has an ε-input cycle");
  const m = free.machine;
  // A chain at the start is no special case: ε-input removal has already moved its output onto
  // the start state's arcs and final output.
  const n = m.arcs.length;
  const { classOf, classes } = inputClasses(m, outputKey);
  const next = new Int32Array(n * classes).fill(-1);
  const codes = new Int32Array(n * classes);
  const { pool, intern } = stringPool();
  const finalAt = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) {
    for (const a of m.arcs[s] as StrArc[]) {
      const idx = s * classes + (classOf[a.input] as number);
      next[idx] = a.target;
      codes[idx] = outputCode(a.input, a.output, intern);
    }
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f !== undefined) finalAt[s] = intern(f);
  }
  return new DeterministicRunner(m.start, classes, classOf, next, codes, finalAt, Int32Array.from(pool));
}
