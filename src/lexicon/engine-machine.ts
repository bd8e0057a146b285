// The production Engine: the composed, frozen cascade of a compiled grammar gives the narrow form;
// a one-block-per-step compilation of the same grammar says which steps changed the entry (blame);
// the grammar's syllabify and stress steps alone give the broad syllabified column.
// Work is done only for what the caller's outputs print (`Needs`): TSV needs neither variants nor blame.

import type { Diagnostic } from "../diagnostics.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { WORD_EDGE, type Word } from "../interp/index.js";
import { compileGrammar, segmentsOutside, type Compiled } from "../compile/index.js";
import { freeze } from "../fst/index.js";
import type { Bundle } from "../inventory/types.js";
import { ALL_NEEDS, type Engine, type Needs, type Transcription } from "./engine.js";
import { prosodyOnly } from "./engine-interp.js";
import { renderIpa, renderIpaUtf8, symbolView, utf8Bound, type RenderOptions, type SymbolView } from "./render.js";
import { tiedView } from "./ties.js";
import { VariantTracer, type DerivationStep, type TraceStart, type TracedOutputs } from "./derivation.js";
import { SymbolEncoder } from "./encode.js";
import { IdentityScreen, VariantScreen } from "./variants.js";
import { stepKeys, translateIds, type WalkShare } from "./walk-share.js";
import { runsBlock, touchedSymbols, TouchMasks } from "../fst/untouched.js";

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
  private readonly broadRender: RenderOptions;
  private readonly view: SymbolView;
  private readonly broadView: SymbolView;
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
    this.broadRender = { ...render, joins: true };
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

  /** One identity per step, for sharing the walk with another variety (walk-share.ts); empty: not shared. */
  stepKeys: readonly string[] = [];

  /** The per-step blocks' step ranges (none without blame machines). */
  get walkBlocks(): readonly { readonly from: number; readonly to: number }[] {
    return this.stepwise?.preferredBlocks ?? [];
  }

  /** Alphabet key of each symbol id ("" for ε, '#' and '.'). */
  get symbolKeys(): readonly string[] {
    const keys = new Array<string>(this.compiled.alphabet.size).fill("");
    for (const s of this.compiled.alphabet.segments) keys[s.id] = s.key;
    return keys;
  }

  /** `share`: the walk shared with another variety of the same run (walk-share.ts). */
  transcribeWord(symbols: Word, needs: Needs = ALL_NEEDS, share?: WalkShare): Transcription | undefined {
    const e = this.encode(symbols);
    if (e !== undefined) return this.transcribeIds(e.ids, e.bids, needs, share);
    return this.widened(symbols)?.transcribeWord(symbols, needs);
  }

  /**
   * The preferred narrow and broad forms alone (what TSV prints): `transcribeWord` with NARROW_ONLY
   * without the rest of a transcription (no variants, no steps, no flags).
   */
  transcribeNarrow(symbols: Word): { readonly narrow: string; readonly broad: string } | undefined {
    const e = this.encode(symbols);
    if (e === undefined) return this.widened(symbols)?.transcribeNarrow(symbols);
    const o = this.runComposed(e.ids, e.bids);
    return o === undefined ? undefined : { narrow: renderIpa(o[0], this.view, this.render), broad: renderIpa(o[1], this.broadView, this.broadRender) };
  }

  /**
   * The composed machines' outputs for `symbols` (narrow, then broad ids), or undefined when the
   * word needs the widened engine or a machine rejects it (`transcribeNarrow` then gives its answer).
   */
  narrowOutputs(symbols: Word): readonly [number[], number[]] | undefined {
    const e = this.encode(symbols);
    return e === undefined ? undefined : this.runComposed(e.ids, e.bids);
  }

  /** The composed preferred machines' outputs for encoded ids (narrow, then broad), or undefined when either rejects. */
  private runComposed(ids: ArrayLike<number>, bids: ArrayLike<number>): [number[], number[]] | undefined {
    const out: number[] = [];
    if (!this.compiled.preferred.run(ids, out)) return undefined;
    const bout: number[] = [];
    if (!this.broad.preferred.run(bids, bout)) return undefined;
    return [out, bout];
  }

  /** The most bytes `putForms` writes for `outputs`. */
  formsBound(outputs: readonly [number[], number[]]): number {
    return utf8Bound(outputs[0], this.view) + utf8Bound(outputs[1], this.broadView) + 1;
  }

  /**
   * The narrow form, a tab and the broad form of `narrowOutputs`, as TSV writes them, in UTF-8 at
   * `buf[at …]`: the position after, or -1 when either form is one `renderIpaUtf8` leaves to the
   * rendered text (render.ts).
   */
  putForms(outputs: readonly [number[], number[]], buf: Uint8Array, at: number): number {
    const mid = renderIpaUtf8(outputs[0], this.view, this.render, buf, at);
    if (mid < 0) return -1;
    buf[mid] = 9;
    return renderIpaUtf8(outputs[1], this.broadView, this.broadRender, buf, mid + 1);
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
  transcribeIds(ids: ArrayLike<number>, bids: ArrayLike<number>, needs: Needs = ALL_NEEDS, share?: WalkShare): Transcription | undefined {
    // Fresh arrays for the machines' outputs: emptying a kept array (`length = 0`) gives up its
    // storage, and cost more than a new one (measured: about 100 ns against 45 ns per 12 symbols).
    const out: number[] = [];
    const ambiguousBefore = this.compiled.preferred.ambiguities;
    if (!this.compiled.preferred.run(ids, out)) return undefined;
    const ambiguous = this.compiled.preferred.ambiguities !== ambiguousBefore;
    const narrow = renderIpa(out, this.view, this.render);
    const bout: number[] = [];
    if (!this.broad.preferred.run(bids, bout)) return undefined;
    // The broad form keeps the entry's joins (rendered with `joins`, options made once).
    const broadText = renderIpa(bout, this.broadView, this.broadRender);
    // One walk through the steps gives the blame, the derivation's forms (JSON Lines) and tells the
    // screen whether variants can exist.
    const wantRules = needs.rules === true && this.stepwise !== null;
    const wantVariants = needs.variants === true && this.compiled.hasVariants;
    const wantDerivation = wantRules && (this.render.derivations ?? true);
    const walk = wantRules || (wantVariants && this.screen !== null) ? this.blame(ids, wantVariants, wantDerivation, share, out, narrow) : NO_BLAME;
    const ruleList = wantRules ? walk.changed : [];
    if (!wantVariants || walk.single) {
      return flagged({ narrow, broad: broadText, variants: [narrow], rules: ruleList, derivation: walk.derivation, variantSteps: [ruleList] }, false, ambiguous);
    }
    // Several variants can exist. With the derivation wanted, the traced run through the steps gives
    // every output with its steps; the composed variants cascade runs only when the trace was cut
    // at its cap (then the two need not keep the same outputs) or is not wanted.
    let traced: TracedOutputs | undefined;
    if (wantDerivation) {
      this.tracer ??= new VariantTracer(this.stepwise!, this.steps, this.screen);
      this.tracer.shortcuts = this.skipUnchanged;
      traced = this.tracer.trace(ids, this.maxVariants, walk.traceFrom);
    }
    let capped = false;
    let outputs: readonly (readonly number[])[];
    if (traced !== undefined && !traced.capped) outputs = traced.paths.map((p) => p.ids);
    else {
      const v = this.compiled.variants(ids, this.maxVariants);
      capped = v.capped;
      outputs = v.outputs;
    }
    const texts = outputs.map((o) => renderIpa(o, this.view, this.render));
    const variants = [narrow, ...[...new Set(texts)].filter((x) => x !== narrow)];
    if (!wantDerivation) return flagged({ narrow, broad: broadText, variants, rules: ruleList, derivation: [], variantSteps: variants.map((_, i) => (i === 0 ? ruleList : [])) }, capped, ambiguous);
    let variantSteps: (readonly string[])[] = [ruleList];
    if (variants.length > 1) {
      // Each variant's steps: of the traced outputs (in key order) the first that renders as it.
      const byText = new Map<string, readonly string[]>();
      const sameTrace = traced !== undefined && !traced.capped;
      const paths = traced!.paths;
      for (let k = 0; k < paths.length; k++) {
        const text = sameTrace ? texts[k]! : renderIpa(paths[k]!.ids, this.view, this.render);
        if (!byText.has(text)) byText.set(text, paths[k]!.steps);
      }
      // A variant the traced run dropped at its cap (more than maxVariants on the way) gets no steps.
      variantSteps = variants.map((v, i) => (i === 0 ? ruleList : byText.get(v) ?? []));
    }
    return flagged({ narrow, broad: broadText, variants, rules: ruleList, derivation: walk.derivation, variantSteps }, capped, ambiguous);
  }

  /**
   * Steps whose own machine changed the (preferred) word, in order (one block per step), with the
   * narrow form after each when `forms`, and — when `screen` — whether the screen proved that the
   * entry has exactly one variant. `finalIds` and `finalText`: the composed machine's output and its
   * IPA, given for the last form, which is usually the same word (rendered once, not twice).
   */
  private blame(ids: ArrayLike<number>, screen: boolean, forms: boolean, share?: WalkShare, finalIds?: ArrayLike<number>, finalText?: string): Walk {
    const sw = this.stepwise!;
    let changed: string[] = [];
    // The steps (indices) that changed the word, and where the screen first failed (for the trace).
    const changedAt: number[] = [];
    let traceFrom: TraceStart | undefined;
    // Not after taking over a leader's walk (its steps' indices are not here), nor in the checks without shortcuts.
    let tracing = this.skipUnchanged;
    let derivation: DerivationStep[] = [];
    let cur: ArrayLike<number> = ids;
    const blocks = sw.preferredBlocks;
    const masks = this.skipUnchanged ? (this.touchMasks ??= new TouchMasks(skipTables(sw))) : null;
    const mask = masks !== null ? (this.mask ??= new Int32Array(masks.width)) : null;
    const same = masks !== null ? (this.sameScreens ??= sameScreens(sw)) : null;
    const check = screen ? this.screen : null;
    let single = check !== null;
    // Steps before `unchecked` have been screened; a step with no preferred block (prefer
    // unapplied) leaves the preferred string as it is, so it is screened on the current string.
    let unchecked = 0;
    let k = 0;
    // A follower goes on from the leader's string after the steps they share (walk-share.ts).
    const r = share?.resume;
    if (r !== undefined && r.engine === share!.leader && (r.screened || check === null)) {
      let kb = 0;
      while (kb < blocks.length && blocks[kb]!.from < r.step) kb++;
      const resumed = translateIds(r.ids, share!.translate!);
      if (resumed !== null && (kb === 0 || blocks[kb - 1]!.to <= r.step)) {
        k = kb;
        cur = resumed;
        changed = [...r.changed];
        tracing = false;
        derivation = [...r.derivation];
        if (check !== null) {
          single = r.single;
          unchecked = r.unchecked;
        }
      }
    }
    if (masks !== null) masks.fill(cur, mask!);
    const snaps = share?.snapAt;
    let given = 0;
    // The last step that changed the word and the word after it, its form not yet rendered: the
    // form is rendered when another step changes the word or a snapshot is given, else at the end.
    let pendingStep = "";
    let pendingIds: number[] | null = null;
    const snapshot = (step: number): void => share!.give!({ engine: this, step, ids: Array.from(cur), changed: [...changed], derivation: [...derivation], screened: check !== null, single, unchecked });
    for (; k < blocks.length; k++) {
      const b = blocks[k]!;
      // A leader records where it stands before each step a follower takes over at.
      while (snaps !== undefined && given < snaps.length && snaps[given]! <= b.from) {
        if (k === 0 || blocks[k - 1]!.to <= snaps[given]!) {
          if (pendingIds !== null) {
            derivation.push({ step: pendingStep, form: renderIpa(pendingIds, this.view, this.render) });
            pendingIds = null;
          }
          snapshot(snaps[given]!);
        }
        given++;
      }
      if (single) {
        single = check!.identity(unchecked, b.from + 1, cur) && !check!.branchingIn(b.from + 1, b.to);
        if (!single && forms && tracing) traceFrom = { step: unchecked, ids: Array.from(cur), steps: [...changedAt] };
        unchecked = b.to;
      }
      // A step that cannot change any symbol of the word leaves it as it is (see skipTables); nor
      // does one whose machine copies this word on every path (see sameScreens). Of the 1.03 M
      // step runs left by the first test on the CMU dictionary under en-us, 0.72 M changed nothing.
      if (mask !== null && !runsBlock(mask, k)) continue;
      const sc = same !== null ? same[k] : null;
      if (sc !== null && sc !== undefined && sc.identityOnly(cur)) continue;
      const next: number[] = [];
      if (!sw.preferred.runBlock(k, cur, next)) break;
      if (!sameIds(cur, next)) {
        const step = this.steps[b.from]!;
        changed.push(step);
        changedAt.push(b.from);
        if (forms) {
          if (pendingIds !== null) derivation.push({ step: pendingStep, form: renderIpa(pendingIds, this.view, this.render) });
          pendingStep = step;
          pendingIds = next;
        }
        if (masks !== null) masks.fill(next, mask!);
      }
      cur = next;
    }
    if (pendingIds !== null) {
      const isFinal = finalIds !== undefined && finalText !== undefined && sameIds(pendingIds, finalIds);
      derivation.push({ step: pendingStep, form: isFinal ? finalText : renderIpa(pendingIds, this.view, this.render) });
    }
    if (k === blocks.length) {
      for (; snaps !== undefined && given < snaps.length; given++) if (blocks.length === 0 || blocks[blocks.length - 1]!.to <= snaps[given]!) snapshot(snaps[given]!);
    }
    if (single) {
      single = k === blocks.length && check!.identity(unchecked, Number.MAX_SAFE_INTEGER, cur);
      if (!single && k === blocks.length && forms && tracing) traceFrom = { step: unchecked, ids: Array.from(cur), steps: changedAt };
    }
    return traceFrom !== undefined ? { changed, derivation, single, traceFrom } : { changed, derivation, single };
  }

  private tracer: VariantTracer | undefined;
  /**
   * Blame skips a step's run on a word the step cannot change (skipTables), and the variant trace
   * the merging of paths a step left as they were; false: neither (for checks).
   */
  skipUnchanged = true;
  /** The blocks' skipTables as bits per symbol (one pass over the word tells every block). */
  private touchMasks: TouchMasks | undefined;
  private sameScreens: readonly (IdentityScreen | null)[] | undefined;
  /** The blocks the current word of blame's walk must be run through (TouchMasks.fill). */
  private mask: Int32Array | undefined;
}

