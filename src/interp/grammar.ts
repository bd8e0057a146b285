// Runs a whole grammar on one word: its steps in order (rules, syllabify, stress), carrying every
// variant optional rules produce (capped), which steps changed each variant, and lints.

import type { Diagnostic } from "../diagnostics.js";
import { diagnostic } from "../diagnostics.js";
import type { Bundle, Inventory } from "../inventory/types.js";
import type { Grammar, JoinMode, Step } from "../grammar/ast.js";
import { applyPrepared } from "./apply.js";
import type { Pat, PreparedRule, RuleContext } from "./prepare.js";
import { isBoundaryBlind, preparePattern, prepareRule } from "./prepare.js";
import type { ClusterList } from "./prosody.js";
import { assignStress, resolveClusters, syllabify } from "./prosody.js";
import type { Lint, Sym, Word } from "./types.js";
import { wordKey } from "./types.js";

export interface GrammarOptions {
  /** Most variants kept after any step (default 16); the preferred one is always kept. */
  readonly maxVariants?: number;
  /** How `where` conditions are read (see RuleContext.conditions; default "desugared" by the front end). */
  readonly conditions?: "desugared" | "direct";
  /** How literal IPA segments are read (default: the inventory's tokeniser). */
  readonly resolve?: (symbol: string) => Bundle | null;
}

/** One variant at the end of the grammar, with the steps that changed it, in order. */
export interface Variant {
  readonly word: Sym[];
  readonly changedBy: readonly string[];
}

export interface GrammarRun {
  /** Every distinct output, sorted by `wordKey`. */
  readonly outputs: Sym[][];
  /** The preferred output (optional rules at their preferred setting at every site). */
  readonly preferred: Sym[];
  /**
   * Per output (same order as `outputs`): the steps that changed it, for regression blame. Where
   * two paths meet in one word after a step, the word keeps the steps of the path with fewer
   * steps, then of the one whose steps come earlier in the grammar (compared step by step): the
   * rule the compiled engine's variant trace follows (lexicon/derivation.ts).
   */
  readonly variants: readonly Variant[];
  /** The steps that changed the preferred word on its own path (a path met on the way does not replace them). */
  readonly preferredChangedBy: readonly string[];
  /** Per step, in order: whether it changed any variant. */
  readonly trace: readonly { readonly step: string; readonly changed: boolean }[];
  /** True when some step produced more variants than `maxVariants` and some were dropped. */
  readonly capped: boolean;
  /** Findings about the word (syllabification). */
  readonly lints: readonly Lint[];
  /** Problems with the grammar itself; a step that cannot be resolved is skipped. */
  readonly diagnostics: readonly Diagnostic[];
}

interface Live {
  readonly word: Sym[];
  readonly changedBy: string[];
  /** The indices (in the grammar) of the steps of `changedBy`, for choosing between paths that meet. */
  readonly changedAt: number[];
  readonly preferred: boolean;
}

/** Which of two paths that meet in one word it keeps: fewer steps, then the earlier steps (negative: `a`). */
function fewerSteps(a: readonly number[], b: readonly number[]): number {
  if (a.length !== b.length) return a.length - b.length;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i]! - b[i]!;
  return 0;
}

/** A grammar resolved once for many words. */
export interface PreparedGrammar {
  readonly inv: Inventory;
  readonly steps: readonly PreparedStep[];
  readonly diagnostics: readonly Diagnostic[];
}

type PreparedStep =
  | { readonly kind: "rule"; readonly name: string; readonly rule: PreparedRule | null }
  | { readonly kind: "syllabify"; readonly name: string; readonly onsets: ClusterList; readonly codas: ClusterList; readonly joins: JoinMode }
  | { readonly kind: "stress"; readonly name: string; readonly step: Extract<Step, { kind: "stress" }>; readonly heavy: readonly Pat[] };

export function prepareGrammar(grammar: Grammar, inv: Inventory, opts: GrammarOptions = {}): PreparedGrammar {
  const classes = new Map(grammar.classes.map((c) => [c.name, c] as const));
  const nodes = new Map(grammar.nodes.map((n) => [n.name, n] as const));
  const diagnostics: Diagnostic[] = [];
  const base: Omit<RuleContext, "boundaryBlind"> = {
    inv, classes, nodes, conditions: opts.conditions ?? "desugared", ...(opts.resolve !== undefined ? { resolve: opts.resolve } : {}),
  };
  const clusters = (list: Grammar["onsets"], what: string): ClusterList => {
    const r = resolveClusters(list, inv, opts.resolve);
    for (const u of r.unknown) diagnostics.push(diagnostic("error", "interp/unknown-segment", `${what}: '${u.symbol}' is not a segment of the inventory`, u.cluster.span));
    return r.list;
  };
  let syllabification: { onsets: ClusterList; codas: ClusterList; joins: JoinMode } | null = null;
  let heavy: Pat[] | null = null;
  const steps: PreparedStep[] = grammar.steps.map((s): PreparedStep => {
    switch (s.kind) {
      case "rule": {
        const r = prepareRule(s, { ...base, boundaryBlind: isBoundaryBlind(s) });
        diagnostics.push(...r.diagnostics);
        return { kind: "rule", name: s.name, rule: r.rule };
      }
      case "syllabify":
        syllabification ??= { onsets: clusters(grammar.onsets, "onsets"), codas: clusters(grammar.codas, "codas"), joins: grammar.joins ?? "through" };
        return { kind: "syllabify", name: s.name, ...syllabification };
      case "stress": {
        if (heavy === null) {
          heavy = [];
          for (const h of grammar.heavy) {
            const r = preparePattern(h, { ...base, boundaryBlind: false }, "heavy");
            diagnostics.push(...r.diagnostics);
            if (r.pat !== null) heavy.push(r.pat);
          }
        }
        return { kind: "stress", name: s.name, step: s, heavy };
      }
      default: {
        const never: never = s;
        return never;
      }
    }
  });
  return { inv, steps, diagnostics };
}

