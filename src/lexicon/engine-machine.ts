// The production Engine: the composed, frozen cascade of a compiled grammar gives the narrow form;
// a one-block-per-step compilation of the same grammar says which steps changed the entry (blame);
// the grammar's syllabify and stress steps alone give the broad syllabified column.
// Work is done only for what the caller's outputs print (`Needs`): TSV needs neither variants nor blame.

import type { Diagnostic } from "../diagnostics.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { WORD_EDGE, type Word } from "../interp/index.js";
import { compileGrammar, segmentsOutside, type Compiled } from "../compile/index.js";
import type { Bundle } from "../inventory/types.js";
import { ALL_NEEDS, type Engine, type Needs, type Transcription } from "./engine.js";
import { prosodyOnly } from "./engine-interp.js";
import { renderIpa, symbolView, type SymbolView } from "./render.js";
import { tiedView } from "./ties.js";
import { preferredDerivation, VariantTracer } from "./derivation.js";
import { SymbolEncoder } from "./encode.js";
import { VariantScreen } from "./variants.js";

export interface MachineEngineOptions {
  /** Cache folder for compiled machines (e.g. build/cache); none when absent. */
  readonly cacheDir?: string;
  /** Largest composed block in states (the compiler's default when absent). */
  readonly maxStates?: number;
  /** Most variants per entry (default 16). */
  readonly maxVariants?: number;
  /** Compute which steps changed each entry (default true; costs one run per step). */
  readonly blame?: boolean;
  /** Write '.' between unstressed syllables (default true; stress marks are always written). */
  readonly syllables?: boolean;
  /** Write tie bars between the letters of one segment (t͡ʃ, a͡ɪ; inventory/diphthong.ts; default false). */
  readonly ties?: boolean;
  /** Record each entry's derivation (forms after each step) and each variant's steps (default true; the JSON Lines output needs them). */
  readonly derivations?: boolean;
}

export class MachineEngine implements Engine {
  readonly steps: readonly string[];
  readonly writesSyllables: boolean;
  private readonly view: SymbolView;
  private readonly broadView: SymbolView;
  private readonly out: number[] = [];
  private readonly bout: number[] = [];
  private readonly stepA: number[] = [];
  private readonly stepB: number[] = [];
  private readonly enc: SymbolEncoder;
  private readonly benc: SymbolEncoder;
  /** Decides from the per-step runs whether an entry can have more than one variant (null: no blame machines). */
  private readonly screen: VariantScreen | null;
  /**
   * For words with segments the alphabet lacks (the inventory writes them, no rule makes them):
   * an engine compiled with those segments added (`extraSegments`), rebuilt when a word brings
   * another one. Absent when the engine cannot recompile.
   */
  private extended: MachineEngine | undefined;
  extend: ((extra: readonly Bundle[]) => MachineEngine | undefined) | undefined;
  extras: readonly Bundle[] = [];

  constructor(
    readonly compiled: Compiled,
    private readonly stepwise: Compiled | null,
    readonly broad: Compiled,
    private readonly inventory: Inventory,
    stepNames: readonly string[],
    private readonly maxVariants: number,
    private readonly render: { readonly syllables: boolean; readonly derivations?: boolean; readonly ties?: boolean } = { syllables: true },
  ) {
    this.steps = stepNames;
    this.writesSyllables = render.syllables;
    this.view = tiedView(symbolView(compiled.alphabet, inventory), render.ties === true);
    this.broadView = tiedView(symbolView(broad.alphabet, inventory), render.ties === true);
    this.enc = new SymbolEncoder(compiled);
    this.benc = new SymbolEncoder(broad);
    this.screen = stepwise !== null && compiled.hasVariants ? VariantScreen.of(stepwise) : null;
  }

  /** Runs the preferred cascade on '#'-bracketed symbol ids; undefined when the machine rejects them. */
  runIds(ids: ArrayLike<number>): number[] | undefined {
    const out: number[] = [];
    return this.compiled.preferred.run(ids, out) ? out : undefined;
  }

