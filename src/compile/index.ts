// The rule compiler's public surface: a grammar and its inventory become the alphabet, one machine
// per step (rules, syllabify, stress), the composed cascades (preferred and variants) and runners.

import type { Grammar, Rule, Step } from "../grammar/ast.js";
import { desugar as grammarDesugar, isBoundaryBlind, namesJoin } from "../grammar/index.js";
import type { Bundle, Inventory } from "../inventory/types.js";
import { bundleKey } from "../inventory/types.js";
import type { Sym } from "../interp/index.js";
import { JOIN_EDGE, SYLLABLE_EDGE, WORD_EDGE } from "../interp/index.js";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { FstLimitError, isFunctional, type Fst } from "../fst/index.js";
import { type Alphabet, computeAlphabet, FIRST_SEGMENT, JOIN, SYLL, WORD, symbolText } from "./alphabet.js";
import { Budget, CompileLimitError, describe as describeLimit, type CompileLimits } from "./budget.js";
import { SymbolLowering, lowerRule } from "./cases.js";
import { Lowering, LowerError, lowerError } from "./lower.js";
import { buildRule, type PairNfa } from "./rule.js";
import { buildStress, buildSyllabifier } from "./prosody.js";
import { finishMachine, finishPairNfa } from "./machine.js";
import { composeCascade, PreferredRunner, VariantsRunner, type Block } from "./cascade.js";
import { startCascade } from "./parallel.js";
import { cacheWarning, cachePath, dropCache, readCache, sha256, writeCache, type CachedMachine } from "./cache.js";

export { type Alphabet, EPSILON, WORD, SYLL, JOIN, FIRST_SEGMENT, symbolText } from "./alphabet.js";
export type { BatchResult, Block } from "./cascade.js";
export { DEFAULT_LIMITS, type CompileLimits } from "./budget.js";

/** Bumped whenever the compiler's output for a grammar or the stored form of its runners can change (invalidates every cache). */
export const COMPILER_VERSION = "strata-compile-6";

export interface CompileOptions {
  /** Folder for cached machines (e.g. "build/cache"); no caching when absent. */
  readonly cacheDir?: string;
  /** Largest composed block, in states, before the cascade starts a new block (default 50 000); 1: one block per step, nothing composed. */
  readonly maxStates?: number;
  /** Shorthand expansion (default: the grammar front end's `desugar`). */
  readonly desugar?: (rule: Rule) => Rule;
  /** Limits on states, cases, time and memory (DEFAULT_LIMITS for what is not given); see budget.ts. */
  readonly limits?: Partial<CompileLimits>;
  /**
   * Segments that input words carry beyond the inventory's (written with its diacritics, e.g. a
   * long vowel no rule makes): the alphabet starts from them too, so the machines accept them
   * (DEVELOPERS.md, "Segments the rules never make"). Part of the cache key.
   */
  readonly extraSegments?: readonly Bundle[];
  /**
   * Threads for composing: with 2 or more (the default where the machine has two cores) the
   * variants cascade is composed on a worker thread while this one composes the preferred cascade
   * (compiled code only; the same machines as on one thread). 1: one thread.
   */
  readonly threads?: number;
}

/** Size of one step's machine (the variants machine; `preferred*` when the preferred one differs). */
export interface StepSize {
  readonly name: string;
  readonly kind: Step["kind"];
  readonly optional: boolean;
  readonly states: number;
  readonly arcs: number;
  readonly preferredStates: number;
  readonly preferredArcs: number;
}

export interface CascadeSize {
  readonly blocks: readonly { readonly from: number; readonly to: number; readonly states: number; readonly arcs: number }[];
  readonly states: number;
  readonly arcs: number;
}

