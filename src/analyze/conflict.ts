// The shortest string of a language on which two machines write different outputs: the swap test
// of two adjacent steps (one order against the other) and the environment test (a rule with and
// without one environment). Breadth-first over (language state, state of each machine, delay).

import { FstError, removeInputEpsilons, type Fst, type StrArc, type StrMachine } from "../fst/index.js";
import { AnalysisLimitError, type Dfa } from "./dfa.js";
import { EVEN, MAX_DELAY, advance, delayKey, delayLength, type Delay } from "./delay.js";

function strMachine(f: Fst, which: string): StrMachine {
  const r = removeInputEpsilons(f);
  if (!r.ok) throw new FstError(`${which} writes unboundedly many symbols without reading any`);
  return r.machine;
}

/** Least symbol of each class of symbols the language and both machines treat alike. */
function classes(size: number, lang: Dfa, ms: readonly StrMachine[]): number[] {
  const sig: string[] = new Array<string>(size).fill("");
  for (let x = 1; x < size; x++) {
    const parts: number[] = [];
    for (let s = 0; s < lang.states; s++) parts.push(lang.table[s * size + x]!);
    sig[x] = parts.join(",");
  }
  ms.forEach((m, i) => {
    const on: string[][] = Array.from({ length: size }, () => []);
    m.arcs.forEach((list, q) => {
      for (const a of list) if (a.input < size) on[a.input]!.push(`${q}:${a.output.map((o) => (o === a.input ? "=" : o)).join(" ")}>${a.target}`);
    });
    for (let x = 1; x < size; x++) sig[x] += `|${i}|` + on[x]!.sort().join(";");
  });
  const seen = new Set<string>();
  const reps: number[] = [];
  for (let x = 1; x < size; x++) if (!seen.has(sig[x]!)) { seen.add(sig[x]!); reps.push(x); }
  return reps;
}

/**
 * Pairs (p, q) of states from which some common input is accepted by both machines: paths that
 * guessed differently (a rewrite against a copy whose context the input will decide) are left out,
 * so the delays of the pairs kept stay bounded for functional machines.
 */
function usefulPairs(a: StrMachine, b: StrMachine, arcsA: Map<number, StrArc[]>[], arcsB: Map<number, StrArc[]>[], reps: readonly number[], limit: number, what: string): Set<number> {
  const nb = b.arcs.length;
  const start = a.start * nb + b.start;
  const seen = new Set<number>([start]);
  const order = [start];
  const preds = new Map<number, number[]>();
  for (let k = 0; k < order.length; k++) {
    const pq = order[k]!;
    const p = Math.floor(pq / nb), q = pq % nb;
    for (const x of reps) {
      const la = arcsA[p]!.get(x), lb = arcsB[q]!.get(x);
      if (la === undefined || lb === undefined) continue;
      for (const e of la) for (const f of lb) {
        const t = e.target * nb + f.target;
        const list = preds.get(t);
        if (list === undefined) preds.set(t, [pq]);
        else list.push(pq);
        if (!seen.has(t)) {
          if (seen.size >= limit) throw new AnalysisLimitError(what, limit);
          seen.add(t);
          order.push(t);
        }
      }
    }
  }
  const useful = new Set<number>();
  const stack: number[] = [];
  for (const pq of order) if (a.finals[Math.floor(pq / nb)]!.length > 0 && b.finals[pq % nb]!.length > 0) { useful.add(pq); stack.push(pq); }
  while (stack.length > 0) {
    for (const r of preds.get(stack.pop()!) ?? []) if (!useful.has(r)) { useful.add(r); stack.push(r); }
  }
  return useful;
}

/**
 * The shortest x in `lang` (then the first found, symbols ascending) such that some output of
 * `m1` on x differs from some output of `m2` on x, or exactly one of them accepts x; null when none.
 * For functional machines this is the shortest distinguishing input (Béal, Carton, Prieur &
 * Sakarovitch's delay argument bounds the search; beyond MAX_DELAY it stops as undecided).
 */
export function shortestConflict(lang: Dfa, m1: Fst, m2: Fst, limit: number, what: string): number[] | null {
  const a = strMachine(m1, "the first machine");
  const b = strMachine(m2, "the second machine");
  const size = lang.size;
  if (lang.start < 0) return null;
  const reps = classes(size, lang, [a, b]);
  const isRep = new Uint8Array(size);
  for (const x of reps) isRep[x] = 1;
  const byInput = (m: StrMachine): Map<number, StrArc[]>[] => m.arcs.map((list) => {
    const map = new Map<number, StrArc[]>();
    for (const arc of list) {
      if (!isRep[arc.input]) continue;
      const l = map.get(arc.input);
      if (l === undefined) map.set(arc.input, [arc]);
      else l.push(arc);
    }
    return map;
  });
  const arcsA = byInput(a), arcsB = byInput(b);
  const useful = usefulPairs(a, b, arcsA, arcsB, reps, limit, what);
  const nodes: { r: number; p: number; q: number; d: Delay; parent: number; x: number }[] = [];
  const seen = new Set<string>();
  const push = (r: number, p: number, q: number, d: Delay, parent: number, x: number): void => {
    if (delayLength(d) > MAX_DELAY) throw new AnalysisLimitError(`${what} (outputs more than ${MAX_DELAY} symbols apart)`, limit);
    const key = `${r},${p},${q},${delayKey(d)}`;
    if (seen.has(key)) return;
    if (nodes.length >= limit) throw new AnalysisLimitError(what, limit);
    seen.add(key);
    nodes.push({ r, p, q, d, parent, x });
  };
  const path = (k: number): number[] => {
    const w: number[] = [];
    for (let i = k; nodes[i]!.parent >= 0; i = nodes[i]!.parent) w.push(nodes[i]!.x);
    return w.reverse();
  };
  if (!useful.has(a.start * b.arcs.length + b.start)) return null;
  push(lang.start, a.start, b.start, EVEN, -1, 0);
  for (let k = 0; k < nodes.length; k++) {
    const { r, p, q, d } = nodes[k]!;
    if (lang.finals[r] === 1) {
      const fa = a.finals[p]!, fb = b.finals[q]!;
      for (const f1 of fa) for (const f2 of fb) if (advance(d, f1, f2) !== EVEN) return path(k);
    }
    const ma = arcsA[p]!, mb = arcsB[q]!;
    for (const x of reps) {
      const r2 = lang.table[r * size + x]!;
      if (r2 < 0) continue;
      const la = ma.get(x), lb = mb.get(x);
      // A path of one machine that cannot read x ends here; the other paths carry on.
      if (la === undefined || lb === undefined) continue;
      for (const e of la) for (const f of lb) if (useful.has(e.target * b.arcs.length + f.target)) push(r2, e.target, f.target, advance(d, e.output, f.output), k, x);
    }
  }
  return null;
}
