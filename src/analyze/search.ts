// The shortest-witness searches: breadth-first over the product of deterministic filters on a
// string and, optionally, one transducer whose outputs must pass further filters — the
// intersection machines of the analyses, explored on the fly and left as soon as a witness is met.
// Symbols every component treats alike are searched once (alphabet compression), through the
// least symbol of their class, so witnesses are exact and deterministic.

import { EPSILON, expandFinalOutputs, sortedArcs, type Fst } from "../fst/index.js";
import { AnalysisLimitError, type Dfa } from "./dfa.js";

/** A condition on a string: in the DFA's language (`member`) or outside it. */
export interface Filter {
  readonly dfa: Dfa;
  readonly member: boolean;
}

/** Strings x for which some output y of `machine` on x passes every `output` filter. */
export interface Through {
  readonly machine: Fst;
  readonly output: readonly Filter[];
}

/** One DFA step; the sink is index `states` (kept only by filters that accept outside the language). */
function stepFilter(f: Filter, s: number, x: number): number {
  const d = f.dfa;
  if (s === d.states) return s;
  const t = d.table[s * d.size + x]!;
  if (t >= 0) return t;
  return f.member ? -1 : d.states;
}

const acceptsAt = (f: Filter, s: number): boolean => (s === f.dfa.states ? !f.member : (f.dfa.finals[s] === 1) === f.member);

/** A filter's start state (the sink when the DFA is empty). */
const startOf = (f: Filter): number => (f.dfa.start < 0 ? f.dfa.states : f.dfa.start);

/**
 * Classes of symbols 1 … size-1 that every filter column and every machine arc treat alike
 * (an arc writing the symbol it reads counts as a copy). Returns the least symbol of each class.
 */
export function representatives(size: number, filters: readonly Filter[], machine: Fst | null, extra: readonly Dfa[] = []): number[] {
  const sig: string[] = new Array<string>(size).fill("");
  const dfas = [...filters.map((f) => f.dfa), ...extra];
  for (let x = 1; x < size; x++) {
    const parts: number[] = [];
    for (const d of dfas) for (let s = 0; s < d.states; s++) parts.push(d.table[s * d.size + x]!);
    sig[x] = parts.join(",");
  }
  if (machine !== null) {
    const arcsOn: string[][] = Array.from({ length: size }, () => []);
    for (let q = 0; q < machine.numStates; q++) {
      for (const a of machine.arcs(q)) if (a.input !== EPSILON && a.input < size) arcsOn[a.input]!.push(`${q}:${a.output === a.input ? "=" : a.output}>${a.target}`);
    }
    for (let x = 1; x < size; x++) sig[x] += "|" + arcsOn[x]!.sort().join(";");
  }
  const seen = new Set<string>();
  const reps: number[] = [];
  for (let x = 1; x < size; x++) {
    if (seen.has(sig[x]!)) continue;
    seen.add(sig[x]!);
    reps.push(x);
  }
  return reps;
}

/**
 * The shortest string (ties: the first found, symbols in ascending order) that passes every
 * `input` filter and, when `through` is given, has an output through its machine that passes every
 * output filter; null when there is none. 0-1 breadth-first search (ε-input arcs cost nothing).
 * Throws AnalysisLimitError after `limit` product states.
 */
