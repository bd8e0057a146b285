// A fast runner for functional transducers that need not be subsequential (rules with right
// contexts need unbounded lookahead): a right-to-left deterministic pass, then a left-to-right
// pass that never takes an arc leading to a dead end — the two halves of a bimachine.

import { FstLimitError } from "./compose.js";
import { witnessThrough } from "./determinise.js";
import { removeInputEpsilons, type StrArc } from "./epsilon.js";
import { isFunctional } from "./equivalence.js";
import { Fst, type Label } from "./fst.js";
import { COPY, inputClasses, outputCode, outputKey, stringPool } from "./frozen.js";
import { packBimachine, type PackedBimachine } from "./bimachine.js";

/**
 * Runs a functional transducer deterministically in two passes over the input w (Schützenberger's
 * bimachine idea, realised as in Roche & Schabes 1997):
 *
 * 1. Right to left: R[n] = final states; R[i] = { p | p -w[i]→ r for some r ∈ R[i+1] }, the states
 *    from which w[i..n) is accepted. The sets are the states of a DFA over the reversed input,
 *    built in advance by the subset construction (`rNext`, one row per set, one column per input
 *    class); `rBits` holds each set as a bit vector.
 * 2. Left to right from the start state (which must be in R[0]): at position i take an arc on
 *    w[i] whose target is in R[i+1]. One exists by the definition of R, and when the state has a
 *    single arc on that class no test is needed. Every path found this way accepts, and a
 *    functional machine writes the same output on every accepting path.
 *
 * The machine itself is the ε-input-free form (string outputs on arcs) in dense rows: the arcs
 * of state s on class c are rowFirst[s·K+c] … rowFirst[s·K+c+1]-1. Output codes as in
 * `DeterministicRunner` (0: nothing, COPY: the symbol read, > 0: one label, < 0: a string in
 * `pool`); identity arcs therefore share input classes.
 */
export class FunctionalRunner {
  constructor(
    readonly classes: number,
    readonly classOf: Int32Array,
    readonly start: number,
    readonly rowFirst: Int32Array,
    readonly arcTarget: Int32Array,
    readonly arcOut: Int32Array,
    /** -1: not final; else the offset of the final output in `pool`. */
    readonly finalAt: Int32Array,
    readonly pool: Int32Array,
    /** The right-to-left DFA: its start set (-1: the machine accepts nothing), rows, bit sets. */
    readonly rStart: number,
    readonly rNext: Int32Array,
    readonly rBits: Int32Array,
    readonly words: number,
  ) {}

  private sets = new Int32Array(64);

  get numStates(): number {
    return this.finalAt.length;
  }

  /** Number of state sets of the right-to-left pass. */
  get numSets(): number {
    return this.words === 0 ? 0 : this.rBits.length / this.words;
  }

  private maxOut = -1;
  private fast: PackedBimachine | null | undefined;

  /**
   * The same machine as two one-load tables (bimachine.ts), made on first use; null when they do
   * not fit, and the loops below run instead.
   */
  packed(): PackedBimachine | null {
    if (this.maxOut < 0) {
      const b = this.outBound();
      this.maxOut = b.arc;
      this.maxFinal = b.final;
    }
    if (this.fast === undefined) this.fast = packBimachine(this, this.maxOut, this.maxFinal);
    return this.fast;
  }

  /**
   * Takes tables packed earlier for this machine (read back from a cache with it), or null when
   * they did not fit: `packed()` then returns them instead of packing again.
   */
  adoptPacked(p: PackedBimachine | null): void {
    this.fast = p;
    if (p !== null) {
      this.maxOut = p.maxOut;
      this.maxFinal = p.maxFinal;
    }
  }

  /** Longest output one arc or one final state writes (sizes `runBatch`'s output room). */
  private outBound(): { arc: number; final: number } {
    let arc = 1;
    for (let k = 0; k < this.arcOut.length; k++) {
      const o = this.arcOut[k] as number;
      if (o < 0 && o !== COPY) arc = Math.max(arc, this.pool[-o - 1] as number);
    }
    let fin = 0;
    for (let s = 0; s < this.finalAt.length; s++) {
      const f = this.finalAt[s] as number;
      if (f >= 0) fin = Math.max(fin, this.pool[f] as number);
    }
    return { arc, final: fin };
  }

