// The practical limit of any table-driven machine: a dense DFA transition table (states × symbols,
// one Int32Array) walked over the concatenated symbol ids, one typed-array lookup per symbol.

import { seededRandom } from "./util.js";

export interface DenseDfa {
  readonly states: number;
  readonly symbols: number;
  /** next[state * symbols + symbol]; every entry is a state (total function, no reject checks). */
  readonly next: Int32Array;
}

/** A random total DFA with the given size (seeded): the walk's cost does not depend on what it recognises. */
export function randomDfa(states: number, symbols: number, seed: number): DenseDfa {
  const rnd = seededRandom(seed);
  const next = new Int32Array(states * symbols);
  for (let i = 0; i < next.length; i++) next[i] = Math.floor(rnd() * states);
  return { states, symbols, next };
}

/**
 * Walks `ids` (entries concatenated; `at` gives where each starts) from state 0 at the start of
 * every entry; returns the sum of the final states, so the loop cannot be optimised away.
 */
export function walk(dfa: DenseDfa, ids: Int32Array, at: Int32Array): number {
  const { next, symbols } = dfa;
  let sum = 0;
  const n = at.length - 1;
  for (let e = 0; e < n; e++) {
    let s = 0;
    const end = at[e + 1]!;
    for (let i = at[e]!; i < end; i++) s = next[s * symbols + ids[i]!]!;
    sum += s;
  }
  return sum;
}
