// The production Engine: the composed, frozen cascade of a compiled grammar gives the narrow form;
// a one-block-per-step compilation of the same grammar says which steps changed the entry (blame);
// the grammar's syllabify and stress steps alone give the broad syllabified column.

import type { Diagnostic } from "../diagnostics.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { WORD_EDGE, type Word } from "../interp/index.js";
import { compileGrammar, segmentsOutside, type Compiled } from "../compile/index.js";
import type { Bundle } from "../inventory/types.js";
import type { Engine, Transcription } from "./engine.js";
import { prosodyOnly } from "./engine-interp.js";
import { renderIpa, symbolView, type SymbolView } from "./render.js";

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
}

export class MachineEngine implements Engine {
  readonly steps: readonly string[];
  private readonly view: SymbolView;
  private readonly broadView: SymbolView;
  private readonly out: number[] = [];
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
    private readonly broad: Compiled,
    private readonly inventory: Inventory,
    stepNames: readonly string[],
    private readonly maxVariants: number,
    private readonly render: { readonly syllables: boolean } = { syllables: true },
  ) {
    this.steps = stepNames;
    this.view = symbolView(compiled.alphabet, inventory);
    this.broadView = symbolView(broad.alphabet, inventory);
  }

  /** Runs the preferred cascade on '#'-bracketed symbol ids; undefined when the machine rejects them. */
  runIds(ids: ArrayLike<number>): number[] | undefined {
    const out: number[] = [];
    return this.compiled.preferred.run(ids, out) ? out : undefined;
  }

  /** Symbol ids of a reader word (with its '#' edges) for the full and the prosody-only machines. */
  encode(symbols: Word): { ids: number[]; bids: number[] } | undefined {
    const word = [WORD_EDGE, ...symbols, WORD_EDGE];
    const ids = this.compiled.encode(word);
    const bids = this.broad.encode(word);
    return ids === null || bids === null ? undefined : { ids, bids };
  }

  transcribeWord(symbols: Word): Transcription | undefined {
    const e = this.encode(symbols);
    if (e !== undefined) return this.transcribeIds(e.ids, e.bids);
    return this.widened(symbols)?.transcribeWord(symbols);
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
  transcribeIds(ids: number[], bids: number[]): Transcription | undefined {
    const out = this.out;
    out.length = 0;
    if (!this.compiled.preferred.run(ids, out)) return undefined;
    const narrow = renderIpa(out, this.view, this.render);
    const bout: number[] = [];
    if (!this.broad.preferred.run(bids, bout)) return undefined;
    const broadText = renderIpa(bout, this.broadView, this.render);
    let variants: string[] = [narrow];
    if (this.compiled.hasVariants) {
      const all = this.compiled.variants(ids, this.maxVariants).outputs.map((o) => renderIpa(o, this.view, this.render));
      variants = [narrow, ...[...new Set(all)].filter((v) => v !== narrow)];
    }
    return { narrow, broad: broadText, variants, rules: this.blame(ids) };
  }

  /** Steps whose own machine changed the (preferred) word, in order (one block per step). */
  private blame(ids: number[]): string[] {
    const sw = this.stepwise;
    if (sw === null) return [];
    const changed: string[] = [];
    let cur: number[] = ids;
    const blocks = sw.preferredBlocks;
    for (let k = 0; k < blocks.length; k++) {
      const next: number[] = [];
      if (!sw.preferred.runBlock(k, cur, next)) break;
      if (!sameIds(cur, next)) changed.push(this.steps[blocks[k]!.from]!);
      cur = next;
    }
    return changed;
  }
}

function sameIds(a: readonly number[], b: readonly number[]): boolean {
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
  const engine = new MachineEngine(main.compiled, stepwise, broad.compiled, inventory, grammar.steps.map((s) => s.name), opts.maxVariants ?? 16, { syllables: opts.syllables ?? true });
  engine.extras = extraSegments;
  engine.extend = (extra) => machineEngine(grammar, inventory, opts, extra).engine;
  return { engine, diagnostics };
}
