// Test helpers: brute-force enumeration of a machine's relation (the oracle the algebra is checked
// against) and fast-check generators of small random machines.

import fc from "fast-check";
import { EPSILON, Fst, FstLimitError, determiniseTransducer, type DeterminiseResult, type Label } from "../../src/fst/index.js";

export const key = (x: readonly Label[], y: readonly Label[]): string => `${x.join(",")}|${y.join(",")}`;

/**
 * Every pair (x, y) with |x| ≤ maxIn and |y| ≤ maxOut that the machine accepts, by exhaustive
 * search over configurations (state, input so far, output so far). Lengths only grow along a path,
 * so pruning at the window is exact; ε:ε cycles revisit a configuration and stop. `ignore` drops
 * one side (it is then not recorded), which gives the exact domain or range within a window.
 */
export function relation(fst: Fst, maxIn: number, maxOut: number, ignore: "none" | "input" | "output" = "none"): Set<string> {
  const result = new Set<string>();
  if (fst.numStates === 0) return result;
  const seen = new Set<string>();
  const stack: [number, Label[], Label[]][] = [[fst.start, [], []]];
  while (stack.length > 0) {
    const [s, x, y] = stack.pop() as [number, Label[], Label[]];
    const k = `${s}#${key(x, y)}`;
    if (seen.has(k)) continue;
    seen.add(k);
    const f = fst.finalOutput(s);
    if (f !== undefined && (ignore === "output" ? 0 : y.length + f.length) <= maxOut) result.add(key(x, ignore === "output" ? [] : [...y, ...f]));
    for (const a of fst.arcs(s)) {
      const x2 = a.input === EPSILON || ignore === "input" ? x : [...x, a.input];
      const y2 = a.output === EPSILON || ignore === "output" ? y : [...y, a.output];
      if (x2.length > maxIn || y2.length > maxOut) continue;
      stack.push([a.target, x2, y2]);
    }
  }
  return result;
}

/**
 * Every output (as a key "a,b") of the input x with at most maxOut labels, by exhaustive search over
 * configurations (state, position, output so far).
 */
export function transduce(fst: Fst, x: readonly Label[], maxOut: number): string[] {
  const result = new Set<string>();
  if (fst.numStates === 0) return [];
  const live = canFinish(fst);
  const seen = new Set<string>();
  const stack: [number, number, Label[]][] = [[fst.start, 0, []]];
  while (stack.length > 0) {
    const [s, pos, y] = stack.pop() as [number, number, Label[]];
    const k = `${s}#${pos}#${y.join(",")}`;
    if (seen.has(k)) continue;
    seen.add(k);
    const f = fst.finalOutput(s);
    if (pos === x.length && f !== undefined && y.length + f.length <= maxOut) result.add([...y, ...f].join(","));
    for (const a of fst.arcs(s)) {
      if (!live[a.target]) continue;
      if (a.input !== EPSILON && (pos >= x.length || a.input !== x[pos])) continue;
      const y2 = a.output === EPSILON ? y : [...y, a.output];
      if (y2.length > maxOut) continue;
      stack.push([a.target, a.input === EPSILON ? pos : pos + 1, y2]);
    }
  }
  return [...result].sort();
}

/** States from which some final state can be reached (a plain fixed point, for pruning the search). */
function canFinish(fst: Fst): boolean[] {
  const live = Array.from({ length: fst.numStates }, (_, s) => fst.isFinal(s));
  let changed = true;
  while (changed) {
    changed = false;
    for (let s = 0; s < fst.numStates; s++) {
      if (!live[s] && fst.arcs(s).some((a) => live[a.target])) {
        live[s] = true;
        changed = true;
      }
    }
  }
  return live;
}

/** The strings of an acceptor up to length n, as keys "a,b". */
export function language(fst: Fst, n: number): Set<string> {
  return new Set([...relation(fst, n, n)].map((k) => k.split("|")[0] as string));
}

/** Every string over 1 … k of length ≤ n, shortest first, then in label order. */
export function allStrings(k: number, n: number): Label[][] {
  const out: Label[][] = [[]];
  let layer: Label[][] = [[]];
  for (let len = 1; len <= n; len++) {
    const next: Label[][] = [];
    for (const w of layer) for (let a = 1; a <= k; a++) next.push([...w, a]);
    out.push(...next);
    layer = next;
  }
  return out;
}

