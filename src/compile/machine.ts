// Turning the rule construction's pair NFAs into machines of the fst algebra, minimised: the pair
// acceptor is determinised and minimised with each input:output pair as one letter (the
// documented transducer method of fst/minimise.ts), which leaves the relation unchanged.

import { Fst, minimise, trim, type DeterminiseOptions } from "../fst/index.js";
import type { PairNfa } from "./rule.js";

/** The relation of a pair NFA as an fst machine (not yet minimised). */
export function pairNfaToFst(p: PairNfa): Fst {
  const f = new Fst();
  f.addStates(p.states);
  f.setStart(p.start);
  for (const s of p.finals) f.setFinal(s);
  const a = p.arcs;
  for (let i = 0; i < a.length; i += 4) f.addArc(a[i]!, a[i + 1]!, a[i + 2]!, a[i + 3]!);
  return f;
}

/** Trimmed and minimised (as an acceptor over input:output pairs, or as a sequential machine); `opts` bound the determinisation. */
export function finishMachine(f: Fst, opts: DeterminiseOptions = {}): Fst {
  const t = trim(f);
  if (t.numStates === 0) return t;
  return minimise(t, opts);
}

/** The states and arcs of a machine, for reports. */
export function sizeOf(f: Fst): { states: number; arcs: number } {
  return { states: f.numStates, arcs: f.numArcs() };
}
