// Determinisation: the subset construction for acceptors, and Mohri's determinisation of
// functional transducers into sequential (subsequential) ones, with a clear report when the
// machine is not functional or not subsequential.

import { FstLimitError } from "./compose.js";
import { addChain, removeEpsilon, removeInputEpsilons, type StrArc, type StrMachine } from "./epsilon.js";
import { EPSILON, Fst, FstError, type Label } from "./fst.js";

export interface DeterminiseOptions {
  /** Throw FstLimitError beyond this many result states (default 2 000 000; 200 000 for `determiniseTransducer`). */
  readonly maxStates?: number;
  /** Called once per result state as it is made; it may throw to abandon the work (a caller's time or memory budget). */
  readonly progress?: () => void;
}

/**
 * Subset construction (Rabin & Scott 1959) for an acceptor, after ε-removal. The result has no
 * ε-arcs and at most one arc per label and state; subset states are numbered in breadth-first
 * order of discovery with labels in ascending order (deterministic).
 */
export function determinise(fst: Fst, options: DeterminiseOptions = {}): Fst {
  if (!fst.isAcceptor()) {
    throw new FstError("determinise works on acceptors; use determiniseTransducer for transducers");
  }
  const maxStates = options.maxStates ?? 2_000_000;
  const m = removeEpsilon(fst);
  const r = new Fst();
  const ids = new Map<string, number>();
  const subsets: number[][] = [];
  const idOf = (set: number[]): number => {
    const key = set.join(",");
    let id = ids.get(key);
    if (id === undefined) {
      id = subsets.length;
      if (id >= maxStates) throw new FstLimitError("determinisation", maxStates);
      options.progress?.();
      ids.set(key, id);
      subsets.push(set);
      r.addState();
    }
    return id;
  };
  idOf([m.start]);
  const pairs: number[] = [];
  for (let id = 0; id < subsets.length; id++) {
    const set = subsets[id] as number[];
    pairs.length = 0;
    for (const s of set) {
      if (m.isFinal(s)) r.setFinal(id);
      for (const a of m.arcs(s)) pairs.push(a.input, a.target);
    }
    const order = Array.from({ length: pairs.length / 2 }, (_, k) => k);
    order.sort((x, y) => (pairs[2 * x] as number) - (pairs[2 * y] as number) || (pairs[2 * x + 1] as number) - (pairs[2 * y + 1] as number));
    let k = 0;
    while (k < order.length) {
      const label = pairs[2 * (order[k] as number)] as number;
      const targets: number[] = [];
      for (; k < order.length && pairs[2 * (order[k] as number)] === label; k++) {
        const t = pairs[2 * (order[k] as number) + 1] as number;
        if (targets[targets.length - 1] !== t) targets.push(t);
      }
      r.addArc(id, label, label, idOf(targets));
    }
  }
  return r;
}

/** Why a transducer could not be made sequential, with an input that shows it where known. */
export type DeterminiseFailure =
  | { readonly reason: "not-functional"; readonly input: readonly Label[]; readonly message: string }
  | { readonly reason: "not-subsequential"; readonly message: string };

export type DeterminiseResult =
  | { readonly ok: true; readonly fst: Fst }
  | ({ readonly ok: false } & DeterminiseFailure);

interface Member {
  readonly state: number;
  readonly residual: readonly Label[];
}

const commonPrefixLength = (a: readonly Label[], b: readonly Label[], n: number): number => {
  let k = 0;
  while (k < n && k < a.length && k < b.length && a[k] === b[k]) k++;
  return k;
};

/**
 * Determinisation of a functional transducer into a sequential one (deterministic on input,
 * string outputs written as chains of ε-input arcs, final outputs on final states), after
 * Mohri, "Finite-state transducers in language and speech processing" (1997): subset states are
 * sets of (state, residual output not yet written); each arc writes the longest common prefix of
 * its candidates' outputs.
 *
 * It terminates exactly when the machine has the twins property. A trimmed functional machine
 * with the twins property never holds a residual longer than n²·L (n states of the ε-input-free
 * form, L its longest arc output): a longer residual means a pair of paths whose delay grew
 * across a repeated state pair, which twins forbid. That bound is the stopping test; it ends
 * every run, but a machine without the twins property may make exponentially many subsets
 * before a residual outgrows it (a 5-state, 9-arc machine passed 20 000), so the default limit
 * of 200 000 states ends such a run with FstLimitError rather than exhausting memory. Two
 * different final outputs in one subset, or one state with two residuals, prove the machine is
 * not functional; the input that reached that subset is returned.
 */
