// The two-pass runner of a functional transducer as two one-load tables (a bimachine in
// Schützenberger's sense): the right-to-left pass reads one Int32 per symbol that gives both the
// next state set and a "choice column", and the left-to-right pass reads one Int32 per symbol that
// gives the next state and the output — integers only, no search, no allocation per symbol.

import type { Label } from "./fst.js";
import { COPY } from "./frozen.js";

/**
 * Built from the tables of a `FunctionalRunner` (see functional.ts): sets R of the right-to-left
 * DFA, machine states s, input classes c.
 *
 * Both tables hold row offsets, not row numbers, so neither pass multiplies on its critical path
 * (the next row is the loaded word shifted: one load per symbol and pass). Words are read unsigned.
 *
 * Right-to-left: `rz[r + x]` = `next << zBits | z` for the set whose row starts at r (R[i+1]) and
 * the symbol x = w[i]: `next` is the row of R[i] (the dead set's row when w[i..n) is accepted from
 * no state; column 0, ε, always leads there) and z is the class of the pair (class of x, R[i+1]).
 * Two pairs share a class when every state takes the same arc on them (the arc whose target is in
 * R[i+1] — one exists whenever s ∈ R[i] — and, the machine being functional, any of them writes
 * the same output). `startOk[r]` = 1 when the start state is in the set of row r.
 *
 * Left-to-right: `step[s + z]` for the state whose row starts at s (rows of `zs` entries) is
 * `target << (L+2) | emit << (L+1) | copy << L | label` (L = `labelBits`): one symbol written when
 * `emit`, the symbol read when `copy`, else `label`; the label STRING = 2^L − 1 stands for the
 * string at `strings[s + z]` in the pool. So the usual arcs write their symbol without a branch
 * (the symbol read masked by the sign-extended copy bit, or'ed with the label). Column 0 is never a
 * choice column: it holds the state's final output (its pool offset).
 */
export class PackedBimachine {
  constructor(
    readonly size: number,
    /** Row of the dead set. */
    readonly dead: number,
    /** Row of the start set (-1: the machine accepts nothing). */
    readonly rStart: number,
    readonly zBits: number,
    readonly rz: Int32Array,
    readonly startOk: Uint8Array,
    readonly zs: number,
    readonly labelBits: number,
    readonly step: Int32Array,
    readonly strings: Int32Array,
    /** Row of the start state. */
    readonly start: number,
    readonly pool: Int32Array,
    /** Longest output of one symbol (sizes the batch's output room). */
    readonly maxOut: number,
    readonly maxFinal: number,
  ) {
    this.runBatch = batchLoop(this);
  }

  /** Choice columns of one run. */
  private zbuf = new Uint16Array(64);

  /** Runs `input`; appends its output to `out`; false when the input is not accepted. */
  run(input: ArrayLike<Label>, out: Label[]): boolean {
    const n = input.length;
    if (this.zbuf.length < n) this.zbuf = new Uint16Array(Math.max(n, this.zbuf.length * 2));
    const { rz, size, zBits, step, strings, pool, labelBits: L } = this;
    const zMask = (1 << zBits) - 1;
    const string = (1 << L) - 1;
    const z = this.zbuf;
    let r = this.rStart;
    if (r < 0) return false;
    for (let i = n - 1; i >= 0; i--) {
      const x = input[i] as number;
      if (x >>> 0 >= size) return false;
      const v = rz[r + x] as number;
      r = v >>> zBits;
      z[i] = v & zMask;
    }
    if (this.startOk[r] !== 1) return false;
    let s = this.start;
    for (let i = 0; i < n; i++) {
      const k = s + (z[i] as number);
      const v = step[k] as number;
      s = v >>> (L + 2);
      const label = v & string;
      if (label === string) {
        const p = strings[k] as number;
        for (let j = 1; j <= (pool[p] as number); j++) out.push(pool[p + j] as number);
      } else if (((v >>> (L + 1)) & 1) === 1) out.push((v >>> L) & 1 ? (input[i] as number) : label);
    }
    const f = step[s] as number;
    for (let j = 1; j <= (pool[f] as number); j++) out.push(pool[f + j] as number);
    return true;
  }

  /**
   * As FunctionalRunner.runBatch: entries input[at[e] .. at[e+1]), outputs packed likewise; returns
   * the entries done. See `batchLoop`.
   */
  readonly runBatch: BatchLoop;
}

type BatchLoop = (input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array, from?: number) => number;

/**
 * The batch loop of a packed machine, as a closure over its tables: they are constants of the
 * closure rather than fields read from `this`, which lets the compiled loop keep more of them in
 * registers (measured: about 15% less time on the CMU dictionary than the same loop as a method).
 *
 * The entries go by chunks of about CHUNK_SYMBOLS symbols: the right-to-left pass over every entry
 * of the chunk, then the left-to-right pass over them. The passes of different entries are
 * independent, so the processor overlaps them, which it cannot do when each entry's left-to-right
 * pass waits for its own right-to-left one.
 */
