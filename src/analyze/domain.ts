// Languages read off the step machines: D(M), the strings some output of M changes, and the image
// of a language through a machine (the strings that reach the next step).

import { EPSILON, Fst, compose, expandFinalOutputs, project } from "../fst/index.js";
import { SYLL } from "../compile/index.js";
import { shortestConflict } from "./conflict.js";
import { AnalysisLimitError, dfaOf, fstOf, guarded, type Dfa } from "./dfa.js";

import { EVEN, MAX_DELAY, advance, delayKey, delayLength, type Delay } from "./delay.js";
export { MAX_DELAY };
/**
 * Longest run of '.' in a row D is exact on. A step that deletes boundaries (syllabify) on a run of
 * them would otherwise need an unbounded delay; no step writes more than one in a row.
 */
export const MAX_BOUNDARY_RUN = 4;


/**
 * D(M) = { x | some output y of M on x differs from x }, as a minimal DFA. Built as an acceptor
 * over M's input that follows one path of M and guesses where y and x differ: either the lengths
 * differ (the count c = |output| − |input| so far ends non-zero), or at one position i, x_i ≠ y_i
 * — whichever of the two symbols comes first is remembered with the number of symbols the other
 * side still has to go before position i, and compared when it gets there. A state is (state of M,
 * c, the pending symbol and its countdown, or "differs"). Exact when |c| stays within MAX_DELAY
 * on every path (AnalysisLimitError otherwise; every rewrite of a rule is bounded). With `runs`,
 * only strings with at most that many '.' in a row are considered (longer runs are left out of D).
 */
export function changeDomain(machine: Fst, size: number, limit: number, runs = Infinity): Dfa {
  const m = expandFinalOutputs(machine);
  const nfa = new Fst();
  if (m.numStates === 0) {
    nfa.addState();
    return dfaOf(nfa, size, limit);
  }
  // Pending: side 0 none, 1 an input symbol waiting for output position, 2 an output symbol waiting for input; 3 found a difference.
  interface St { q: number; run: number; c: number; side: number; sym: number; wait: number }
  const ids = new Map<string, number>();
  const queue: St[] = [];
  const idOf = (t: St): number => {
    if (t.side !== 3 && Math.abs(t.c) > MAX_DELAY) throw new AnalysisLimitError(`the change domain (an output more than ${MAX_DELAY} symbols out of step with its input)`, MAX_DELAY);
    const key = t.side === 3 ? `${t.q}|${t.run}|x` : `${t.q}|${t.run}|${t.c}|${t.side}|${t.sym}|${t.wait}`;
    let id = ids.get(key);
    if (id === undefined) {
      id = nfa.addState();
      if (id >= limit) throw new AnalysisLimitError("the change domain", limit);
      ids.set(key, id);
      queue.push(t);
      if (m.isFinal(t.q) && (t.side === 3 || t.c !== 0)) nfa.setFinal(id);
    }
    return id;
  };
  idOf({ q: m.start, run: 0, c: 0, side: 0, sym: 0, wait: 0 });
  for (let id = 0; id < queue.length; id++) {
    const st = queue[id]!;
    for (const a of m.arcs(st.q)) {
      const run = runs === Infinity || a.input === EPSILON ? st.run : a.input === SYLL ? st.run + 1 : 0;
      if (run > runs) continue;
      const add = (t: Omit<St, "q" | "run">): void => nfa.addArc(id, a.input, a.input, idOf({ q: a.target, run, ...t }));
      if (st.side === 3) { add({ c: 0, side: 3, sym: 0, wait: 0 }); continue; }
      // The arc reads i (at input index I) and writes o (at output index O); c = O − I before it.
      const c2 = st.c + (a.output !== EPSILON ? 1 : 0) - (a.input !== EPSILON ? 1 : 0);
      // Resolve or advance a pending comparison.
      let side = st.side, sym = st.sym, wait = st.wait, differs = false, dead = false;
      if (side === 1 && a.output !== EPSILON) {
        if (wait === 0) { if (a.output !== sym) differs = true; else dead = true; } else wait--;
      } else if (side === 2 && a.input !== EPSILON) {
        if (wait === 0) { if (a.input !== sym) differs = true; else dead = true; } else wait--;
      }
      if (differs) { add({ c: 0, side: 3, sym: 0, wait: 0 }); continue; }
      if (dead) continue;
      add({ c: c2, side, sym, wait });
      if (side !== 0) continue;
      // Or guess that this arc's input (index I = i) or output (index O) is the differing position.
      // c = O − I: the input symbol at I meets output index I, which is −c outputs ahead (if c ≤ 0).
      if (a.input !== EPSILON && st.c <= 0) {
        const w = -st.c;
        if (w === 0 && a.output !== EPSILON) { if (a.output !== a.input) add({ c: 0, side: 3, sym: 0, wait: 0 }); }
        else add({ c: c2, side: 1, sym: a.input, wait: a.output !== EPSILON ? w - 1 : w });
      }
      if (a.output !== EPSILON && st.c >= 0 && !(st.c === 0 && a.input !== EPSILON)) {
        const w = st.c;
        add({ c: c2, side: 2, sym: a.output, wait: a.input !== EPSILON ? w - 1 : w });
      }
    }
  }
  return dfaOf(nfa, size, limit, "the change domain");
}