export interface Compiled {
  readonly alphabet: Alphabet;
  readonly steps: readonly StepSize[];
  /** The preferred cascade (optional rules at their preferred setting), frozen. */
  readonly preferred: PreferredRunner;
  readonly preferredSize: CascadeSize;
  readonly variantsSize: CascadeSize;
  /** True when some optional rule (or alpha ambiguity) can give a word several outputs. */
  readonly hasVariants: boolean;
  /** Every output of the grammar for a word (symbol ids), sorted, at most `cap`. */
  variants(symbols: ArrayLike<number>, cap?: number): { outputs: number[][]; capped: boolean };
  /** Symbol ids of an interpreter word; null when a segment is outside the alphabet. */
  encode(word: readonly Sym[]): number[] | null;
  decode(ids: ArrayLike<number>): Sym[];
  /** "hit": read from the cache; "miss": compiled and stored; "rebuilt": the cached file was stale or corrupt; "off": no cache folder. */
  readonly cache: "hit" | "miss" | "rebuilt" | "off";
  readonly cacheKey: string;
  /** Threads the compile used: 2 when the variants cascade was composed on a worker thread, else 1. */
  readonly threads: number;
  /** Milliseconds: compiling the steps, composing, freezing (zero for parts read from the cache). */
  readonly timings: { readonly steps: number; readonly compose: number; readonly freeze: number; readonly total: number };
  /** The block machines of both cascades (for DOT output and tests). */
  readonly preferredBlocks: readonly Block[];
  readonly variantBlocks: readonly Block[];
}

export type CompileResult = { readonly compiled: Compiled; readonly diagnostics: readonly Diagnostic[] } | { readonly compiled: null; readonly diagnostics: readonly Diagnostic[] };

/** Everything before composition: the alphabet and each step's machines. */
export interface CompiledSteps {
  readonly alphabet: Alphabet;
  readonly steps: readonly { readonly step: Step; readonly variants: Fst; readonly preferred: Fst | null }[];
}

/** A limit reached while compiling `step` (or an input error found while lowering it) as its diagnostic; other errors are rethrown. */
function stepError(step: Step, e: unknown, budget: Budget): Diagnostic {
  if (e instanceof LowerError) return e.diagnostic;
  const what = step.kind === "rule" ? `Rule '${step.name}'` : `Step '${step.name}'`;
  if (e instanceof CompileLimitError) return tooLarge(step, `${what} cannot be compiled within the limits: ${e.part} reached ${describeLimit(e.kind, e.limit)}.`);
  if (e instanceof FstLimitError) {
    return tooLarge(step, `${what} cannot be compiled within the limits: ${budget.part} reached ${describeLimit("states", e.limit)}.`);
  }
  throw e;
}

function tooLarge(step: Step, message: string): Diagnostic {
  return diagnostic("error", "compile/too-large", `${message} Simplify its contexts or split it.`, step.span);
}

/**
 * The desugared steps, as the compiler and the interpreter both read them. The default is the
 * grammar front end's `desugar` with the inventory and classes (so literals and classes are
 * intersected exactly with the condition material).
 */
export function desugaredSteps(grammar: Grammar, inv: Inventory, desugar?: (r: Rule) => Rule): Step[] {
  const d = desugar ?? ((r: Rule) => grammarDesugar(r, { inventory: inv, classes: grammar.classes, nodes: grammar.nodes }));
  return grammar.steps.map((s) => (s.kind === "rule" ? d(s) : s));
}