export function shortestString(input: readonly Filter[], through: Through | null, size: number, limit: number, what: string): number[] | null {
  const m = through === null ? null : expandFinalOutputs(through.machine);
  const outF = through?.output ?? [];
  const reps = representatives(size, input, m, outF.map((f) => f.dfa));
  const isRep = new Uint8Array(size);
  for (const x of reps) isRep[x] = 1;
  const nIn = input.length;
  const width = nIn + 1 + outF.length;
  // Per machine state, its arcs on ε or on a representative symbol.
  const arcs: Int32Array[] = [];
  if (m !== null) {
    const rows = sortedArcs(m, "input");
    for (let q = 0; q < m.numStates; q++) {
      const list: number[] = [];
      for (let k = rows.first[q]!; k < rows.first[q + 1]!; k++) {
        const x = rows.input[k]!;
        if (x === EPSILON || isRep[x]) list.push(x, rows.output[k]!, rows.target[k]!);
      }
      arcs.push(Int32Array.from(list));
    }
  }
  // Mixed-radix numeric keys when they fit in a double's integer range.
  const radix = [...input.map((f) => f.dfa.states + 1), m === null ? 1 : m.numStates, ...outF.map((f) => f.dfa.states + 1)];
  const numeric = radix.reduce((p, r) => p * r, 1) < 2 ** 52;
  const keyOf = (t: ArrayLike<number>): number | string => {
    if (!numeric) return Array.prototype.join.call(t, ",");
    let k = 0;
    for (let i = 0; i < width; i++) k = k * radix[i]! + t[i]!;
    return k;
  };
  const tuples: number[] = [];
  const ids = new Map<number | string, number>();
  const dist: number[] = [];
  const parent: number[] = [];
  const label: number[] = [];
  const next = new Array<number>(width).fill(0);
  const relax = (from: number, x: number, cost: number, front: number[], back: number[]): void => {
    const key = keyOf(next);
    let id = ids.get(key);
    if (id === undefined) {
      id = dist.length;
      if (id >= limit) throw new AnalysisLimitError(what, limit);
      ids.set(key, id);
      for (let i = 0; i < width; i++) tuples.push(next[i]!);
      dist.push(Infinity);
      parent.push(-1);
      label.push(EPSILON);
    }
    const d = (from < 0 ? 0 : dist[from]!) + cost;
    if (d < dist[id]!) {
      dist[id] = d;
      parent[id] = from;
      label[id] = x;
      if (cost === 0) front.push(id);
      else back.push(id);
    }
  };
  for (let i = 0; i < nIn; i++) next[i] = startOf(input[i]!);
  if (input.some((f, i) => f.member && next[i] === f.dfa.states)) return null;
  next[nIn] = m === null ? 0 : m.start;
  for (let j = 0; j < outF.length; j++) next[nIn + 1 + j] = startOf(outF[j]!);
  const front: number[] = [];
  const back: number[] = [];
  relax(-1, EPSILON, 0, front, back);
  let head = 0;
  const settled = new Uint8Array(limit + 1);
  const pathTo = (id: number): number[] => {
    const w: number[] = [];
    for (let x = id; parent[x]! >= 0; x = parent[x]!) if (label[x] !== EPSILON) w.push(label[x]!);
    return w.reverse();
  };
  while (front.length > 0 || head < back.length) {
    const id = front.length > 0 ? front.pop()! : back[head++]!;
    if (settled[id]) continue;
    settled[id] = 1;
    const base = id * width;
    const q = tuples[base + nIn]!;
    let ok = true;
    for (let i = 0; i < nIn && ok; i++) ok = acceptsAt(input[i]!, tuples[base + i]!);
    if (ok && m !== null) ok = m.isFinal(q);
    for (let j = 0; j < outF.length && ok; j++) ok = acceptsAt(outF[j]!, tuples[base + nIn + 1 + j]!);
    if (ok) return pathTo(id);
    if (m === null) {
      for (const x of reps) {
        let dead = false;
        for (let i = 0; i < nIn && !dead; i++) {
          const s = stepFilter(input[i]!, tuples[base + i]!, x);
          if (s < 0) dead = true;
          next[i] = s;
        }
        if (dead) continue;
        next[nIn] = 0;
        relax(id, x, 1, front, back);
      }
      continue;
    }
    const list = arcs[q]!;
    for (let k = 0; k < list.length; k += 3) {
      const x = list[k]!, y = list[k + 1]!;
      let dead = false;
      for (let i = 0; i < nIn && !dead; i++) {
        const cur = tuples[base + i]!;
        const s = x === EPSILON ? cur : stepFilter(input[i]!, cur, x);
        if (s < 0) dead = true;
        next[i] = s;
      }
      if (dead) continue;
      next[nIn] = list[k + 2]!;
      for (let j = 0; j < outF.length && !dead; j++) {
        const cur = tuples[base + nIn + 1 + j]!;
        const s = y === EPSILON ? cur : stepFilter(outF[j]!, cur, y);
        if (s < 0) dead = true;
        next[nIn + 1 + j] = s;
      }
      if (dead) continue;
      relax(id, x, x === EPSILON ? 0 : 1, front, back);
    }
  }
  return null;
}
