// Exact rule interactions: for every ordered pair of steps A before B, on the strings that reach A,
// which of Kiparsky's (1968) relations hold (feeding, bleeding, counterfeeding, counterbleeding),
// each with the shortest witness; whether adjacent steps commute; dead steps; shadowed
// environments. Definitions in src/analyze/README.md.

import { FstError, compose, freeze, trim, type Fst } from "../fst/index.js";
import type { Grammar, Rule } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import type { Diagnostic } from "../diagnostics.js";
import { AnalysisLimitError, accepts, guarded, inputWords, type Dfa } from "./dfa.js";
import { shortestConflict } from "./conflict.js";
import { boundaryRuns, changeDomainOf, imageOf, type ChangeDomain } from "./domain.js";
import { shortestString, type Filter } from "./search.js";
import { analysisMachines, type AnalysisMachines, type StepMachines } from "./steps.js";
import { sourceOf } from "./source.js";

export type RelationKind = "feeds" | "bleeds" | "counterfeeds" | "counterbleeds";
export const RELATIONS: readonly RelationKind[] = ["feeds", "bleeds", "counterfeeds", "counterbleeds"];

/** A witness string with the forms that show the relation (symbol ids, '#'-bracketed). */
export interface Witness {
  /** The string reaching A (the earlier step). */
  readonly input: readonly number[];
  /** An input word whose derivation brings `input` to A (shortest such word). */
  readonly source: readonly number[] | null;
  /** The output of the step applied first (A for feeds/bleeds, B for the counter relations). */
  readonly first: readonly number[];
  /** The other step applied to `input` directly (what it would do without the first). */
  readonly directly: readonly number[];
  /** The other step applied to `first`. */
  readonly after: readonly number[];
}

export type Decided<T> = { readonly decided: true; readonly value: T } | { readonly decided: false; readonly reason: string };

export interface PairResult {
  readonly a: number;
  readonly b: number;
  /** Per relation: its witness, null when the relation does not hold. */
  readonly relations: Readonly<Record<RelationKind, Decided<Witness | null>>>;
}

export interface SwapResult {
  readonly a: number;
  readonly b: number;
  /** null when the two orders give the same output on every string reaching the pair. */
  readonly difference: Decided<{ readonly input: readonly number[]; readonly source: readonly number[] | null; readonly inOrder: readonly number[]; readonly swapped: readonly number[] } | null>;
}

export interface StepResult {
  readonly index: number;
  readonly name: string;
  /** Shortest reaching string the step changes; null: the step is dead (changes no reaching string). */
  readonly applies: Decided<{ readonly input: readonly number[]; readonly source: readonly number[] | null } | null>;
  /** States of the minimal DFA of the strings reaching the step, and of its change domain. */
  readonly reachingStates: number;
  readonly domainStates: number;
}

export interface EnvironmentResult {
  readonly step: number;
  /** Index among the rule's written environments (0-based) and its source line. */
  readonly environment: number;
  readonly line: number;
  /** A reaching string on which this environment adds an application; null: shadowed by the others. */
  readonly adds: Decided<{ readonly input: readonly number[]; readonly source: readonly number[] | null } | null>;
}

export interface InteractionReport {
  readonly machines: AnalysisMachines;
  readonly steps: readonly StepResult[];
  readonly pairs: readonly PairResult[];
  readonly swaps: readonly SwapResult[];
  readonly environments: readonly EnvironmentResult[];
  /** Each step's change domain D_k as a DFA (null where it could not be built). */
  readonly domainDfas: readonly (Dfa | null)[];
  /** The largest machine any analysis built (states), and what it was. */
  readonly largest: { readonly states: number; readonly what: string };
  readonly seconds: number;
  /** Seconds per phase (compiling, reaching strings and domains, pair relations, swaps, environments, underlying forms). */
  readonly phases: Readonly<Record<string, number>>;
}

export interface InteractionOptions {
  /** Most states of any machine or search of one analysis before it is reported as not decided (default 200 000). */
  readonly maxStates?: number;
}