/** The outputs (sorted keys) the relation pairs with input x, within an output window. */
export function outputsOf(rel: Set<string>, x: readonly Label[]): string[] {
  const prefix = `${x.join(",")}|`;
  return [...rel].filter((k) => k.startsWith(prefix)).map((k) => k.slice(prefix.length)).sort();
}

export interface MachineShape {
  readonly maxStates: number;
  readonly labels: number;
  readonly maxArcs: number;
  /** Arcs read and write the same label. */
  readonly acceptor?: boolean;
  /** Probability-like weight for ε labels (0: none). */
  readonly epsilon?: boolean;
  /** ε-input arcs only go to higher-numbered states (no ε-input cycles). */
  readonly epsilonInputForward?: boolean;
  /** Allow final outputs. */
  readonly finalOutputs?: boolean;
}

/** Random small machines of the given shape. */
export function arbFst(shape: MachineShape): fc.Arbitrary<Fst> {
  const lo = shape.epsilon === true ? 0 : 1;
  const label = fc.integer({ min: lo, max: shape.labels });
  return fc.integer({ min: 1, max: shape.maxStates }).chain((n) =>
    fc
      .record({
        arcs: fc.array(
          fc.record({ from: fc.nat(n - 1), to: fc.nat(n - 1), i: label, o: label }),
          { maxLength: shape.maxArcs },
        ),
        finals: fc.array(fc.boolean(), { minLength: n, maxLength: n }),
        finalOut: fc.array(fc.array(fc.integer({ min: 1, max: shape.labels }), { maxLength: 2 }), { minLength: n, maxLength: n }),
      })
      .map(({ arcs, finals, finalOut }) => {
        const f = new Fst();
        f.addStates(n);
        for (const a of arcs) {
          const o = shape.acceptor === true ? a.i : a.o;
          let to = a.to;
          if (shape.epsilonInputForward === true && a.i === EPSILON) {
            if (a.from === n - 1) continue;
            to = a.from + 1 + (a.to % (n - 1 - a.from));
          }
          f.addArc(a.from, a.i, o, to);
        }
        finals.forEach((isF, s) => {
          if (isF) f.setFinal(s, shape.finalOutputs === true && shape.acceptor !== true ? (finalOut[s] as Label[]) : []);
        });
        return f;
      }),
  );
}

/**
 * Random sequential transducers (deterministic on input, no ε-input arcs): functional by
 * construction. Outputs per arc are one label or ε.
 */
export function arbSequential(maxStates: number, labels: number): fc.Arbitrary<Fst> {
  return fc.integer({ min: 1, max: maxStates }).chain((n) =>
    fc
      .record({
        table: fc.array(fc.array(fc.option(fc.record({ to: fc.nat(n - 1), o: fc.integer({ min: 0, max: labels }) }), { freq: 2 }), { minLength: labels, maxLength: labels }), { minLength: n, maxLength: n }),
        finals: fc.array(fc.option(fc.array(fc.integer({ min: 1, max: labels }), { maxLength: 1 })), { minLength: n, maxLength: n }),
      })
      .map(({ table, finals }) => {
        const f = new Fst();
        f.addStates(n);
        table.forEach((row, s) => row.forEach((cell, a) => { if (cell !== null) f.addArc(s, a + 1, cell.o, cell.to); }));
        finals.forEach((out, s) => { if (out !== null) f.setFinal(s, out); });
        return f;
      }),
  );
}

export const sameSet = (a: Set<string>, b: Set<string>): boolean => a.size === b.size && [...a].every((x) => b.has(x));

/**
 * `determiniseTransducer` within 20 000 states, as the compiler calls it with a limit; null when
 * the limit was reached (a machine without the twins property can make exponentially many subset
 * states before its residuals outgrow the stopping bound: no answer to check).
 */
export function determiniseWithin(t: Fst): DeterminiseResult | null {
  try {
    return determiniseTransducer(t, { maxStates: 20_000 });
  } catch (e) {
    if (e instanceof FstLimitError) return null;
    throw e;
  }
}