/** Compiles one step into its machine(s) over the alphabet. `preferred` null: the preferred cascade skips it (identity). */
export function compileStep(
  grammar: Grammar, low: Lowering, alphabet: Alphabet, step: Step, domain: Uint8Array, budget: Budget = new Budget(),
): { variants: Fst; preferred: Fst | null } {
  const sl = new SymbolLowering(low, alphabet);
  const fin = (p: PairNfa): Fst =>
    budget.within(`minimising its machine (${p.states.toLocaleString("en-US")} states before)`, () =>
      finishPairNfa(p, { maxStates: budget.limits.machineStates, progress: budget.tick }));
  /** The rule's alignment construction, with its parts named for the limits. */
  const rule = (r: Rule, variant: "variants" | "preferred"): PairNfa => {
    const blind = isBoundaryBlind(r);
    const lowered = lowerRule(sl, r, { blind, joinBlind: !namesJoin(r), domain, budget, ...(variant === "preferred" ? { preferred: true } : {}) });
    return budget.within(`the alignment construction${variant === "preferred" ? " of its preferred variant" : ""}`, () => buildRule(lowered, budget));
  };
  switch (step.kind) {
    case "syllabify": {
      const m = fin(buildSyllabifier(grammar, low, alphabet, domain));
      return { variants: m, preferred: m };
    }
    case "stress": {
      const m = fin(buildStress(step, grammar, sl, domain));
      return { variants: m, preferred: m };
    }
    case "rule": {
      const variants = fin(rule(step, "variants"));
      if (step.optional && step.prefer === "unapplied") return { variants, preferred: null };
      // An obligatory rule without variables has one output per word: its preferred machine is the same.
      if (!step.optional && low.variables(step).size === 0) return { variants, preferred: variants };
      const preferred = fin(rule(step, "preferred"));
      // The preferred cascade is run by machines that take one path (the functional runner, or a
      // search for the first output): that is exact only if every preferred step has one output
      // per input. Checked here, so a second output can never be dropped silently at run time.
      const single = budget.within("checking its preferred variant has one output", () => isFunctional(preferred, budget.limits.machineStates));
      if (!single.functional) {
        throw lowerError(
          "compile/ambiguous-preferred",
          `Rule '${step.name}': its preferred variant has two outputs for '${single.input.map((x) => symbolText(alphabet, x)).join("")}'; this is a fault of the compiler, please report it with the grammar.`,
          step.span,
        );
      }
      return { variants, preferred };
    }
    default: {
      const never: never = step;
      throw new Error(String(never));
    }
  }
}

/** Alphabet and per-step machines, with diagnostics for anything that cannot be compiled. */
export function compileSteps(
  grammar: Grammar, inv: Inventory, opts: CompileOptions = {}, budget: Budget = new Budget(opts.limits),
): { result: CompiledSteps | null; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const steps = desugaredSteps(grammar, inv, opts.desugar);
  const low = new Lowering(grammar, inv);
  low.maxAssignments = budget.limits.ruleCases;
  let alphabet: Alphabet;
  try {
    alphabet = computeAlphabet(inv, low, steps, opts.extraSegments ?? []);
  } catch (e) {
    if (e instanceof LowerError) return { result: null, diagnostics: [e.diagnostic] };
    throw e;
  }
  const out: { step: Step; variants: Fst; preferred: Fst | null }[] = [];
  steps.forEach((step, k) => {
    try {
      out.push({ step, ...compileStep(grammar, low, alphabet, step, alphabet.domains[k]!, budget) });
    } catch (e) {
      diagnostics.push(stepError(step, e, budget));
      // Past the deadline or the heap budget every later step would fail the same way.
      if (e instanceof CompileLimitError && (e.kind === "time" || e.kind === "memory")) return { result: null, diagnostics };
    }
  });
  if (diagnostics.some((d) => d.severity === "error")) return { result: null, diagnostics };
  return { result: { alphabet, steps: out }, diagnostics };
}

/**
 * The segments of `words` an alphabet lacks, with prosody cleared and each once (key order): what
 * `extraSegments` needs so that the machines accept the words. A segment the alphabet has only
 * because a step makes it (outside the first step's domain) is lacking too.
 */
export function segmentsOutside(alphabet: Alphabet, inv: Inventory, words: readonly (readonly Sym[])[]): Bundle[] {
  const si = inv.featureIndex.get("stress");
  const pi = inv.featureIndex.get("primary");
  const found = new Map<string, Bundle>();
  for (const w of words) {
    for (const s of w) {
      if (s.kind !== "segment") continue;
      const id = alphabet.byKey.get(bundleKey(s.bundle));
      if (id !== undefined && (alphabet.domains[0] === undefined || alphabet.domains[0][id] === 1)) continue;
      const b = [...s.bundle];
      if (si !== undefined) b[si] = "0";
      if (pi !== undefined) b[pi] = "0";
      found.set(bundleKey(b), b);
    }
  }
  return [...found.keys()].sort().map((k) => found.get(k)!);
}

