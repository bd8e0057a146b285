// Which input symbols a transducer can change. A machine whose every arc on symbol x writes x
// itself, that never writes without reading (no ε-input arc with an output, no final output), maps
// any string made only of such symbols to that string itself on every path: a run on it can only
// copy it or reject it. The lexicon's per-step blame uses this to skip a step's run on a word the
// step cannot change (lexicon/engine-machine.ts, where a rejection cannot happen: see there).

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
