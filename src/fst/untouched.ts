// Which input symbols a transducer can change. A machine whose every arc on symbol x writes x
// itself, that never writes without reading (no ε-input arc with an output, no final output), maps
// any string made only of such symbols to that string itself on every path: a run on it can only
// copy it or reject it. The lexicon's per-step blame uses this to skip a step's run on a word the
// step cannot change (lexicon/engine-machine.ts, where a rejection cannot happen: see there),
// testing every block at once from bits per symbol (TouchMasks).

import { EPSILON, type Fst } from "./fst.js";

/**
 * Symbols the machine may change (1 at the symbol's label): those read by an arc that writes
 * anything other than the symbol read. Null when the machine can write without reading (an
 * ε-input arc with an output, or a final state with a final output): then no string is safe.
 * A string with none of the marked symbols is copied by every accepting path.
 */
export function touchedSymbols(fst: Fst): Uint8Array | null {
  let most = 0;
  for (let s = 0; s < fst.numStates; s++) for (const a of fst.arcs(s)) most = Math.max(most, a.input);
  const touched = new Uint8Array(most + 1);
  for (let s = 0; s < fst.numStates; s++) {
    if ((fst.finalOutput(s)?.length ?? 0) > 0) return null;
    for (const a of fst.arcs(s)) {
      if (a.input === EPSILON) {
        if (a.output !== EPSILON) return null;
      } else if (a.output !== a.input) touched[a.input] = 1;
    }
  }
  return touched;
}

/** Whether `word` holds a symbol `touched` marks (a label past its end counts as marked: unknown to the machine). */
export function touches(touched: Uint8Array, word: ArrayLike<number>): boolean {
  const n = touched.length;
  for (let i = 0; i < word.length; i++) {
    const x = word[i]!;
    if (x >= n || touched[x] !== 0) return true;
  }
  return false;
}

/**
 * The tables of a cascade's blocks (`touchedSymbols` of each; null: the block is always run) as
 * bits per symbol, 32 blocks to a 32-bit word: the blocks a word must be run through are the OR of
 * its symbols' bits, found in one pass over the word instead of one pass per block.
 */
export class TouchMasks {
  /** 32-bit words per mask. */
  readonly width: number;
  /** bits[x * width + w]: the blocks that may change symbol x (and every always-run block). */
  private readonly bits: Int32Array;
  /** The mask of a symbol past every table (unknown to the machines) and of the empty word's always-run blocks. */
  private readonly all: Int32Array;
  private readonly none: Int32Array;
  private readonly size: number;

  constructor(tables: readonly (Uint8Array | null)[]) {
    const width = Math.max(1, Math.ceil(tables.length / 32));
    let size = 0;
    for (const t of tables) if (t !== null) size = Math.max(size, t.length);
    const bits = new Int32Array(size * width);
    const all = new Int32Array(width);
    const none = new Int32Array(width);
    tables.forEach((t, k) => {
      const w = k >>> 5;
      const bit = 1 << (k & 31);
      all[w]! |= bit;
      if (t === null) none[w]! |= bit;
      for (let x = 0; x < size; x++) if (t === null || x >= t.length || t[x] !== 0) bits[x * width + w]! |= bit;
    });
    this.width = width;
    this.bits = bits;
    this.all = all;
    this.none = none;
    this.size = size;
  }

  /** Puts into `into` (`width` words) the blocks `word` must be run through. */
  fill(word: ArrayLike<number>, into: Int32Array): void {
    const width = this.width;
    const bits = this.bits;
    if (width === 1) {
      let m = this.none[0]!;
      for (let i = 0; i < word.length; i++) {
        const x = word[i]!;
        m |= x < this.size ? bits[x]! : this.all[0]!;
      }
      into[0] = m;
      return;
    }
    into.set(this.none);
    for (let i = 0; i < word.length; i++) {
      const x = word[i]!;
      const from = x < this.size ? bits : this.all;
      const at = x < this.size ? x * width : 0;
      for (let w = 0; w < width; w++) into[w]! |= from[at + w]!;
    }
  }
}

/** Whether block `k` is among the blocks of `mask` (TouchMasks.fill). */
export const runsBlock = (mask: Int32Array, k: number): boolean => ((mask[k >>> 5]! >>> (k & 31)) & 1) !== 0;