/**
 * Apply the grammar's steps in order to `word` (a `#`-bracketed symbol array), on bundles, with
 * no automata. Optional rules multiply variants; after each step at most `maxVariants` are kept
 * (the preferred one first, then the rest by key) and `capped` says if any were dropped.
 */
export function applyGrammar(grammar: Grammar | PreparedGrammar, inv: Inventory, word: Word, opts: GrammarOptions = {}): GrammarRun {
  const g = "steps" in grammar && "inv" in grammar ? grammar : prepareGrammar(grammar, inv, opts);
  const max = Math.max(1, opts.maxVariants ?? 16);
  let live: Live[] = [{ word: [...word], changedBy: [], changedAt: [], preferred: true }];
  const preferredChangedBy: string[] = [];
  const trace: { step: string; changed: boolean }[] = [];
  const lints: Lint[] = [];
  let capped = false;
  for (let at = 0; at < g.steps.length; at++) {
    const step = g.steps[at]!;
    const next = new Map<string, Live>();
    let changed = false;
    let preferredKey = "";
    for (const v of live) {
      const before = wordKey(v.word);
      let results: { word: Sym[]; preferred: boolean }[];
      switch (step.kind) {
        case "rule": {
          if (step.rule === null) {
            results = [{ word: v.word, preferred: v.preferred }];
            break;
          }
          // Each variant may give at most `max` words here; the preferred one is always among them.
          const r = applyPrepared(step.rule, v.word, max);
          if (r.capped) capped = true;
          const prefKey = wordKey(r.preferred);
          results = r.outputs.map((w) => ({ word: w, preferred: v.preferred && wordKey(w) === prefKey }));
          break;
        }
        case "syllabify": {
          const r = syllabify(v.word, step.onsets, step.codas, g.inv, step.joins);
          if (v.preferred) lints.push(...r.problems);
          results = [{ word: r.word, preferred: v.preferred }];
          break;
        }
        case "stress":
          results = [{ word: assignStress(v.word, step.step, step.heavy, g.inv), preferred: v.preferred }];
          break;
        default: {
          const never: never = step;
          results = never;
        }
      }
      for (const r of results) {
        const key = wordKey(r.word);
        const didChange = key !== before;
        if (didChange) changed = true;
        const entry: Live = didChange
          ? { word: r.word, changedBy: [...v.changedBy, step.name], changedAt: [...v.changedAt, at], preferred: r.preferred }
          : { word: r.word, changedBy: v.changedBy, changedAt: v.changedAt, preferred: r.preferred };
        const prior = next.get(key);
        if (prior === undefined) next.set(key, entry);
        else {
          const kept = fewerSteps(entry.changedAt, prior.changedAt) < 0 ? entry : prior;
          const preferred = entry.preferred || prior.preferred;
          if (kept !== prior || preferred !== prior.preferred) next.set(key, { ...kept, preferred });
        }
        if (r.preferred) {
          preferredKey = key;
          if (didChange) preferredChangedBy.push(step.name);
        }
      }
      // Memory stays bounded (max variants × max outputs each could be millions of words): only
      // the preferred word and the `max` smallest keys can survive the cut below, so drop the rest now.
      if (next.size > 2 * max) {
        capped = true;
        const smallest = new Set([...next.keys()].filter((k) => k !== preferredKey).sort().slice(0, max));
        for (const k of [...next.keys()]) if (k !== preferredKey && !smallest.has(k)) next.delete(k);
      }
    }
    trace.push({ step: step.name, changed });
    const keys = [...next.keys()].sort();
    if (keys.length > max) {
      capped = true;
      const kept = [preferredKey, ...keys.filter((k) => k !== preferredKey)].slice(0, max).sort();
      live = kept.map((k) => next.get(k) as Live);
    } else live = keys.map((k) => next.get(k) as Live);
  }
  const preferred = live.find((v) => v.preferred) ?? (live[0] as Live);
  return {
    outputs: live.map((v) => v.word),
    preferred: preferred.word,
    variants: live.map((v) => ({ word: v.word, changedBy: v.changedBy })),
    preferredChangedBy,
    trace,
    capped,
    lints,
    diagnostics: g.diagnostics,
  };
}
