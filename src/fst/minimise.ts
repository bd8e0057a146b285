// Minimisation: Hopcroft's partition refinement for deterministic acceptors (in the form of
// Valmari & Lehtinen for partial transition functions), and two documented methods for
// transducers (output pushing for sequential machines, pair encoding for the rest).

import { canonicalOrder, trim } from "./basic.js";
import type { DeterminiseOptions } from "./determinise.js";
import { coarsestPartition, minimalDfa, type CanonicalDfa } from "./dfa.js";
import { addChain, removeInputEpsilons, type StrArc, type StrMachine } from "./epsilon.js";
import { EPSILON, Fst, expandFinalOutputs, type Label } from "./fst.js";
import { fstOf, tableOf, type ArcTable } from "./table.js";

export { coarsestPartition } from "./dfa.js";

/** True when the machine has no ε-input arcs and at most one arc per input label and state. */
export function isDeterministic(fst: Fst): boolean {
  for (let s = 0; s < fst.numStates; s++) {
    const seen = new Set<number>();
    for (const a of fst.arcs(s)) {
      if (a.input === EPSILON || seen.has(a.input)) return false;
      seen.add(a.input);
    }
  }
  return true;
}

/**
 * True when the machine is sequential in chain form: every state either has no ε-input arc and
 * distinct input labels, or is a non-final chain state with exactly one arc, whose input is ε
 * (the form `determiniseTransducer` produces, where string outputs are chains).
 */
export function isSequential(fst: Fst): boolean {
  for (let s = 0; s < fst.numStates; s++) {
    const arcs = fst.arcs(s);
    if (arcs.some((a) => a.input === EPSILON)) {
      if (arcs.length !== 1 || fst.isFinal(s)) return false;
      continue;
    }
    const seen = new Set<number>();
    for (const a of arcs) {
      if (seen.has(a.input)) return false;
      seen.add(a.input);
    }
  }
  return true;
}

/** Minimal DFA of a trimmed deterministic string machine whose arcs are keyed by `code`. */
function minimiseStr(m: StrMachine, startOutput: readonly Label[]): Fst {
  const n = m.arcs.length;
  const codes = new Map<string, number>();
  const code = (k: string): number => {
    let c = codes.get(k);
    if (c === undefined) {
      c = codes.size;
      codes.set(k, c);
    }
    return c;
  };
  const tails: number[] = [];
  const labels: number[] = [];
  const heads: number[] = [];
  for (let s = 0; s < n; s++) {
    for (const a of m.arcs[s] as StrArc[]) {
      tails.push(s);
      labels.push(code(`${a.input}|${a.output.join(",")}`));
      heads.push(a.target);
    }
  }
  const finalCodes = new Map<string, number>();
  const finalClass = new Int32Array(n).fill(-1);
  for (let s = 0; s < n; s++) {
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f === undefined) continue;
    const k = f.join(",");
    let c = finalCodes.get(k);
    if (c === undefined) {
      c = finalCodes.size;
      finalCodes.set(k, c);
    }
    finalClass[s] = c;
  }
  const block = coarsestPartition(n, Int32Array.from(tails), Int32Array.from(labels), Int32Array.from(heads), finalClass);
  let blocks = 0;
  for (const b of block) blocks = Math.max(blocks, b + 1);
  const r = new Fst();
  r.addStates(blocks);
  const done = new Uint8Array(blocks);
  for (let s = 0; s < n; s++) {
    const b = block[s] as number;
    if (done[b] === 1) continue;
    done[b] = 1;
    for (const a of m.arcs[s] as StrArc[]) addChain(r, b, a.input, a.output, block[a.target] as number);
    const f = (m.finals[s] as (readonly Label[])[])[0];
    if (f !== undefined) r.setFinal(b, f);
  }
  const start = block[m.start] as number;
  if (startOutput.length === 0) {
    r.setStart(start);
  } else {
    // Output written before any input is read: a fresh start state that copies the start
    // state's arcs and final output with that output in front (no ε-input chain is needed).
    const s0 = r.addState();
    r.setStart(s0);
    const rep = Array.from(block).indexOf(start);
    for (const a of m.arcs[rep] as StrArc[]) addChain(r, s0, a.input, [...startOutput, ...a.output], block[a.target] as number);
    const f = (m.finals[rep] as (readonly Label[])[])[0];
    if (f !== undefined) r.setFinal(s0, [...startOutput, ...f]);
  }
  return canonicalOrder(trim(r));
}