function cascadeSize(blocks: readonly Block[]): CascadeSize {
  return {
    blocks: blocks.map((b) => ({ from: b.from, to: b.to, states: b.states, arcs: b.arcs })),
    states: blocks.reduce((n, b) => n + b.states, 0),
    arcs: blocks.reduce((n, b) => n + b.arcs, 0),
  };
}

/** The cache key: compiler version, options that change the result, the grammar (as parsed) and the inventory (features, segments, diacritics). */
export function cacheKeyOf(grammar: Grammar, inv: Inventory, maxStates: number, extraSegments: readonly Bundle[] = []): string {
  const invData = {
    features: inv.features,
    segments: inv.segments.map((s) => [s.symbol, bundleKey(s.bundle)]),
    diacritics: inv.diacritics.map((d) => [d.mark, d.name, [...d.sets.entries()], d.aliases, d.order]),
  };
  // Where the files lie does not change the machines: paths and source positions are left out,
  // so a moved checkout keeps its cache.
  const placeless = (k: string, v: unknown): unknown => (k === "span" || k === "file" || k === "files" || k === "inventory" || k === "diacritics" ? undefined : v);
  const extra = extraSegments.length === 0 ? [] : [[...new Set(extraSegments.map(bundleKey))].sort().join(" ")];
  return sha256([COMPILER_VERSION, String(maxStates), JSON.stringify(grammar, placeless), JSON.stringify(invData), ...extra]);
}

interface CacheMeta {
  readonly version: string;
  readonly alphabet: { readonly bundles: string[]; readonly texts: string[]; readonly domains: number[][] };
  readonly steps: StepSize[];
  readonly preferred: { from: number; to: number }[];
  readonly variants: { from: number; to: number }[];
  readonly hasVariants: boolean;
  /** How each preferred block runs ("sequential" or "search"). */
  readonly runners?: readonly string[];
}

function alphabetFromMeta(meta: CacheMeta["alphabet"]): Alphabet {
  const byKey = new Map<string, number>();
  const segments = meta.bundles.map((key, i) => {
    byKey.set(key, i + FIRST_SEGMENT);
    return { id: i + FIRST_SEGMENT, key, bundle: [...key] as Bundle, text: meta.texts[i]! };
  });
  const size = segments.length + FIRST_SEGMENT;
  const domains = meta.domains.map((ids) => { const d = new Uint8Array(size); for (const i of ids) d[i] = 1; return d; });
  return { size, segments, byKey, domains };
}

function isCacheMeta(m: unknown): m is CacheMeta {
  return typeof m === "object" && m !== null && (m as { version?: unknown }).version === COMPILER_VERSION
    && Array.isArray((m as CacheMeta).preferred) && Array.isArray((m as CacheMeta).variants);
}

/**
 * Compiles a grammar (steps in order) over an inventory. Errors come back as diagnostics with
 * the offending rule's position; with `cacheDir`, a previous compilation with the same key is
 * read instead (a corrupt or stale file is rebuilt and reported as "rebuilt").
 */
