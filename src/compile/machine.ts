// Turning the rule construction's pair NFAs into machines of the fst algebra, minimised: the pair
// acceptor is determinised and minimised with each input:output pair as one letter (the
// documented transducer method of fst/minimise.ts), which leaves the relation unchanged.

import { Fst, minimise, minimiseTable, rowsOf, trim, trimTable, type DeterminiseOptions } from "../fst/index.js";
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

/**
 * `finishMachine(pairNfaToFst(p))` without the intermediate machines: the pair NFA's arcs as an
 * arc table (grouped by source state, each state's arcs in their order), trimmed and minimised.
 */
export function finishPairNfa(p: PairNfa, opts: DeterminiseOptions = {}): Fst {
  const a = p.arcs;
  const m = a.length / 4;
  const from = new Int32Array(m);
  for (let k = 0; k < m; k++) from[k] = a[4 * k]!;
  const rows = rowsOf(p.states, from);
  const tails = new Int32Array(m), inputs = new Int32Array(m), outputs = new Int32Array(m), heads = new Int32Array(m);
  for (let i = 0; i < m; i++) {
    const k = 4 * rows.arc[i]!;
    tails[i] = a[k]!;
    inputs[i] = a[k + 1]!;
    outputs[i] = a[k + 2]!;
    heads[i] = a[k + 3]!;
  }
  const final = new Uint8Array(p.states);
  for (const s of p.finals) final[s] = 1;
  return minimiseTable(trimTable({ states: p.states, start: p.start, final, tails, inputs, outputs, heads }), opts);
}

/** The states and arcs of a machine, for reports. */
export function sizeOf(f: Fst): { states: number; arcs: number } {
  return { states: f.numStates, arcs: f.numArcs() };
}