/**
 * Output pushing for a deterministic string machine (Mohri 1997/2000): P(q) is the longest common
 * prefix of every output written on a path from q to acceptance, computed as the greatest fixed
 * point of P(q) = lcp({final output of q} ∪ {o·P(r) | q -a:o→ r}). Every arc q -a:o→ r then writes
 * P(q)⁻¹·o·P(r), every final output f becomes P(q)⁻¹·f, and P(start) is written before anything
 * is read. The relation is unchanged and outputs are written as early as possible.
 */
function pushOutputs(m: StrMachine): { machine: StrMachine; startOutput: readonly Label[] } {
  const n = m.arcs.length;
  const P: (Label[] | undefined)[] = new Array<Label[] | undefined>(n).fill(undefined);
  const lcp = (a: Label[] | undefined, b: Label[]): Label[] => {
    if (a === undefined) return b;
    let k = 0;
    while (k < a.length && k < b.length && a[k] === b[k]) k++;
    return a.slice(0, k);
  };
  let changed = true;
  while (changed) {
    changed = false;
    for (let q = n - 1; q >= 0; q--) {
      let v: Label[] | undefined;
      const f = (m.finals[q] as (readonly Label[])[])[0];
      if (f !== undefined) v = f.slice();
      for (const a of m.arcs[q] as StrArc[]) {
        const pr = P[a.target];
        if (pr === undefined) continue;
        v = lcp(v, [...a.output, ...pr]);
      }
      const old = P[q];
      if (v !== undefined && (old === undefined || old.length !== v.length)) {
        P[q] = v;
        changed = true;
      }
    }
  }
  const arcs: StrArc[][] = [];
  const finals: (readonly Label[])[][] = [];
  for (let q = 0; q < n; q++) {
    const pq = (P[q] ?? []).length;
    arcs.push(
      (m.arcs[q] as StrArc[]).map((a) => ({
        input: a.input,
        output: [...a.output, ...(P[a.target] ?? [])].slice(pq),
        target: a.target,
      })),
    );
    finals.push((m.finals[q] as (readonly Label[])[]).map((f) => f.slice(pq)));
  }
  return { machine: { start: m.start, arcs, finals }, startOutput: P[m.start] ?? [] };
}

/**
 * Minimisation.
 * - Acceptors: subset construction when needed, trimming, then Hopcroft refinement. The result
 *   is the minimal partial DFA (its states are the non-empty Myhill–Nerode classes).
 * - Sequential transducers (`isSequential`): outputs are pushed toward the start, then each arc's
 *   (input, output string) pair and each final output are treated as letters of an acceptor and
 *   refined by Hopcroft — the minimal sequential transducer (Mohri 2000). Output strings are
 *   written back as chains.
 * - Other transducers: each arc's (input, output) pair is encoded as one letter, the encoded
 *   acceptor is determinised and minimised, and the letters decoded. The relation is unchanged;
 *   the result is minimal among machines deterministic on the pair alphabet, which is a
 *   normal form but not always the smallest transducer. Letters are numbered in order of first
 *   use (states in order, arcs in order).
 * Acceptors and pair-coded machines go through `minimalDfa` (dfa.ts, typed arrays): states
 * numbered breadth-first from the start by ascending letter, arcs by ascending letter — a form that
 * depends on the language alone (tests/fst/canonical.test.ts checks it against a plain reference).
 * An empty language or relation gives one non-final state without arcs.
 * `options` bound the subset constructions involved (`maxStates`, and `progress` per state made).
 */