export function compileGrammar(grammar: Grammar, inv: Inventory, opts: CompileOptions = {}): CompileResult {
  const t0 = performance.now();
  const maxStates = opts.maxStates ?? 50_000;
  const key = cacheKeyOf(grammar, inv, maxStates, opts.extraSegments);
  let cacheState: Compiled["cache"] = opts.cacheDir === undefined ? "off" : "miss";
  const cacheWarnings: Diagnostic[] = [];
  if (opts.cacheDir !== undefined) {
    const read = readCache(opts.cacheDir, key, (m) => (isCacheMeta(m) ? m.preferred.length + m.variants.length : 0));
    if (read.state === "ok" && isCacheMeta(read.meta)) {
      const meta = read.meta;
      // A block's machine is decoded only when something asks for it (the variants, or a runner
      // whose tables did not come back): a run of the preferred runners never does.
      const block = (r: { from: number; to: number }, m: CachedMachine): Block => ({ ...r, states: m.states, arcs: m.arcs, get machine() { return m.machine(); } });
      const pb = meta.preferred.map((r, i) => block(r, read.machines[i]!));
      const vb = meta.variants.map((r, i) => block(r, read.machines[meta.preferred.length + i]!));
      const t1 = performance.now();
      const compiled = assemble(alphabetFromMeta(meta.alphabet), meta.steps, pb, vb, meta.hasVariants, "hit", key, { steps: 0, compose: 0, freeze: 0, total: 0 }, meta.runners, read.blobs);
      return { compiled: { ...compiled, threads: 1, timings: { steps: 0, compose: 0, freeze: performance.now() - t1, total: performance.now() - t0 } }, diagnostics: [] };
    }
    if (read.state === "corrupt" || (read.state === "ok" && !isCacheMeta(read.meta))) {
      cacheState = "rebuilt";
      const why = read.state === "corrupt" ? read.reason : "written by another compiler version";
      cacheWarnings.push(cacheWarning(cachePath(opts.cacheDir, key), `The cached machine ${cachePath(opts.cacheDir, key)} was not used (${why}); it is compiled again.`));
      dropCache(opts.cacheDir, key);
    }
  }
  const budget = new Budget(opts.limits);
  const { result, diagnostics: stepDiagnostics } = compileSteps(grammar, inv, opts, budget);
  const diagnostics = [...stepDiagnostics, ...cacheWarnings];
  if (result === null) return { compiled: null, diagnostics };
  try {
    return composeAndFreeze(result, opts, budget, key, cacheState, diagnostics, t0, maxStates);
  } catch (e) {
    if (!(e instanceof CompileLimitError || e instanceof FstLimitError)) throw e;
    const step = result.steps[Math.max(0, budget.step)]?.step;
    const reached = e instanceof CompileLimitError ? describeLimit(e.kind, e.limit) : describeLimit("states", e.limit);
    const message = `The grammar cannot be compiled within the limits: ${budget.part} reached ${reached}.`;
    return { compiled: null, diagnostics: [...diagnostics, step !== undefined ? tooLarge(step, message) : diagnostic("error", "compile/too-large", message, { file: grammar.file, line: 1, column: 1 })] };
  }
}

/** Composition of both cascades, the runners, and the cache write: the part of `compileGrammar` after the steps. */
function composeAndFreeze(
  result: CompiledSteps, opts: CompileOptions, budget: Budget, key: string, cacheState: Compiled["cache"],
  stepDiagnostics: readonly Diagnostic[], t0: number, maxStates: number,
): CompileResult {
  const diagnostics = [...stepDiagnostics];
  const t1 = performance.now();
  const steps: StepSize[] = result.steps.map(({ step, variants, preferred }) => ({
    name: step.name, kind: step.kind, optional: step.kind === "rule" && step.optional,
    states: variants.numStates, arcs: variants.numArcs(),
    preferredStates: preferred?.numStates ?? 0, preferredArcs: preferred?.numArcs() ?? 0,
  }));
  const hasVariants = result.steps.some((s) => s.step.kind === "rule" && (s.step.optional || s.preferred === null || !sameMachine(s.variants, s.preferred)));
  // The two cascades are independent: the variants one may go to a worker thread meanwhile (parallel.ts).
  const variants = hasVariants ? startCascade(result.steps.map((s) => s.variants), maxStates, budget, opts.threads) : null;
  let preferredBlocks: Block[];
  try {
    preferredBlocks = composeCascade(result.steps.map((s) => s.preferred), maxStates, budget);
  } catch (e) {
    variants?.cancel();
    throw e;
  }
  const variantBlocks = variants !== null ? variants.blocks() : preferredBlocks;
  const t2 = performance.now();
  const compiled = assemble(result.alphabet, steps, preferredBlocks, variantBlocks, hasVariants, cacheState, key, { steps: t1 - t0, compose: t2 - t1, freeze: 0, total: 0 }, undefined, undefined, budget);
  const t3 = performance.now();
  if (opts.cacheDir !== undefined) {
    const a = result.alphabet;
    const meta: CacheMeta = {
      version: COMPILER_VERSION,
      alphabet: {
        bundles: a.segments.map((s) => s.key),
        texts: a.segments.map((s) => s.text),
        domains: a.domains.map((d) => { const ids: number[] = []; d.forEach((v, i) => { if (v) ids.push(i); }); return ids; }),
      },
      steps,
      preferred: preferredBlocks.map((b) => ({ from: b.from, to: b.to })),
      variants: variantBlocks.map((b) => ({ from: b.from, to: b.to })),
      hasVariants,
      runners: compiled.preferred.kinds,
    };
    const unwritten = writeCache(opts.cacheDir, key, meta, [...preferredBlocks.map((b) => b.machine), ...variantBlocks.map((b) => b.machine)], compiled.preferred.frozenBytes());
    if (unwritten !== undefined) diagnostics.push(cacheWarning(opts.cacheDir, `The compiled machine could not be cached in ${opts.cacheDir} (${unwritten}); the next run compiles it again.`));
  }
  return { compiled: { ...compiled, threads: 1 + (variants?.threads ?? 0), timings: { steps: t1 - t0, compose: t2 - t1, freeze: t3 - t2, total: performance.now() - t0 } }, diagnostics };
}