  /** Symbol ids of a reader word (with its '#' edges) for the full and the prosody-only machines. */
  encode(symbols: Word): { ids: number[]; bids: number[] } | undefined {
    const ids = this.enc.encode(symbols);
    if (ids === null) return undefined;
    const bids = this.benc.encode(symbols);
    return bids === null ? undefined : { ids, bids };
  }

  transcribeWord(symbols: Word, needs: Needs = ALL_NEEDS): Transcription | undefined {
    const e = this.encode(symbols);
    if (e !== undefined) return this.transcribeIds(e.ids, e.bids, needs);
    return this.widened(symbols)?.transcribeWord(symbols, needs);
  }

  /** The extended engine that accepts `symbols` (recompiled with their unseen segments), if any. */
  private widened(symbols: Word): MachineEngine | undefined {
    if (this.extend === undefined) return undefined;
    const word = [WORD_EDGE, ...symbols, WORD_EDGE];
    const current = this.extended;
    if (current !== undefined && current.encode(symbols) !== undefined) return current;
    const base = current ?? this;
    const seen = new Set<string>();
    const missing = [base.compiled.alphabet, base.broad.alphabet]
      .flatMap((a) => segmentsOutside(a, this.inventory, [word]))
      .filter((b) => { const k = b.join(""); return !seen.has(k) && seen.add(k) !== undefined; });
    if (missing.length === 0) return undefined;
    const next = this.extend([...(current?.extras ?? []), ...missing]);
    if (next === undefined) return undefined;
    this.extended = next;
    return next.encode(symbols) !== undefined ? next : undefined;
  }

  /** The work a worker thread does: machines over encoded ids, IPA out. */
  transcribeIds(ids: ArrayLike<number>, bids: ArrayLike<number>, needs: Needs = ALL_NEEDS): Transcription | undefined {
    const out = this.out;
    out.length = 0;
    const ambiguousBefore = this.compiled.preferred.ambiguities;
    if (!this.compiled.preferred.run(ids, out)) return undefined;
    const ambiguous = this.compiled.preferred.ambiguities !== ambiguousBefore;
    const narrow = renderIpa(out, this.view, this.render);
    const bout = this.bout;
    bout.length = 0;
    if (!this.broad.preferred.run(bids, bout)) return undefined;
    const broadText = renderIpa(bout, this.broadView, { ...this.render, joins: true });
    // Blame runs every step on its own; the same runs tell the screen whether variants can exist.
    const wantRules = needs.rules === true && this.stepwise !== null;
    const wantVariants = needs.variants === true && this.compiled.hasVariants;
    const rules = wantRules || (wantVariants && this.screen !== null) ? this.blame(ids, wantVariants) : NO_BLAME;
    let variants: string[] = [narrow];
    let capped = false;
    if (wantVariants && !rules.single) {
      const v = this.compiled.variants(ids, this.maxVariants);
      capped = v.capped;
      const all = v.outputs.map((o) => renderIpa(o, this.view, this.render));
      variants = [narrow, ...[...new Set(all)].filter((x) => x !== narrow)];
    }
    const ruleList = wantRules ? rules.changed : [];
    if (!wantRules || !(this.render.derivations ?? true)) {
      return { narrow, broad: broadText, variants, rules: ruleList, derivation: [], variantSteps: variants.map((_, i) => (i === 0 ? ruleList : [])), ...(capped ? { capped: true as const } : {}), ...(ambiguous ? { ambiguous: true as const } : {}) };
    }
    // The derivation (form after each step) and each variant's steps, for the JSON Lines output.
    const sw = this.stepwise!;
    const idList = Array.from(ids);
    const { derivation } = preferredDerivation(sw, this.steps, idList, this.view, this.render);
    let variantSteps: string[][] = [ruleList];
    if (variants.length > 1) {
      this.tracer ??= new VariantTracer(sw, this.steps);
      const byText = new Map<string, string[]>();
      for (const [key, steps] of this.tracer.run(idList, this.maxVariants)) {
        const text = renderIpa(key.split(",").map(Number), this.view, this.render);
        if (!byText.has(text)) byText.set(text, steps);
      }
      // A variant the traced run dropped at its cap (more than maxVariants on the way) gets no steps.
      variantSteps = variants.map((v, i) => (i === 0 ? ruleList : byText.get(v) ?? []));
    }
    return { narrow, broad: broadText, variants, rules: ruleList, derivation, variantSteps, ...(capped ? { capped: true as const } : {}), ...(ambiguous ? { ambiguous: true as const } : {}) };
  }