/**
 * Per block of the per-step cascade, the symbols its step may change (fst/untouched.ts), or null
 * where every word must be run. A word with none of them is left as it is: every path of the
 * step's machine copies it. It is also accepted: blame runs only after the composed preferred
 * machine accepted the word, that machine is the composition of the same steps, and where each
 * step is a function (a "functional" or "sequential" runner) the word's one way through them is
 * the one blame follows, so no step on it rejects. A "search" block (several outputs) is always run.
 */
function skipTables(sw: Compiled): (Uint8Array | null)[] {
  return sw.preferredBlocks.map((b, k) => (runsAsFunction(sw, k) ? touchedSymbols(b.machine) : null));
}

/** Whether block `k` of the per-step cascade runs as a function ("functional" or "sequential" runner): only such blocks' runs are skipped. */
function runsAsFunction(sw: Compiled, k: number): boolean {
  const kind = sw.preferred.kinds[k];
  return kind === "functional" || kind === "sequential";
}

/**
 * Per block of the per-step cascade, a screen that proves a word is copied by every accepting path
 * of the block's machine (variants.ts), or null where the block must always be run. Where the step
 * is a function, its one output on such a word is the word itself. One pass over the word with a
 * table look-up per symbol, no output written: cheaper than the run it saves (blame: 0.26 s to
 * 0.20 s of a CMU pass, in process, best of 7, with the flat transition table).
 */
function sameScreens(sw: Compiled): (IdentityScreen | null)[] {
  return sw.preferredBlocks.map((b, k) => (runsAsFunction(sw, k) ? new IdentityScreen(freeze(b.machine), sw.alphabet.size) : null));
}

/**
 * A transcription with its flags when set (`ambiguous` first, as before).
 * Set on the object made (most entries have neither): spreading a flags object into every
 * transcription cost about 30 ms of a CMU build.
 */
function flagged(t: { -readonly [K in keyof Transcription]: Transcription[K] }, capped: boolean, ambiguous: boolean): Transcription {
  if (ambiguous) t.ambiguous = true;
  if (capped) t.capped = true;
  return t;
}

/** What blame's walk gives (`traceFrom`: where the variant trace may start, when the screen failed on the way). */
interface Walk {
  readonly changed: string[];
  readonly derivation: DerivationStep[];
  readonly single: boolean;
  readonly traceFrom?: TraceStart;
}

const NO_BLAME: Walk = { changed: [], derivation: [], single: false };

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
  if (stepwise !== null) engine.stepKeys = stepKeys(grammar);
  engine.extend = (extra) => machineEngine(grammar, inventory, opts, extra).engine;
  return { engine, diagnostics };
}