export function minimise(fst: Fst, options: DeterminiseOptions = {}): Fst {
  if (fst.isAcceptor()) {
    const t = tableOf(fst);
    const d = minimalDfa({ states: t.states, start: t.start, final: t.final, tails: t.tails, labels: t.inputs, heads: t.heads }, options);
    return fstOf(dfaTable(d, d.label, d.label));
  }
  if (isSequential(fst)) {
    const free = removeInputEpsilons(fst);
    if (free.ok && free.machine.finals.every((f) => f.length <= 1)) {
      const pushed = pushOutputs(free.machine);
      return minimiseStr(pushed.machine, pushed.startOutput);
    }
  }
  return fstOf(minimisePairs(tableOf(expandFinalOutputs(fst)), options));
}

/** `minimise` of the machine the table describes (`fstOf(t)`), reading the table where it can. */
export function minimiseTable(t: ArcTable, options: DeterminiseOptions = {}): Fst {
  const r = minimiseToTable(t, options);
  return r instanceof Fst ? r : fstOf(r);
}

/**
 * `minimiseTable` with the result left as a table where the pair method made it (`fstOf` of it is
 * `minimiseTable`'s machine), so that a composition fold reads its accumulator without building
 * arc objects; acceptors and sequential machines come back as machines.
 */
export function minimiseToTable(t: ArcTable, options: DeterminiseOptions = {}): ArcTable | Fst {
  let acceptor = true;
  for (let k = 0; k < t.tails.length && acceptor; k++) acceptor = t.inputs[k] === t.outputs[k];
  if (acceptor || sequentialTable(t)) return minimise(fstOf(t), options);
  return minimisePairs(t, options);
}

/** `isSequential` of the table's machine. */
function sequentialTable(t: ArcTable): boolean {
  const seen = new Map<number, number>();
  for (let k = 0; k < t.tails.length; ) {
    const s = t.tails[k]!;
    let end = k;
    while (end < t.tails.length && t.tails[end] === s) end++;
    for (let j = k; j < end; j++) {
      if (t.inputs[j] === EPSILON) {
        if (end - k !== 1 || t.final[s] === 1) return false;
      } else {
        if (seen.get(t.inputs[j]!) === s) return false;
        seen.set(t.inputs[j]!, s);
      }
    }
    k = end;
  }
  return true;
}

/** The pair-encoding method: each (input, output) pair one letter, numbered in order of first use (ε:ε is ε). */
function minimisePairs(t: ArcTable, options: DeterminiseOptions): ArcTable {
  const pairs = new Map<number, number>();
  const inputs: Label[] = [EPSILON];
  const outputs: Label[] = [EPSILON];
  const labels = new Int32Array(t.tails.length);
  for (let k = 0; k < t.tails.length; k++) {
    const i = t.inputs[k]!, o = t.outputs[k]!;
    if (i === EPSILON && o === EPSILON) continue;
    const key = i * 0x80000000 + o;
    let c = pairs.get(key);
    if (c === undefined) {
      c = inputs.length;
      pairs.set(key, c);
      inputs.push(i);
      outputs.push(o);
    }
    labels[k] = c;
  }
  const d = minimalDfa({ states: t.states, start: t.start, final: t.final, tails: t.tails, labels, heads: t.heads }, options);
  const ins = Int32Array.from(inputs), outs = Int32Array.from(outputs);
  return dfaTable(d, gather(ins, d.label), gather(outs, d.label));
}

/** values[index[k]] for every k. */
function gather(values: Int32Array, index: Int32Array): Int32Array {
  const r = new Int32Array(index.length);
  for (let k = 0; k < index.length; k++) r[k] = values[index[k]!]!;
  return r;
}

/** The canonical DFA as a table, arc k reading `inputs[k]` and writing `outputs[k]`. */
function dfaTable(d: CanonicalDfa, inputs: Int32Array, outputs: Int32Array): ArcTable {
  const tails = new Int32Array(d.label.length);
  for (let s = 0; s < d.states; s++) tails.fill(s, d.first[s]!, d.first[s + 1]!);
  return { states: d.states, start: 0, final: d.final, tails, inputs, outputs, heads: d.target };
}