  /**
   * Steps whose own machine changed the (preferred) word, in order (one block per step), and —
   * when `screen` — whether the screen proved that the entry has exactly one variant.
   */
  private blame(ids: ArrayLike<number>, screen: boolean): { changed: string[]; single: boolean } {
    const sw = this.stepwise!;
    const changed: string[] = [];
    let cur: ArrayLike<number> = ids;
    const blocks = sw.preferredBlocks;
    const check = screen ? this.screen : null;
    let single = check !== null;
    // Steps before `unchecked` have been screened; a step with no preferred block (prefer
    // unapplied) leaves the preferred string as it is, so it is screened on the current string.
    let unchecked = 0;
    let k = 0;
    for (; k < blocks.length; k++) {
      const b = blocks[k]!;
      if (single) {
        single = check!.identity(unchecked, b.from + 1, cur) && !check!.branchingIn(b.from + 1, b.to);
        unchecked = b.to;
      }
      // Two buffers taken in turn: no array per step and entry.
      const next = cur === this.stepA ? this.stepB : this.stepA;
      next.length = 0;
      if (!sw.preferred.runBlock(k, cur, next)) break;
      if (!sameIds(cur, next)) changed.push(this.steps[b.from]!);
      cur = next;
    }
    if (single) single = k === blocks.length && check!.identity(unchecked, Number.MAX_SAFE_INTEGER, cur);
    return { changed, single };
  }

  private tracer: VariantTracer | undefined;
}

const NO_BLAME = { changed: [] as string[], single: false };

function sameIds(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** Compiles (or reads from the cache) everything the machine engine needs for one grammar. */
export function machineEngine(
  grammar: Grammar,
  inventory: Inventory,
  opts: MachineEngineOptions = {},
  extraSegments: readonly Bundle[] = [],
): { engine?: MachineEngine; diagnostics: Diagnostic[] } {
  const common = { ...(opts.cacheDir !== undefined ? { cacheDir: opts.cacheDir } : {}), ...(extraSegments.length > 0 ? { extraSegments } : {}) };
  const main = compileGrammar(grammar, inventory, { ...common, ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}) });
  const diagnostics = [...main.diagnostics];
  if (main.compiled === null) return { diagnostics };
  let stepwise: Compiled | null = null;
  if (opts.blame ?? true) {
    const sw = compileGrammar(grammar, inventory, { ...common, maxStates: 1 });
    if (sw.compiled === null) return { diagnostics: [...diagnostics, ...sw.diagnostics] };
    stepwise = sw.compiled;
  }
  const broad = compileGrammar(prosodyOnly(grammar), inventory, common);
  if (broad.compiled === null) return { diagnostics: [...diagnostics, ...broad.diagnostics] };
  const engine = new MachineEngine(main.compiled, stepwise, broad.compiled, inventory, grammar.steps.map((s) => s.name), opts.maxVariants ?? 16, { syllables: opts.syllables ?? true, derivations: opts.derivations ?? true, ties: opts.ties ?? false });
  engine.extras = extraSegments;
  engine.extend = (extra) => machineEngine(grammar, inventory, opts, extra).engine;
  return { engine, diagnostics };
}