function batchLoop(m: PackedBimachine): BatchLoop {
  const { rz, size, zBits, startOk, step, strings, pool, maxOut, maxFinal, start, rStart, labelBits: L } = m;
  const zMask = (1 << zBits) - 1;
  const string = (1 << L) - 1;
  let zbuf = new Uint16Array(CHUNK_SYMBOLS);
  const good = new Uint8Array(CHUNK_ENTRIES);
  return (input, at, out, outAt, ok, from = 0) => {
    const entries = at.length - 1;
    let n = outAt[from] as number;
    if (rStart < 0) {
      // The machine accepts nothing.
      for (let e = from; e < entries; e++) {
        ok[e] = 0;
        outAt[e + 1] = n;
      }
      return entries;
    }
    let e = from;
    while (e < entries) {
      const base = at[e] as number;
      let e2 = e + 1;
      while (e2 < entries && e2 - e < CHUNK_ENTRIES && (at[e2 + 1] as number) - base <= CHUNK_SYMBOLS) e2++;
      if (zbuf.length < (at[e2] as number) - base) zbuf = new Uint16Array((at[e2] as number) - base);
      const z = zbuf;
      // Right to left, every entry of the chunk: z[i - base] is the choice column at position i.
      for (let k = e; k < e2; k++) {
        const a = at[k] as number;
        let r = rStart;
        let i = (at[k + 1] as number) - 1;
        for (; i >= a; i--) {
          const x = input[i] as number;
          if (x >>> 0 >= size) break;
          const v = rz[r + x] as number;
          r = v >>> zBits;
          z[i - base] = v & zMask;
        }
        good[k - e] = i < a ? (startOk[r] as number) : 0;
      }
      // Left to right.
      for (let k = e; k < e2; k++) {
        const a = at[k] as number;
        const b = at[k + 1] as number;
        if (n + (b - a) * maxOut + maxFinal > out.length) return k;
        if (good[k - e] !== 1) {
          ok[k] = 0;
          outAt[k + 1] = n;
          continue;
        }
        let s = start;
        for (let i = a; i < b; i++) {
          const j = s + (z[i - base] as number);
          const v = step[j] as number;
          s = v >>> (L + 2);
          const label = v & string;
          if (label === string) {
            const p = strings[j] as number;
            const c = pool[p] as number;
            for (let q = 1; q <= c; q++) out[n++] = pool[p + q] as number;
            continue;
          }
          // Branch-free for the usual arcs: the symbol read, a label, or nothing.
          out[n] = ((input[i] as number) & ((v << (31 - L)) >> 31)) | label;
          n += (v >>> (L + 1)) & 1;
        }
        const f = step[s] as number;
        const c = pool[f] as number;
        for (let q = 1; q <= c; q++) out[n++] = pool[f + q] as number;
        ok[k] = 1;
        outAt[k + 1] = n;
      }
      e = e2;
    }
    return e;
  };
}

/** Symbols and entries of one chunk of a batch (the choice columns of a chunk stay in the nearest caches). */
const CHUNK_SYMBOLS = 4096;
const CHUNK_ENTRIES = 1024;

function sameArcs(a: Int32Array, b: Int32Array): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** What `packBimachine` needs of a FunctionalRunner (its frozen tables). */
export interface TwoPassTables {
  readonly classes: number;
  readonly classOf: Int32Array;
  readonly start: number;
  readonly rowFirst: Int32Array;
  readonly arcTarget: Int32Array;
  readonly arcOut: Int32Array;
  readonly finalAt: Int32Array;
  readonly pool: Int32Array;
  readonly rStart: number;
  readonly rNext: Int32Array;
  readonly rBits: Int32Array;
  readonly words: number;
}

/** Largest left-to-right table packBimachine makes (entries); a larger one is not built (null). */
const MAX_STEP_ENTRIES = 4_000_000;

/**
 * The packed tables of a two-pass runner, or null when they do not fit (more than 32 767 sets or
 * 2²¹ states, 65 535 choice columns, labels past 4 094, a left-to-right table past
 * MAX_STEP_ENTRIES or whose row offsets do not fit beside the output in 32 bits, or right-to-left
 * row offsets that do not fit beside the column).
 */