/** Structural equality of two machines (same states, finals and arcs in order). */
function sameMachine(a: Fst, b: Fst): boolean {
  if (a.numStates !== b.numStates || a.numArcs() !== b.numArcs() || a.start !== b.start) return false;
  for (let s = 0; s < a.numStates; s++) {
    if (a.isFinal(s) !== b.isFinal(s)) return false;
    const x = a.arcs(s), y = b.arcs(s);
    if (x.length !== y.length) return false;
    for (let k = 0; k < x.length; k++) if (x[k]!.input !== y[k]!.input || x[k]!.output !== y[k]!.output || x[k]!.target !== y[k]!.target) return false;
  }
  return true;
}

function assemble(
  alphabet: Alphabet, steps: StepSize[], preferredBlocks: Block[], variantBlocks: Block[], hasVariants: boolean,
  cache: Compiled["cache"], cacheKey: string, timings: Compiled["timings"], kinds?: readonly string[],
  frozen?: readonly (Uint8Array | null)[], budget?: Budget,
): Compiled {
  const preferred = new PreferredRunner(preferredBlocks, kinds, frozen, budget);
  const variantsRunner = new VariantsRunner(variantBlocks);
  // A segment only a step makes (not in the first step's domain) is outside what the machines read.
  const first = alphabet.domains[0];
  const encode = (word: readonly Sym[]): number[] | null => {
    const out: number[] = [];
    for (const s of word) {
      if (s.kind === "boundary") { out.push(s.which === "word" ? WORD : s.which === "join" ? JOIN : SYLL); continue; }
      const id = alphabet.byKey.get(bundleKey(s.bundle));
      if (id === undefined || (first !== undefined && first[id] !== 1)) return null;
      out.push(id);
    }
    return out;
  };
  const decode = (ids: ArrayLike<number>): Sym[] => {
    const out: Sym[] = [];
    for (let i = 0; i < ids.length; i++) {
      const id = ids[i]!;
      if (id === WORD) out.push(WORD_EDGE);
      else if (id === SYLL) out.push(SYLLABLE_EDGE);
      else if (id === JOIN) out.push(JOIN_EDGE);
      else {
        const seg = alphabet.segments[id - FIRST_SEGMENT];
        if (seg === undefined) throw new Error(`decode: no symbol ${id} (${symbolText(alphabet, id)})`);
        out.push({ kind: "segment", bundle: seg.bundle });
      }
    }
    return out;
  };
  return {
    alphabet, steps, preferred,
    preferredSize: cascadeSize(preferredBlocks),
    variantsSize: cascadeSize(variantBlocks),
    hasVariants,
    variants: (symbols, cap = 16) => variantsRunner.run(symbols, cap),
    encode, decode, cache, cacheKey, timings, preferredBlocks, variantBlocks, threads: 1,
  };
}