  /**
   * Runs many entries in one call, typed arrays only (the hot path of whole-lexicon runs):
   * entry e is input[at[e] .. at[e+1]); its output goes to out[outAt[e] .. outAt[e+1]) and ok[e]
   * says whether it was accepted (a rejected entry writes nothing). Stops early when `out` has no
   * room for the next entry and returns how many entries were done (the caller grows `out`).
   */
  runBatch(input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array, from = 0): number {
    const fast = this.packed();
    if (fast !== null) return fast.runBatch(input, at, out, outAt, ok, from);
    const K = this.classes;
    const { classOf, rNext, rBits, words, rowFirst, arcTarget, arcOut, pool, finalAt, maxOut, maxFinal } = this;
    const nc = classOf.length;
    const entries = at.length - 1;
    let n = outAt[from] as number;
    let e = from;
    for (; e < entries; e++) {
      const a = at[e] as number;
      const b = at[e + 1] as number;
      const len = b - a;
      if (n + len * maxOut + maxFinal > out.length) break;
      if (this.sets.length < len + 1) this.sets = new Int32Array(Math.max(len + 1, this.sets.length * 2));
      const R = this.sets;
      let r = this.rStart;
      let good = r >= 0;
      if (good) {
        R[len] = r;
        for (let i = len - 1; i >= 0; i--) {
          const x = input[a + i] as number;
          const c = x > 0 && x < nc ? (classOf[x] as number) : 0;
          r = c === 0 ? -1 : (rNext[r * K + c] as number);
          if (r < 0) {
            good = false;
            break;
          }
          R[i] = r;
        }
      }
      let s = this.start;
      if (good && (((rBits[(R[0] as number) * words + (s >>> 5)] as number) >>> (s & 31)) & 1) === 0) good = false;
      if (!good) {
        ok[e] = 0;
        outAt[e + 1] = n;
        continue;
      }
      for (let i = 0; i < len; i++) {
        const x = input[a + i] as number;
        const idx = s * K + (classOf[x] as number);
        let k = rowFirst[idx] as number;
        const end = rowFirst[idx + 1] as number;
        if (end - k > 1) {
          const base = (R[i + 1] as number) * words;
          while (k < end) {
            const t = arcTarget[k] as number;
            if ((((rBits[base + (t >>> 5)] as number) >>> (t & 31)) & 1) === 1) break;
            k++;
          }
        }
        const o = arcOut[k] as number;
        if (o === COPY) out[n++] = x;
        else if (o > 0) out[n++] = o;
        else if (o < 0) {
          const p = -o - 1;
          const m = pool[p] as number;
          for (let j = 1; j <= m; j++) out[n++] = pool[p + j] as number;
        }
        s = arcTarget[k] as number;
      }
      const f = finalAt[s] as number;
      const m = pool[f] as number;
      for (let j = 1; j <= m; j++) out[n++] = pool[f + j] as number;
      ok[e] = 1;
      outAt[e + 1] = n;
    }
    return e;
  }

  private maxFinal = 0;

  /** Runs `input`; appends its output to `out` and returns true, or returns false when the input is not in the domain. */
  run(input: ArrayLike<Label>, out: Label[]): boolean {
    const fast = this.packed();
    if (fast !== null) return fast.run(input, out);
    return this.runSearching(input, out);
  }

  /** `run` without the packed tables: the arc is found by testing targets against the set. */
  runSearching(input: ArrayLike<Label>, out: Label[]): boolean {
    const n = input.length;
    const K = this.classes;
    const { classOf, rNext, rBits, words, rowFirst, arcTarget, arcOut, pool } = this;
    if (this.sets.length < n + 1) this.sets = new Int32Array(Math.max(n + 1, this.sets.length * 2));
    const R = this.sets;
    let r = this.rStart;
    if (r < 0) return false;
    R[n] = r;
    const nc = classOf.length;
    for (let i = n - 1; i >= 0; i--) {
      const x = input[i] as number;
      if (x <= 0 || x >= nc) return false;
      const c = classOf[x] as number;
      if (c === 0) return false;
      r = rNext[r * K + c] as number;
      if (r < 0) return false;
      R[i] = r;
    }
    let s = this.start;
    if ((((rBits[(R[0] as number) * words + (s >>> 5)] as number) >>> (s & 31)) & 1) === 0) return false;
    for (let i = 0; i < n; i++) {
      const idx = s * K + (classOf[input[i] as number] as number);
      let k = rowFirst[idx] as number;
      const end = rowFirst[idx + 1] as number;
      if (end - k > 1) {
        const base = (R[i + 1] as number) * words;
        while (k < end) {
          const t = arcTarget[k] as number;
          if ((((rBits[base + (t >>> 5)] as number) >>> (t & 31)) & 1) === 1) break;
          k++;
        }
      }
      const o = arcOut[k] as number;
      if (o === COPY) out.push(input[i] as number);
      else if (o > 0) out.push(o);
      else if (o < 0) {
        const at = -o - 1;
        for (let j = at + 1; j <= at + (pool[at] as number); j++) out.push(pool[j] as number);
      }
      s = arcTarget[k] as number;
    }
    const f = this.finalAt[s] as number;
    for (let j = f + 1; j <= f + (pool[f] as number); j++) out.push(pool[j] as number);
    return true;
  }
}

export interface FreezeFunctionalOptions {
  /** Run the functionality test first (default true); a non-functional machine is reported. */
  readonly check?: boolean;
  /** Most state sets of the right-to-left pass (default 1 000 000); FstLimitError beyond. */
  readonly maxSets?: number;
  /** Called once per state set as it is made; it may throw to abandon the work. */
  readonly progress?: () => void;
}