export function packBimachine(t: TwoPassTables, maxOut: number, maxFinal: number): PackedBimachine | null {
  const K = t.classes;
  const size = t.classOf.length;
  const states = t.finalAt.length;
  const sets = t.words === 0 ? 0 : t.rBits.length / t.words;
  const dead = sets;
  if (sets >= 0x7fff || states >= 1 << 21) return null;
  let maxLabel = 0;
  for (let k = 0; k < t.arcOut.length; k++) {
    const o = t.arcOut[k] as number;
    if (o > maxLabel) maxLabel = o;
  }
  // Label bits: room for every label and, above them, STRING.
  const L = 32 - Math.clz32(maxLabel + 1);
  if (L > 12) return null;
  const string = (1 << L) - 1;
  const inSet = (r: number, s: number): boolean => (((t.rBits[r * t.words + (s >>> 5)] as number) >>> (s & 31)) & 1) === 1;
  // Choice columns. A state only meets (c, r) when it is in R[i], where some arc of its row on c
  // leads into r; a row of one arc needs no test (as in the searching runner), and a row of several
  // takes its first arc into r (or, where the state cannot be met, its first arc). So per class c
  // the column is fixed except at the states with several arcs on c, and the columns of c are
  // told apart by those entries alone; columns are not shared between classes.
  const zOf = new Int32Array(K * (sets + 1));
  const colClass: number[] = [0];
  const colArcs: Int32Array[] = [new Int32Array(0)];
  for (let c = 1; c < K; c++) {
    const multi: number[] = [];
    for (let s = 0; s < states; s++) if ((t.rowFirst[s * K + c + 1] as number) - (t.rowFirst[s * K + c] as number) > 1) multi.push(s);
    const buckets = new Map<number, number[]>();
    const pick = new Int32Array(multi.length);
    for (let r = 0; r < sets; r++) {
      if ((t.rNext[r * K + c] as number) < 0) continue;
      let h = 0x811c9dc5;
      for (let j = 0; j < multi.length; j++) {
        const row = (multi[j] as number) * K + c;
        const end = t.rowFirst[row + 1] as number;
        let k = t.rowFirst[row] as number;
        for (let q = k; q < end; q++) if (inSet(r, t.arcTarget[q] as number)) { k = q; break; }
        pick[j] = k;
        h = Math.imul(h ^ k, 0x01000193);
      }
      const list = buckets.get(h >>> 0) ?? [];
      let z = list.find((y) => sameArcs(colArcs[y]!, pick));
      if (z === undefined) {
        z = colClass.length;
        if (z > 0xffff || (z + 1) * states > MAX_STEP_ENTRIES) return null;
        colClass.push(c);
        colArcs.push(pick.slice());
        list.push(z);
        buckets.set(h >>> 0, list);
      }
      zOf[c * (sets + 1) + r] = z;
    }
  }
  const zs = colClass.length;
  // A row offset of the right-to-left table in the bits above z (read unsigned).
  const zBits = Math.max(1, 32 - Math.clz32(zs - 1));
  if ((sets + 1) * size > 2 ** (32 - zBits) || states * zs > 2 ** (30 - L)) return null;
  const rz = new Int32Array((sets + 1) * size);
  for (let r = 0; r <= sets; r++) {
    for (let x = 0; x < size; x++) {
      const c = t.classOf[x] as number;
      const next = r === dead || c === 0 ? -1 : (t.rNext[r * K + c] as number);
      rz[r * size + x] = next < 0 ? (dead * size) << zBits : ((next * size) << zBits) | (zOf[c * (sets + 1) + r] as number);
    }
  }
  const startOk = new Uint8Array((sets + 1) * size);
  for (let r = 0; r < sets; r++) startOk[r * size] = inSet(r, t.start) ? 1 : 0;
  const step = new Int32Array(states * zs).fill(-1);
  const strings = new Int32Array(states * zs);
  for (let z = 1; z < zs; z++) {
    const c = colClass[z]!;
    const picks = colArcs[z]!;
    let j = 0;
    for (let s = 0; s < states; s++) {
      const first = t.rowFirst[s * K + c] as number;
      const n = (t.rowFirst[s * K + c + 1] as number) - first;
      if (n === 0) continue;
      const k = n === 1 ? first : (picks[j++] as number);
      const o = t.arcOut[k] as number;
      const what = o === 0 ? 0 : o === COPY ? (3 << L) : o > 0 ? (2 << L) | o : (2 << L) | string;
      if (o < 0 && o !== COPY) strings[s * zs + z] = -o - 1;
      step[s * zs + z] = (((t.arcTarget[k] as number) * zs) << (L + 2)) | what;
    }
  }
  // Column 0: the final output. A state that is not final never ends a run that the backward pass
  // accepted; offset 0 stands in (-1 would be read as an offset).
  for (let s = 0; s < states; s++) step[s * zs] = Math.max(0, t.finalAt[s] as number);
  return new PackedBimachine(size, dead * size, t.rStart < 0 ? -1 : t.rStart * size, zBits, rz, startOk, zs, L, step, strings, t.start * zs, t.pool, maxOut, maxFinal);
}
