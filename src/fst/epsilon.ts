// ε-removal: of ε:ε arcs (the relation is unchanged, arcs stay single-label), and of all
// ε-input arcs by pushing their outputs onto the following arcs, giving the string-output form
// that determinisation, the functionality test and the functional runner work on.

import { coaccessible, trim } from "./basic.js";
import { EPSILON, Fst, expandFinalOutputs, type Label } from "./fst.js";

/**
 * Removes arcs labelled ε:ε. For each state p, every arc leaving a state of p's ε:ε-closure is
 * copied to p, and p is final when its closure holds a final state (closure-based ε-removal;
 * Mohri, "Generic ε-removal", 2002, unweighted case). Final outputs are kept; when p's closure
 * holds several final states with different final outputs, the machine keeps the first and
 * `expandFinalOutputs` should be applied beforehand (removeEpsilon does this itself).
 */
export function removeEpsilon(fst: Fst): Fst {
  // Final outputs become ε-input chains so that closure merging cannot lose one.
  const m = expandFinalOutputs(fst);
  const n = m.numStates;
  const r = new Fst();
  if (n === 0) {
    r.addState();
    return r;
  }
  r.addStates(n);
  r.setStart(m.start);
  const mark = new Int32Array(n).fill(-1);
  for (let p = 0; p < n; p++) {
    const closure: number[] = [p];
    mark[p] = p;
    for (let k = 0; k < closure.length; k++) {
      for (const a of m.arcs(closure[k] as number)) {
        if (a.input === EPSILON && a.output === EPSILON && mark[a.target] !== p) {
          mark[a.target] = p;
          closure.push(a.target);
        }
      }
    }
    const seen = new Set<string>();
    let final = false;
    for (const q of closure) {
      if (m.isFinal(q)) final = true;
      for (const a of m.arcs(q)) {
        if (a.input === EPSILON && a.output === EPSILON) continue;
        const key = `${a.input},${a.output},${a.target}`;
        if (seen.has(key)) continue;
        seen.add(key);
        r.addArc(p, a.input, a.output, a.target);
      }
    }
    if (final) r.setFinal(p);
  }
  return trim(r);
}

/** An arc of the string-output form: reads one real symbol, writes a string. */
export interface StrArc {
  readonly input: Label;
  readonly output: readonly Label[];
  readonly target: number;
}

/**
 * A transducer without ε-input arcs whose arcs and final states write strings. `finals[s]` lists
 * the distinct final outputs of s (empty list: not final); a functional machine has at most one.
 */
export interface StrMachine {
  readonly start: number;
  readonly arcs: readonly (readonly StrArc[])[];
  readonly finals: readonly (readonly (readonly Label[])[])[];
}

export type InputEpsilonFree =
  | { readonly ok: true; readonly machine: StrMachine }
  /** `state` (of the trimmed input machine) lies on a useful ε-input cycle that writes output. */
  | { readonly ok: false; readonly trimmed: Fst; readonly state: number };

const strKey = (w: readonly Label[]): string => w.join(",");

/**
 * Removes every ε-input arc: for each state p, the ε-input closure is the set of pairs (q, w)
 * with an ε-input path p → q writing w; every real arc q -a:o→ r becomes p -a:w·o→ r, and every
 * final output f of q becomes a final output w·f of p. The input is trimmed first, so that a
 * useful ε-input cycle writing output (infinitely many outputs for one input) is reported
 * instead of looping. Only states reachable through real arcs are kept (then trimmed again).
 */
export function removeInputEpsilons(fst: Fst): InputEpsilonFree {
  const t = trim(fst);
  const n = t.numStates;
  if (n === 0 || coaccessible(t)[t.start] === 0) {
    // The empty relation (trimming keeps the start state even when nothing is accepted).
    return { ok: true, machine: { start: 0, arcs: [[]], finals: [[]] } };
  }
  const bad = outputCycleState(t);
  if (bad >= 0) return { ok: false, trimmed: t, state: bad };
  const arcs: StrArc[][] = [];
  const finals: Label[][][] = [];
  for (let p = 0; p < n; p++) {
    const closure: [number, readonly Label[]][] = [[p, []]];
    const seen = new Set<string>([`${p}|`]);
    for (let k = 0; k < closure.length; k++) {
      const [q, w] = closure[k] as [number, readonly Label[]];
      for (const a of t.arcs(q)) {
        if (a.input !== EPSILON) continue;
        const w2 = a.output === EPSILON ? w : [...w, a.output];
        const key = `${a.target}|${strKey(w2)}`;
        if (!seen.has(key)) {
          seen.add(key);
          closure.push([a.target, w2]);
        }
      }
    }
    const out: StrArc[] = [];
    const arcSeen = new Set<string>();
    const fin: Label[][] = [];
    const finSeen = new Set<string>();
    for (const [q, w] of closure) {
      for (const a of t.arcs(q)) {
        if (a.input === EPSILON) continue;
        const o = a.output === EPSILON ? w.slice() : [...w, a.output];
        const key = `${a.input}|${a.target}|${strKey(o)}`;
        if (arcSeen.has(key)) continue;
        arcSeen.add(key);
        out.push({ input: a.input, output: o, target: a.target });
      }
      const f = t.finalOutput(q);
      if (f !== undefined) {
        const o = [...w, ...f];
        const key = strKey(o);
        if (!finSeen.has(key)) {
          finSeen.add(key);
          fin.push(o);
        }
      }
    }
    arcs.push(out);
    finals.push(fin);
  }
  return { ok: true, machine: trimStr({ start: t.numStates > 0 ? t.start : 0, arcs, finals }) };
}