export function determiniseTransducer(fst: Fst, options: DeterminiseOptions = {}): DeterminiseResult {
  const maxStates = options.maxStates ?? 200_000;
  const free = removeInputEpsilons(fst);
  if (!free.ok) {
    return {
      ok: false,
      reason: "not-functional",
      input: witnessThrough(free.trimmed, free.state),
      message: "an ε-input cycle writes output, so some input has infinitely many outputs",
    };
  }
  const m = free.machine;
  let longest = 1;
  for (const list of m.arcs) for (const a of list) longest = Math.max(longest, a.output.length);
  for (const fs of m.finals) for (const f of fs) longest = Math.max(longest, f.length);
  const bound = m.arcs.length * m.arcs.length * longest;

  const ids = new Map<string, number>();
  const subsets: Member[][] = [];
  const finals: (Label[] | undefined)[] = [];
  const arcs: { from: number; label: Label; written: Label[]; to: number }[] = [];
  const parent: number[] = [];
  const via: number[] = [];
  const inputTo = (id: number): Label[] => {
    const w: Label[] = [];
    for (let k = id; k > 0; k = parent[k] as number) w.push(via[k] as number);
    return w.reverse();
  };
  const idOf = (set: Member[], from: number, label: Label): number => {
    const key = set.map((x) => `${x.state}:${x.residual.join(".")}`).join(",");
    let id = ids.get(key);
    if (id === undefined) {
      id = subsets.length;
      if (id >= maxStates) throw new FstLimitError("transducer determinisation", maxStates);
      options.progress?.();
      ids.set(key, id);
      subsets.push(set);
      parent.push(from);
      via.push(label);
    }
    return id;
  };
  idOf([{ state: m.start, residual: [] }], -1, EPSILON);
  for (let id = 0; id < subsets.length; id++) {
    const set = subsets[id] as Member[];
    let finalOut: Label[] | undefined;
    for (const x of set) {
      for (const f of m.finals[x.state] as (readonly Label[])[]) {
        const out = [...x.residual, ...f];
        if (finalOut === undefined) finalOut = out;
        else if (finalOut.join(",") !== out.join(",")) {
          return {
            ok: false,
            reason: "not-functional",
            input: inputTo(id),
            message: "this input has two different outputs",
          };
        }
      }
    }
    finals.push(finalOut);
    const cands: { label: Label; state: number; out: Label[] }[] = [];
    for (const x of set) {
      for (const a of m.arcs[x.state] as StrArc[]) cands.push({ label: a.input, state: a.target, out: [...x.residual, ...a.output] });
    }
    cands.sort((p, q) => p.label - q.label || p.state - q.state || cmpStr(p.out, q.out));
    let k = 0;
    while (k < cands.length) {
      const label = (cands[k] as { label: Label }).label;
      let end = k;
      while (end < cands.length && (cands[end] as { label: Label }).label === label) end++;
      const group = cands.slice(k, end);
      k = end;
      let lcp = (group[0] as { out: Label[] }).out.length;
      for (const c of group) lcp = commonPrefixLength(c.out, (group[0] as { out: Label[] }).out, lcp);
      const written = (group[0] as { out: Label[] }).out.slice(0, lcp);
      const members: Member[] = [];
      for (const c of group) {
        const residual = c.out.slice(lcp);
        const prev = members[members.length - 1];
        if (prev !== undefined && prev.state === c.state) {
          if (prev.residual.join(",") === residual.join(",")) continue;
          return {
            ok: false,
            reason: "not-functional",
            input: [...inputTo(id), label, ...shortestCompletion(m, c.state)],
            message: "one input reaches a state with two different outputs",
          };
        }
        if (residual.length > bound) {
          return {
            ok: false,
            reason: "not-subsequential",
            message: `a residual output grew beyond ${bound} symbols: the machine lacks the twins property (it needs unbounded lookahead), so no sequential machine computes it`,
          };
        }
        members.push({ state: c.state, residual });
      }
      arcs.push({ from: id, label, written, to: idOf(members, id, label) });
    }
  }
  // Subset states first (their numbers are the subset ids), then the chain links of outputs.
  const r = new Fst();
  r.addStates(subsets.length);
  finals.forEach((f, id) => {
    if (f !== undefined) r.setFinal(id, f);
  });
  for (const a of arcs) addChain(r, a.from, a.label, a.written, a.to);
  return { ok: true, fst: r };
}

function cmpStr(a: readonly Label[], b: readonly Label[]): number {
  const n = Math.min(a.length, b.length);
  for (let k = 0; k < n; k++) if (a[k] !== b[k]) return (a[k] as number) - (b[k] as number);
  return a.length - b.length;
}

/** The shortest input from state s of a string machine to acceptance (breadth-first). */
export function shortestCompletion(m: StrMachine, s: number): Label[] {
  const prev = new Map<number, [number, Label]>();
  const queue = [s];
  prev.set(s, [-1, EPSILON]);
  for (let k = 0; k < queue.length; k++) {
    const q = queue[k] as number;
    if ((m.finals[q] as Label[][]).length > 0) {
      const w: Label[] = [];
      for (let x = q; x !== s; ) {
        const [p, l] = prev.get(x) as [number, Label];
        w.push(l);
        x = p;
      }
      return w.reverse();
    }
    for (const a of m.arcs[q] as StrArc[]) {
      if (!prev.has(a.target)) {
        prev.set(a.target, [q, a.input]);
        queue.push(a.target);
      }
    }
  }
  return [];
}

/** An input whose accepting path passes through `state` of a trimmed machine (ε inputs skipped). */
export function witnessThrough(t: Fst, state: number): Label[] {
  const bfs = (from: number, goal: (s: number) => boolean): Label[] => {
    const prev = new Map<number, [number, Label]>([[from, [-1, EPSILON]]]);
    const queue = [from];
    for (let k = 0; k < queue.length; k++) {
      const q = queue[k] as number;
      if (goal(q)) {
        const w: Label[] = [];
        for (let x = q; x !== from; ) {
          const [p, l] = prev.get(x) as [number, Label];
          if (l !== EPSILON) w.push(l);
          x = p;
        }
        return w.reverse();
      }
      for (const a of t.arcs(q)) {
        if (!prev.has(a.target)) {
          prev.set(a.target, [q, a.input]);
          queue.push(a.target);
        }
      }
    }
    return [];
  };
  return [...bfs(t.start, (s) => s === state), ...bfs(state, (s) => t.isFinal(s))];
}