function decide<T>(f: () => T): Decided<T> {
  try {
    return { decided: true, value: f() };
  } catch (e) {
    if (e instanceof AnalysisLimitError) return { decided: false, reason: `the exact analysis ${e.message}` };
    if (e instanceof FstError) return { decided: false, reason: e.message };
    throw e;
  }
}

/** The first output of `m` on `x` that passes `keep` (every output when none does: the first). */
function outputOf(m: Fst, x: readonly number[], keep: (y: number[]) => boolean): number[] {
  const r = freeze(m).applyAll(x, 64);
  return r.outputs.find(keep) ?? r.outputs[0] ?? [...x];
}

/** Runs every analysis on a grammar. Diagnostics when the grammar cannot be compiled for analysis. */
export function analyseInteractions(grammar: Grammar, inv: Inventory, opts: InteractionOptions = {}): { report: InteractionReport | null; diagnostics: Diagnostic[] } {
  const t0 = performance.now();
  const limit = opts.maxStates ?? 200_000;
  const phases: Record<string, number> = {};
  let mark = t0;
  const phase = (name: string): void => { const t = performance.now(); phases[name] = (phases[name] ?? 0) + (t - mark) / 1000; mark = t; };
  const { machines, diagnostics } = analysisMachines(grammar, inv);
  if (machines === null) return { report: null, diagnostics };
  phase("compile");
  const size = machines.alphabet.size;
  const steps = machines.steps;
  let largest = { states: 0, what: "" };
  const note = (states: number, what: string): void => { if (states > largest.states) largest = { states, what }; };

  // The strings reaching each step (R_k) and each step's change domain (D_k).
  const words = inputWords(machines.alphabet, inv);
  const reaching: (Dfa | null)[] = [];
  const reachFail: string[] = [];
  let cur: Dfa | null = words;
  for (const s of steps) {
    reaching.push(cur);
    if (cur === null) { reachFail.push(reachFail[reachFail.length - 1] ?? "unknown"); continue; }
    note(cur.states, `strings reaching '${s.name}'`);
    const img: Decided<Dfa> = decide(() => imageOf(cur as Dfa, s.variants, limit));
    reachFail.push(img.decided ? "" : img.reason);
    cur = img.decided ? img.value : null;
  }
  const domains: Decided<ChangeDomain>[] = steps.map((s) => decide(() => changeDomainOf(s.variants, size, limit, s.kind === "syllabify")));
  domains.forEach((d, k) => { if (d.decided) note(d.value.dfa.states, `change domain of '${steps[k]!.name}'`); });
  // Searches that use a domain exact only on strings with few '.' in a row are kept to those strings.
  const runs: Filter = { dfa: boundaryRuns(size), member: true };
  const within = (...ks: number[]): Filter[] => (ks.some((k) => domains[k]?.decided === true && domains[k].value.restricted) ? [runs] : []);

  phase("languages");
  const source = (k: number, x: readonly number[]): number[] | null => {
    const t = performance.now();
    try {
      return sourceOf(steps, k, x, words, limit);
    } catch (e) {
      if (e instanceof AnalysisLimitError || e instanceof FstError) return null;
      throw e;
    } finally {
      const dt = performance.now() - t;
      phases["sources"] = (phases["sources"] ?? 0) + dt / 1000;
      mark += dt;
    }
  };
  const need = <T>(k: number, f: (R: Dfa) => T): T => {
    const R = reaching[k];
    if (R === null || R === undefined) throw new AnalysisLimitError(`the strings reaching '${steps[k]!.name}' (${reachFail[k]})`, limit);
    return f(R);
  };
  const dom = (k: number): Dfa => {
    const d = domains[k]!;
    if (!d.decided) throw new AnalysisLimitError(`the change domain of '${steps[k]!.name}' (${d.reason})`, limit);
    return d.value.dfa;
  };

  const stepResults: StepResult[] = steps.map((s, k) => ({
    index: k, name: s.name,
    applies: decide(() => need(k, (R) => {
      const x = shortestString([{ dfa: R, member: true }, { dfa: dom(k), member: true }, ...within(k)], null, size, limit, `the search for where '${s.name}' applies`);
      return x === null ? null : { input: x, source: source(k, x) };
    })),
    reachingStates: reaching[k]?.states ?? 0,
    domainStates: domains[k]!.decided ? (domains[k] as { value: ChangeDomain }).value.dfa.states : 0,
  }));

  phase("dead");
  const pairs: PairResult[] = [];
  for (let a = 0; a < steps.length; a++) {
    for (let b = a + 1; b < steps.length; b++) {
      const A = steps[a]!, B = steps[b]!;
      const rel = (kind: RelationKind): Decided<Witness | null> => decide(() => need(a, (R) => {
        // feeds/bleeds: A runs first and B's domain is tested; counter relations: B first, A's domain.
        const counter = kind === "counterfeeds" || kind === "counterbleeds";
        const first: StepMachines = counter ? B : A;
        const other: StepMachines = counter ? A : B;
        const D = dom(other.index);
        const creates = kind === "feeds" || kind === "counterfeeds";
        const inF: Filter[] = [{ dfa: R, member: true }, { dfa: D, member: !creates }, ...within(other.index)];
        const x = shortestString(inF, { machine: first.variants, output: [{ dfa: D, member: creates }, ...within(other.index)] }, size, limit, `the ${kind} search for '${A.name}' and '${B.name}'`);
        if (x === null) return null;
        const y = outputOf(first.variants, x, (o) => accepts(D, o) === creates);
        const changes = (from: readonly number[]) => (o: number[]): boolean => o.join(",") !== from.join(",");
        return { input: x, source: source(a, x), first: y, directly: outputOf(other.variants, x, changes(x)), after: outputOf(other.variants, y, changes(y)) };
      }));
      pairs.push({ a, b, relations: { feeds: rel("feeds"), bleeds: rel("bleeds"), counterfeeds: rel("counterfeeds"), counterbleeds: rel("counterbleeds") } });
    }
  }

  phase("pairs");
  const swaps: SwapResult[] = [];
  for (let a = 0; a + 1 < steps.length; a++) {
    const A = steps[a]!, B = steps[a + 1]!;
    swaps.push({
      a, b: a + 1,
      difference: decide(() => need(a, (R) => {
        const inOrder = guarded("the composition of the pair", limit, () => trim(compose(A.functional, B.functional, { maxStates: limit })));
        const swapped = guarded("the composition of the swapped pair", limit, () => trim(compose(B.functional, A.functional, { maxStates: limit })));
        note(Math.max(inOrder.numStates, swapped.numStates), `composition of '${A.name}' and '${B.name}'`);
        const x = shortestConflict(R, inOrder, swapped, limit, "the comparison of the two orders");
        if (x === null) return null;
        return { input: x, source: source(a, x), inOrder: outputOf(inOrder, x, () => true), swapped: outputOf(swapped, x, () => true) };
      })),
    });
  }

  phase("swaps");
  const environments: EnvironmentResult[] = [];
  steps.forEach((s, k) => {
    if (s.step.kind !== "rule" || s.step.environments.length < 2) return;
    const rule: Rule = s.step;
    rule.environments.forEach((env, i) => {
      environments.push({
        step: k, environment: i, line: env.span?.line ?? rule.span.line,
        adds: decide(() => need(k, (R) => {
          const full = machines.compileRule(rule);
          const without = machines.compileRule({ ...rule, environments: rule.environments.filter((_, j) => j !== i) });
          const x = shortestConflict(R, full, without, limit, "the comparison of the environments");
          return x === null ? null : { input: x, source: source(k, x) };
        })),
      });
    });
  });

  phase("environments");
  return { report: { machines, steps: stepResults, pairs, swaps, environments, domainDfas: domains.map((d) => (d.decided ? d.value.dfa : null)), largest, seconds: (performance.now() - t0) / 1000, phases }, diagnostics };
}