export type FreezeFunctionalResult =
  | { readonly ok: true; readonly runner: FunctionalRunner }
  /** The machine has two outputs for `input`. */
  | { readonly ok: false; readonly input: readonly Label[]; readonly message: string };

/** Freezes a functional transducer into a `FunctionalRunner`, or reports an input with two outputs. */
export function freezeFunctional(fst: Fst, options: FreezeFunctionalOptions = {}): FreezeFunctionalResult {
  const maxSets = options.maxSets ?? 1_000_000;
  const free = removeInputEpsilons(fst);
  if (!free.ok) {
    return {
      ok: false,
      input: witnessThrough(free.trimmed, free.state),
      message: "an ε-input cycle writes output: this input has infinitely many outputs",
    };
  }
  if (options.check !== false) {
    const f = isFunctional(fst);
    if (!f.functional) return { ok: false, input: f.input, message: "this input has more than one output" };
  }
  const m = free.machine;
  const n = m.arcs.length;
  for (const fs of m.finals) {
    if (fs.length > 1) return { ok: false, input: [], message: "a state has two different final outputs" };
  }
  const { classOf, classes: K } = inputClasses(m, outputKey);
  // Left-to-right rows.
  const rowFirst = new Int32Array(n * K + 1);
  for (let s = 0; s < n; s++) for (const a of m.arcs[s] as StrArc[]) (rowFirst[s * K + (classOf[a.input] as number) + 1] as number)++;
  for (let k = 0; k < n * K; k++) rowFirst[k + 1] = (rowFirst[k + 1] as number) + (rowFirst[k] as number);
  const fill = rowFirst.slice(0, n * K);
  const arcTarget = new Int32Array(rowFirst[n * K] as number);
  const arcOut = new Int32Array(arcTarget.length);
  const { pool, intern } = stringPool();
  const finalAt = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) {
    const list = (m.arcs[s] as StrArc[]).slice().sort((a, b) => a.input - b.input || a.target - b.target);
    for (const a of list) {
      const k = (fill[s * K + (classOf[a.input] as number)] as number)++;
      arcTarget[k] = a.target;
      arcOut[k] = outputCode(a.input, a.output, intern);
    }
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f !== undefined) finalAt[s] = intern(f);
  }
  // Predecessors by (target, class), for the right-to-left subset construction.
  const predFirst = new Int32Array(n * K + 1);
  for (let s = 0; s < n; s++) for (const a of m.arcs[s] as StrArc[]) (predFirst[a.target * K + (classOf[a.input] as number) + 1] as number)++;
  for (let k = 0; k < n * K; k++) predFirst[k + 1] = (predFirst[k + 1] as number) + (predFirst[k] as number);
  const pfill = predFirst.slice(0, n * K);
  const preds = new Int32Array(predFirst[n * K] as number);
  for (let s = 0; s < n; s++) for (const a of m.arcs[s] as StrArc[]) preds[(pfill[a.target * K + (classOf[a.input] as number)] as number)++] = s;

  const words = (n + 31) >>> 5;
  const sets: number[][] = [];
  const ids = new Map<string, number>();
  const idOf = (set: number[]): number => {
    if (set.length === 0) return -1;
    const key = set.join(",");
    let id = ids.get(key);
    if (id === undefined) {
      id = sets.length;
      if (id >= maxSets) throw new FstLimitError("the right-to-left pass of freezeFunctional", maxSets);
      options.progress?.();
      ids.set(key, id);
      sets.push(set);
    }
    return id;
  };
  const finalsSet: number[] = [];
  for (let s = 0; s < n; s++) if (finalAt[s] >= 0) finalsSet.push(s);
  const rStart = idOf(finalsSet);
  const rows: number[] = [];
  const mark = new Int32Array(n).fill(-1);
  for (let id = 0; id < sets.length; id++) {
    const set = sets[id] as number[];
    rows.push(-1);
    for (let c = 1; c < K; c++) {
      const next: number[] = [];
      const stamp = id * K + c;
      for (const r of set) {
        for (let k = predFirst[r * K + c] as number; k < (predFirst[r * K + c + 1] as number); k++) {
          const p = preds[k] as number;
          if (mark[p] !== stamp) {
            mark[p] = stamp;
            next.push(p);
          }
        }
      }
      next.sort((x, y) => x - y);
      rows.push(idOf(next));
    }
  }
  const rBits = new Int32Array(sets.length * words);
  sets.forEach((set, id) => {
    for (const s of set) rBits[id * words + (s >>> 5)] = (rBits[id * words + (s >>> 5)] as number) | (1 << (s & 31));
  });
  const runner = new FunctionalRunner(K, classOf, m.start, rowFirst, arcTarget, arcOut, finalAt, Int32Array.from(pool), rStart, Int32Array.from(rows), rBits, words);
  return { ok: true, runner };
}