/**
 * A state on a cycle of ε-input arcs in which some arc writes output, or -1. Cycles are found as
 * strongly connected components of the ε-input subgraph (Tarjan 1972, iterative form).
 */
function outputCycleState(t: Fst): number {
  const n = t.numStates;
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const comp = new Int32Array(n).fill(-1);
  const onStack = new Uint8Array(n);
  const stack: number[] = [];
  let counter = 0;
  let comps = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] !== -1) continue;
    const work: [number, number][] = [[root, 0]];
    index[root] = low[root] = counter++;
    stack.push(root);
    onStack[root] = 1;
    while (work.length > 0) {
      const top = work[work.length - 1] as [number, number];
      const v = top[0];
      const arcs = t.arcs(v);
      let pushed = false;
      while (top[1] < arcs.length) {
        const a = arcs[top[1]++]!;
        if (a.input !== EPSILON) continue;
        const w = a.target;
        if (index[w] === -1) {
          index[w] = low[w] = counter++;
          stack.push(w);
          onStack[w] = 1;
          work.push([w, 0]);
          pushed = true;
          break;
        } else if (onStack[w] === 1) {
          low[v] = Math.min(low[v] as number, index[w] as number);
        }
      }
      if (pushed) continue;
      work.pop();
      if (work.length > 0) {
        const u = (work[work.length - 1] as [number, number])[0];
        low[u] = Math.min(low[u] as number, low[v] as number);
      }
      if (low[v] === index[v]) {
        let w: number;
        do {
          w = stack.pop() as number;
          onStack[w] = 0;
          comp[w] = comps;
        } while (w !== v);
        comps++;
      }
    }
  }
  for (let s = 0; s < n; s++) {
    for (const a of t.arcs(s)) {
      if (a.input === EPSILON && a.output !== EPSILON && comp[a.target] === comp[s]) return s;
    }
  }
  return -1;
}

/** Keeps the accessible and co-accessible states of a string machine (start always kept). */
export function trimStr(m: StrMachine): StrMachine {
  const n = m.arcs.length;
  if (n === 0) return { start: 0, arcs: [[]], finals: [[]] };
  const f = new Fst();
  f.addStates(n);
  f.setStart(m.start);
  for (let s = 0; s < n; s++) {
    for (const a of m.arcs[s] as StrArc[]) f.addArc(s, a.input, EPSILON, a.target);
    if ((m.finals[s] as Label[][]).length > 0) f.setFinal(s);
  }
  const co = coaccessible(f);
  const map = new Int32Array(n).fill(-1);
  const order: number[] = [m.start];
  map[m.start] = 0;
  for (let k = 0; k < order.length; k++) {
    for (const a of m.arcs[order[k] as number] as StrArc[]) {
      if (co[a.target] === 1 && map[a.target] === -1) {
        map[a.target] = order.length;
        order.push(a.target);
      }
    }
  }
  const arcs: StrArc[][] = [];
  const finals: (readonly Label[])[][] = [];
  for (const s of order) {
    const list: StrArc[] = [];
    for (const a of m.arcs[s] as StrArc[]) {
      const t = map[a.target] as number;
      if (t >= 0 && co[a.target] === 1) list.push({ input: a.input, output: a.output, target: t });
    }
    arcs.push(list);
    finals.push((m.finals[s] as (readonly Label[])[]).slice());
  }
  return { start: 0, arcs, finals };
}

/** The single-label machine of a string machine: each string output becomes a chain. */
export function strToFst(m: StrMachine): Fst {
  const r = new Fst();
  r.addStates(m.arcs.length);
  r.setStart(m.start);
  for (let s = 0; s < m.arcs.length; s++) {
    for (const a of m.arcs[s] as StrArc[]) addChain(r, s, a.input, a.output, a.target);
    const fs = m.finals[s] as (readonly Label[])[];
    if (fs.length === 1) r.setFinal(s, fs[0] as Label[]);
    else if (fs.length > 1) {
      for (const f of fs) {
        const end = r.addState();
        r.setFinal(end, f);
        r.addArc(s, EPSILON, EPSILON, end);
      }
    }
  }
  return r;
}

/**
 * Adds the path from → to reading `input` and writing `output`: the first arc reads the input and
 * writes the first output label; the rest are ε-input arcs through fresh states.
 */
export function addChain(r: Fst, from: number, input: Label, output: readonly Label[], to: number): void {
  if (output.length <= 1) {
    r.addArc(from, input, output[0] ?? EPSILON, to);
    return;
  }
  let p = from;
  output.forEach((o, k) => {
    const q = k === output.length - 1 ? to : r.addState();
    r.addArc(p, k === 0 ? input : EPSILON, o, q);
    p = q;
  });
}
