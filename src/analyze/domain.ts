// Languages read off the step machines: D(M), the strings some output of M changes, and the image
// of a language through a machine (the strings that reach the next step).

import { EPSILON, Fst, compose, expandFinalOutputs, project } from "../fst/index.js";
import { SYLL } from "../compile/index.js";
import { EVEN, advance, delayKey, delayLength, type Delay } from "./delay.js";
import { AnalysisLimitError, dfaOf, fstOf, guarded, type Dfa } from "./dfa.js";

/** Longest stretch by which a path's output may run ahead of its input (or behind) while D is built. */
export const MAX_DELAY = 12;
/**
 * Longest run of '.' in a row D is exact on. A step that deletes boundaries (syllabify) on a run of
 * them would otherwise need an unbounded delay; no step writes more than one in a row.
 */
export const MAX_BOUNDARY_RUN = 4;

const keyOf = (q: number, run: number, d: Delay): string => `${q}|${run}|${delayKey(d)}`;

/**
 * D(M) = { x | some output of M on x differs from x }, as a minimal DFA. Built as an acceptor over
 * M's input whose states pair a state of M with the delay between what was read and what was
 * written (the part of one side not yet matched by the other, or "mismatch"); a run is accepted at
 * a final state of M with a non-empty delay or a mismatch. Exact for any machine whose delays stay
 * within MAX_DELAY (AnalysisLimitError otherwise; every rewrite of a rule is bounded). With `runs`,
 * only strings with at most that many '.' in a row are considered (longer runs are left out of D).
 */
export function changeDomain(machine: Fst, size: number, limit: number, runs = Infinity): Dfa {
  const m = expandFinalOutputs(machine);
  const nfa = new Fst();
  if (m.numStates === 0) {
    nfa.addState();
    return dfaOf(nfa, size, limit);
  }
  const ids = new Map<string, number>();
  const queue: { q: number; run: number; d: Delay }[] = [];
  const idOf = (q: number, run: number, d: Delay): number => {
    if (delayLength(d) > MAX_DELAY) throw new AnalysisLimitError(`the change domain (an output more than ${MAX_DELAY} symbols out of step with its input)`, MAX_DELAY);
    const key = keyOf(q, run, d);
    let id = ids.get(key);
    if (id === undefined) {
      id = nfa.addState();
      if (id >= limit) throw new AnalysisLimitError("the change domain", limit);
      ids.set(key, id);
      queue.push({ q, run, d });
      if (m.isFinal(q) && d !== EVEN) nfa.setFinal(id);
    }
    return id;
  };
  idOf(m.start, 0, EVEN);
  for (let id = 0; id < queue.length; id++) {
    const { q, run, d } = queue[id]!;
    for (const a of m.arcs(q)) {
      const r = a.input === EPSILON ? run : a.input === SYLL ? run + 1 : 0;
      if (r > runs) continue;
      const t = idOf(a.target, r, advance(d, a.input === EPSILON ? [] : [a.input], a.output === EPSILON ? [] : [a.output]));
      nfa.addArc(id, a.input, a.input, t);
    }
  }
  return dfaOf(nfa, size, limit, "the change domain");
}

/** D(M), and whether it had to be restricted to strings with at most MAX_BOUNDARY_RUN '.' in a row. */
export interface ChangeDomain {
  readonly dfa: Dfa;
  readonly restricted: boolean;
}

/**
 * D(M) exactly when the delays stay bounded on every string; else (a step that deletes '.' and
 * writes it back elsewhere, like syllabify, on a long run of them) exactly on the strings with at
 * most MAX_BOUNDARY_RUN '.' in a row, which every search using it is then restricted to.
 */
export function changeDomainOf(machine: Fst, size: number, limit: number): ChangeDomain {
  try {
    return { dfa: changeDomain(machine, size, limit), restricted: false };
  } catch (e) {
    if (!(e instanceof AnalysisLimitError) || e.limit !== MAX_DELAY) throw e;
    return { dfa: changeDomain(machine, size, limit, MAX_BOUNDARY_RUN), restricted: true };
  }
}

/** The strings with at most MAX_BOUNDARY_RUN '.' in a row. */
export function boundaryRuns(size: number): Dfa {
  const states = MAX_BOUNDARY_RUN + 1;
  const table = new Int32Array(states * size).fill(-1);
  for (let s = 0; s < states; s++) {
    for (let x = 1; x < size; x++) table[s * size + x] = x === SYLL ? (s + 1 < states ? s + 1 : -1) : 0;
  }
  return { size, states, start: 0, finals: new Uint8Array(states).fill(1), table };
}

/** The image { y | (x, y) ∈ M, x ∈ L } as a minimal DFA. */
export function imageOf(lang: Dfa, machine: Fst, limit: number): Dfa {
  const c = guarded("the image of the reachable strings", limit, () => compose(fstOf(lang), machine, { maxStates: limit }));
  return dfaOf(project(c, "output"), lang.size, limit, "the reachable strings");
}
