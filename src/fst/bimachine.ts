// The two-pass runner of a functional transducer as two one-load tables (a bimachine in
// Schützenberger's sense): the right-to-left pass reads one Int32 per symbol that gives both the
// next state set and a "choice column", and the left-to-right pass reads one Int32 per symbol that
// gives the next state and the output code — integers only, no search, no allocation per symbol.

import type { Label } from "./fst.js";
import { COPY } from "./frozen.js";

/**
 * Built from the tables of a `FunctionalRunner` (see functional.ts): sets R of the right-to-left
 * DFA, machine states s, input classes c.
 *
 * Right-to-left: `rz[r·size + x]` = `next << 16 | z` for the set r = R[i+1] and the symbol x = w[i]:
 * `next` is R[i] (the dead set `dead` when w[i..n) is accepted from no state) and z is the class of
 * the pair (class of x, r). Two pairs share a class when every state takes the same arc on them
 * (the arc whose target is in r — one exists whenever s ∈ R[i] — and, the machine being
 * functional, any of them writes the same output).
 *
 * Left-to-right: `step[s·zs + z]` = `target << 10 | code` (code 0: nothing, 1: the symbol read,
 * 2 … 1021: label code − 1, STRING: the string at `strings[s·zs + z]` in the pool).
 */
export class PackedBimachine {
  constructor(
    readonly size: number,
    readonly dead: number,
    readonly rStart: number,
    readonly rz: Int32Array,
    /** startOk[r] = 1 when the machine's start state is in set r. */
    readonly startOk: Uint8Array,
    readonly zs: number,
    readonly step: Int32Array,
    readonly strings: Int32Array,
    readonly start: number,
    /** Pool offset of each state's final output, -1 when not final. */
    readonly finalAt: Int32Array,
    readonly pool: Int32Array,
    /** Longest output of one symbol (sizes the batch's output room). */
    readonly maxOut: number,
    readonly maxFinal: number,
  ) {}

  private zbuf = new Int32Array(64);

  /** The right-to-left pass over input[a..b): fills zbuf; false when the input is not accepted. */
  private backward(input: ArrayLike<number>, a: number, b: number): boolean {
    const len = b - a;
    if (this.zbuf.length < len) this.zbuf = new Int32Array(Math.max(len, this.zbuf.length * 2));
    const { rz, size, dead } = this;
    const z = this.zbuf;
    let r = this.rStart;
    if (r < 0) return false;
    for (let i = len - 1; i >= 0; i--) {
      const x = input[a + i] as number;
      if (x >>> 0 >= size) return false;
      const v = rz[r * size + x] as number;
      r = v >>> 16;
      z[i] = v & 0xffff;
    }
    return r !== dead && this.startOk[r] === 1;
  }

  /** Runs `input`; appends its output to `out`; false when the input is not accepted. */
  run(input: ArrayLike<Label>, out: Label[]): boolean {
    const n = input.length;
    if (!this.backward(input, 0, n)) return false;
    const { step, zs, strings, pool } = this;
    const z = this.zbuf;
    let s = this.start;
    for (let i = 0; i < n; i++) {
      const v = step[s * zs + (z[i] as number)] as number;
      const code = v & 1023;
      if (code === 1) out.push(input[i] as number);
      else if (code === STRING) {
        const p = strings[s * zs + (z[i] as number)] as number;
        for (let j = 1; j <= (pool[p] as number); j++) out.push(pool[p + j] as number);
      } else if (code !== 0) out.push(code - 1);
      s = v >> 10;
    }
    const f = this.finalAt[s] as number;
    for (let j = 1; j <= (this.pool[f] as number); j++) out.push(this.pool[f + j] as number);
    return true;
  }

  /** As FunctionalRunner.runBatch: entries input[at[e] .. at[e+1]), outputs packed likewise; returns the entries done. */
  runBatch(input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array, from = 0): number {
    const { step, zs, strings, pool, finalAt, maxOut, maxFinal, start } = this;
    const entries = at.length - 1;
    let n = outAt[from] as number;
    let e = from;
    for (; e < entries; e++) {
      const a = at[e] as number;
      const b = at[e + 1] as number;
      if (n + (b - a) * maxOut + maxFinal > out.length) break;
      if (!this.backward(input, a, b)) {
        ok[e] = 0;
        outAt[e + 1] = n;
        continue;
      }
      const z = this.zbuf;
      let s = start;
      for (let i = a; i < b; i++) {
        const k = s * zs + (z[i - a] as number);
        const v = step[k] as number;
        const code = v & 1023;
        s = v >> 10;
        if (code === STRING) {
          const p = strings[k] as number;
          const m = pool[p] as number;
          for (let j = 1; j <= m; j++) out[n++] = pool[p + j] as number;
          continue;
        }
        // Branch-free for the common codes: the symbol read, a label, or nothing.
        out[n] = code === 1 ? (input[i] as number) : code - 1;
        n += code === 0 ? 0 : 1;
      }
      const f = finalAt[s] as number;
      const m = pool[f] as number;
      for (let j = 1; j <= m; j++) out[n++] = pool[f + j] as number;
      ok[e] = 1;
      outAt[e + 1] = n;
    }
    return e;
  }
}

function sameArcs(a: Int32Array, b: Int32Array): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** The code of an output string (looked up in `strings`). */
export const STRING = 1023;

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
 * 2²¹ states, 65 535 choice columns, labels of 1 021 or more, or a left-to-right table past
 * MAX_STEP_ENTRIES).
 */
export function packBimachine(t: TwoPassTables, maxOut: number, maxFinal: number): PackedBimachine | null {
  const K = t.classes;
  const size = t.classOf.length;
  const states = t.finalAt.length;
  const sets = t.words === 0 ? 0 : t.rBits.length / t.words;
  const dead = sets;
  if (sets >= 0x7fff || states >= 1 << 21) return null;
  for (let k = 0; k < t.arcOut.length; k++) {
    const o = t.arcOut[k] as number;
    if (o > 0 && o >= 1022) return null;
  }
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
  const rz = new Int32Array((sets + 1) * size);
  for (let r = 0; r <= sets; r++) {
    for (let x = 0; x < size; x++) {
      const c = t.classOf[x] as number;
      const next = r === dead || c === 0 ? -1 : (t.rNext[r * K + c] as number);
      rz[r * size + x] = next < 0 ? (dead << 16) : (next << 16) | (zOf[c * (sets + 1) + r] as number);
    }
  }
  const startOk = new Uint8Array(sets + 1);
  for (let r = 0; r < sets; r++) startOk[r] = inSet(r, t.start) ? 1 : 0;
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
      const code = o === 0 ? 0 : o === COPY ? 1 : o > 0 ? o + 1 : STRING;
      if (code === STRING) strings[s * zs + z] = -o - 1;
      step[s * zs + z] = ((t.arcTarget[k] as number) << 10) | code;
    }
  }
  return new PackedBimachine(size, dead, t.rStart, rz, startOk, zs, step, strings, t.start, packedFinals(t.finalAt), t.pool, maxOut, maxFinal);
}

/** The packed tables' final outputs from a runner's (-1, not final, becomes 0). */
export function packedFinals(finalAt: Int32Array): Int32Array {
  // A state that is not final never ends a run that the backward pass accepted; -1 would be read as an offset.
  return Int32Array.from(finalAt, (f) => (f < 0 ? 0 : f));
}
