// Dense deterministic acceptors over a compiled alphabet, the form every analysis runs its
// searches on: built from fst acceptors (subset construction, then minimisation), turned back into
// fst machines for compositions, and the language of well-formed input words.

import { EPSILON, Fst, FstLimitError, determinise, minimise, trim } from "../fst/index.js";
import type { Alphabet } from "../compile/index.js";
import { WORD, SYLL, JOIN, FIRST_SEGMENT } from "../compile/index.js";
import type { Inventory } from "../inventory/types.js";

/** A complete-or-partial DFA: `table[s * size + x]` is the target or -1 (the implicit sink). */
export interface Dfa {
  readonly size: number;
  readonly states: number;
  readonly start: number;
  readonly finals: Uint8Array;
  readonly table: Int32Array;
}

/** Thrown when an analysis would build a machine above its state limit. */
export class AnalysisLimitError extends Error {
  constructor(readonly what: string, readonly limit: number) {
    super(`${what} would exceed ${limit} states`);
    this.name = "AnalysisLimitError";
  }
}

/** Rethrows the fst algebra's limit error as ours, with the analysis step named. */
export function guarded<T>(what: string, limit: number, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof FstLimitError) throw new AnalysisLimitError(what, limit);
    throw e;
  }
}

/** The minimal DFA of an acceptor (ε arcs allowed) over labels 1 … size-1. */
export function dfaOf(acceptor: Fst, size: number, limit: number, what = "a determinised language"): Dfa {
  const d = guarded(what, limit, () => determinise(acceptor, { maxStates: limit }));
  const m = trim(minimise(d));
  if (m.numStates > limit) throw new AnalysisLimitError(what, limit);
  const states = m.numStates;
  const table = new Int32Array(states * size).fill(-1);
  const finals = new Uint8Array(states);
  for (let s = 0; s < states; s++) {
    if (m.isFinal(s)) finals[s] = 1;
    for (const a of m.arcs(s)) if (a.input !== EPSILON && a.input < size) table[s * size + a.input] = a.target;
  }
  return { size, states, start: states > 0 ? m.start : -1, finals, table };
}

/** The DFA as an fst acceptor (for composition). */
export function fstOf(d: Dfa): Fst {
  const f = new Fst();
  if (d.states === 0) {
    f.addState();
    return f;
  }
  f.addStates(d.states);
  f.setStart(d.start);
  for (let s = 0; s < d.states; s++) {
    if (d.finals[s]) f.setFinal(s);
    for (let x = 1; x < d.size; x++) {
      const t = d.table[s * d.size + x]!;
      if (t >= 0) f.addArc(s, x, x, t);
    }
  }
  return f;
}

/** Whether the DFA accepts `ids`. */
export function accepts(d: Dfa, ids: ArrayLike<number>): boolean {
  let s = d.start;
  for (let i = 0; i < ids.length && s >= 0; i++) s = d.table[s * d.size + ids[i]!]!;
  return s >= 0 && d.finals[s] === 1;
}

export function isEmptyDfa(d: Dfa): boolean {
  return !d.finals.some((f) => f === 1);
}

/**
 * The input words every grammar run starts from (DEVELOPERS.md, "The string every stage sees"):
 * `#`, one or more of the inventory's segments with at most one `.` or `+` between two of them, `#`;
 * either every nucleus unmarked ([0stress 0primary]) or every nucleus marked (stressed or
 * unstressed) with at least one stressed. Consonants are [0stress 0primary]. Single words only
 * (no phrase-internal `#`).
 */
export function inputWords(alphabet: Alphabet, inv: Inventory): Dfa {
  const size = alphabet.size;
  const syl = inv.featureIndex.get("syllabic");
  const st = inv.featureIndex.get("stress");
  const base = alphabet.domains[0];
  // Symbol classes: 0 consonant, 1 unmarked nucleus, 2 unstressed nucleus, 3 stressed nucleus, -1 not an input segment.
  const cls = new Int8Array(size).fill(-1);
  for (const s of alphabet.segments) {
    if (base !== undefined && !base[s.id]) continue;
    const nucleus = syl !== undefined && s.bundle[syl] === "+";
    if (!nucleus) { if (st === undefined || s.bundle[st] === "0") cls[s.id] = 0; continue; }
    const v = st === undefined ? "0" : s.bundle[st];
    cls[s.id] = v === "0" ? 1 : v === "-" ? 2 : 3;
  }
  // Modes: 0 consonants only, 1 unmarked, 2 marked without a stress yet, 3 marked with a stress.
  const next = (mode: number, c: number): number => {
    if (c === 0) return mode;
    if (c === 1) return mode === 0 || mode === 1 ? 1 : -1;
    if (c === 2) return mode === 0 || mode === 2 ? 2 : mode === 3 ? 3 : -1;
    return mode === 1 ? -1 : 3;
  };
  // States: 0 start, 1 after the first '#', 2 + mode*2 + (0 after a segment | 1 after '.' or '+'), 10 final.
  const states = 11;
  const table = new Int32Array(states * size).fill(-1);
  const finals = new Uint8Array(states);
  finals[10] = 1;
  table[0 * size + WORD] = 1;
  for (let x = FIRST_SEGMENT; x < size; x++) {
    const c = cls[x]!;
    if (c < 0) continue;
    const m1 = next(0, c);
    if (m1 >= 0) table[1 * size + x] = 2 + m1 * 2;
    for (let mode = 0; mode < 4; mode++) {
      const m = next(mode, c);
      if (m < 0) continue;
      table[(2 + mode * 2) * size + x] = 2 + m * 2;
      table[(3 + mode * 2) * size + x] = 2 + m * 2;
    }
  }
  for (let mode = 0; mode < 4; mode++) {
    table[(2 + mode * 2) * size + SYLL] = 3 + mode * 2;
    // A morpheme join stands between two segments, as a '.' does (lexicon/joins.ts).
    if (JOIN < size) table[(2 + mode * 2) * size + JOIN] = 3 + mode * 2;
    if (mode !== 2) table[(2 + mode * 2) * size + WORD] = 10;
  }
  return { size, states, start: 0, finals, table };
}