/**
 * The same language by the direct construction: states pair a state of M with the delay between
 * what was read and what was written (the unmatched part of one side, or "mismatch"). Fast when
 * rewrites are short; the delay strings multiply with deletions, so it gives up past `cap` states.
 */
function changeDomainBuffered(machine: Fst, size: number, cap: number): Dfa {
  const m = expandFinalOutputs(machine);
  const nfa = new Fst();
  if (m.numStates === 0) {
    nfa.addState();
    return dfaOf(nfa, size, cap);
  }
  const ids = new Map<string, number>();
  const queue: { q: number; d: Delay }[] = [];
  const idOf = (q: number, d: Delay): number => {
    if (delayLength(d) > MAX_DELAY) throw new AnalysisLimitError("the change domain", cap);
    const key = `${q}|${delayKey(d)}`;
    let id = ids.get(key);
    if (id === undefined) {
      id = nfa.addState();
      if (id >= cap) throw new AnalysisLimitError("the change domain", cap);
      ids.set(key, id);
      queue.push({ q, d });
      if (m.isFinal(q) && d !== EVEN) nfa.setFinal(id);
    }
    return id;
  };
  idOf(m.start, EVEN);
  for (let id = 0; id < queue.length; id++) {
    const { q, d } = queue[id]!;
    for (const a of m.arcs(q)) {
      nfa.addArc(id, a.input, a.input, idOf(a.target, advance(d, a.input === EPSILON ? [] : [a.input], a.output === EPSILON ? [] : [a.output])));
    }
  }
  return dfaOf(nfa, size, cap, "the change domain");
}

/** D(M), and whether it had to be restricted to strings with at most MAX_BOUNDARY_RUN '.' in a row. */
export interface ChangeDomain {
  readonly dfa: Dfa;
  readonly restricted: boolean;
}

/**
 * D(M) exactly when the delays stay bounded on every string; else, for a step that is its own
 * repetition (M ∘ M = M, checked exactly; syllabify deletes every '.' and writes its own), the
 * complement of its image (such a step fixes exactly the strings it can write); else exactly on
 * the strings with at most MAX_BOUNDARY_RUN '.' in a row, which every search using it is then
 * restricted to.
 */
export function changeDomainOf(machine: Fst, size: number, limit: number, idempotentFirst = false): ChangeDomain {
  // An idempotent function (M ∘ M = M, like syllabify) fixes exactly its image: D = Σ* − M(Σ*).
  const all = universal(size);
  const idempotent = (): boolean =>
    guarded("the idempotence test", limit, () => shortestConflict(all, compose(machine, machine, { maxStates: limit }), machine, limit, "the idempotence test")) === null;
  if (idempotentFirst && idempotent()) return { dfa: complementDfa(imageOf(all, machine, limit)), restricted: false };
  try {
    return { dfa: changeDomainBuffered(machine, size, Math.min(limit, 20_000)), restricted: false };
  } catch (e) {
    if (!(e instanceof AnalysisLimitError)) throw e;
  }
  try {
    return { dfa: changeDomain(machine, size, limit), restricted: false };
  } catch (e) {
    if (!(e instanceof AnalysisLimitError) || e.limit !== MAX_DELAY) throw e;
  }
  if (!idempotentFirst && idempotent()) return { dfa: complementDfa(imageOf(all, machine, limit)), restricted: false };
  return { dfa: changeDomain(machine, size, limit, MAX_BOUNDARY_RUN), restricted: true };
}

/** Σ*: every string over symbols 1 … size-1. */
export function universal(size: number): Dfa {
  const table = new Int32Array(size).fill(0);
  table[0] = -1;
  return { size, states: 1, start: 0, finals: new Uint8Array([1]), table };
}

/** The complement Σ* − L of a DFA (completed with a sink state). */
export function complementDfa(d: Dfa): Dfa {
  const states = Math.max(d.states, 0) + 1;
  const sink = states - 1;
  const table = new Int32Array(states * d.size).fill(sink);
  for (let s = 0; s < d.states; s++) for (let x = 1; x < d.size; x++) { const t = d.table[s * d.size + x]!; table[s * d.size + x] = t >= 0 ? t : sink; }
  for (let s = 0; s < states; s++) table[s * d.size] = -1;
  const finals = new Uint8Array(states);
  for (let s = 0; s < states; s++) finals[s] = s === sink ? 1 : d.finals[s] === 1 ? 0 : 1;
  return { size: d.size, states, start: d.start < 0 ? sink : d.start, finals, table };
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
