// The work of a run on each batch of rows, for every variety of the run: transcribe each row, check
// its stress, count it, format its TSV and JSON Lines lines and gather its PLS phonemes, into a
// `SideState` per variety. The same code runs on the main thread (rows as the reader streams them)
// and in each worker thread (a chunk of the file, worker.ts), so the outputs cannot differ between
// the two: the main thread only puts the chunks' results together in file order (variety-out.ts).

import { ByteChunks, utf8Bytes } from "../emit/bytes.js";
import { putJsonRecord } from "../emit/jsonl-bytes.js";
import { formatTsvEntry } from "../emit/tsv.js";
import type { Engine, EntryResult, Needs } from "./engine.js";
import { MachineEngine } from "./engine-machine.js";
import type { LexiconItem, LexiconRow, RejectedRow } from "./read.js";
import type { Overrides } from "./overrides.js";
import { entryJsonRecord, transcribeRow, type OutputFormat } from "./runner.js";
import { StressHygiene } from "./hygiene.js";
import type { StressContext } from "./lint-stress.js";
import { plsPhonemesCompact, type PlsPhonemes } from "./ipa-options.js";
import { followerPlan, type WalkSnapshot, type WalkShare } from "./walk-share.js";

/** One variety as the batch work sees it. */
export interface Side {
  readonly engine: Engine;
  readonly formats: ReadonlySet<OutputFormat>;
  /** What the engine must give beyond the narrow and broad forms (default: everything). */
  readonly needs?: Needs;
  readonly pls?: PlsPhonemes;
  /** The variety's overrides (main thread only): rows of their words are left out. */
  readonly ov?: Overrides;
}

/**
 * A PLS lexeme as gathered: the word's phonemes in order of first appearance (one string while
 * there is one, as most words have: a run keeps a lexeme per word, and fewer objects per lexeme
 * make less for the garbage collector to copy), and the file and line of its first row.
 */
export interface Lexeme {
  phonemes: string | string[];
  readonly file: string;
  readonly line: number;
}

/** A lexeme's phonemes as a list. */
export const phonemesOf = (lx: Lexeme): string[] => (typeof lx.phonemes === "string" ? [lx.phonemes] : lx.phonemes);

/** The counts a summary gives. */
export interface SideCounts {
  entries: number;
  withVariants: number;
  variantsTotal: number;
  entriesCapped: number;
  entriesAmbiguous: number;
}

export const noCounts = (): SideCounts => ({ entries: 0, withVariants: 0, variantsTotal: 0, entriesCapped: 0, entriesAmbiguous: 0 });

/** What the batches of one variety have produced so far (the whole run, or one chunk of it). */
export class SideState {
  readonly rejects: RejectedRow[] = [];
  readonly lexemes = new Map<string, Lexeme>();
  readonly counts = noCounts();
  /** Entries each step changed (steps that changed none may be missing). */
  readonly changed = new Map<string, number>();
  readonly hygiene: StressHygiene;

  constructor(
    stress: StressContext,
    /** File names as written in JSON Lines and stress.csv. */
    readonly relFile: (file: string) => string,
    readonly tsv: ByteChunks | undefined,
    readonly jsonl: ByteChunks | undefined,
  ) {
    this.hygiene = new StressHygiene(stress, relFile);
  }
}

/**
 * The lines written for one row by the variety before, kept for the next: when the next variety's
 * entry is the same in every field the lines are the same, and are not formatted again.
 */
interface SharedLines {
  readonly entry: EntryResult;
  readonly tsv: string;
  /** The JSON Lines record and its line feed, as UTF-8. */
  readonly jsonl: Uint8Array;
}

/** The row's lines of the variety before, while the row goes through the varieties in turn. */
interface SharedSlot {
  lines: SharedLines | undefined;
}

/** Two entries of one row (same source row, hence same key, word, line and input) with the same transcription. */
function sameTranscription(a: EntryResult, b: EntryResult): boolean {
  return a.narrow === b.narrow && a.broad === b.broad && a.capped === b.capped && a.ambiguous === b.ambiguous &&
    sameStrings(a.variants, b.variants) && sameStrings(a.rules, b.rules) &&
    a.derivation.length === b.derivation.length && a.derivation.every((d, i) => d.step === b.derivation[i]!.step && d.form === b.derivation[i]!.form) &&
    a.variantSteps.length === b.variantSteps.length && a.variantSteps.every((s, i) => sameStrings(s, b.variantSteps[i]!));
}

function sameStrings(a: readonly string[], b: readonly string[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** The batch work of one run's varieties (the first leads: the others take over its walk through the steps they share, walk-share.ts). */
export class BatchWork {
  private readonly plans: (ReturnType<typeof followerPlan> | undefined)[];
  private readonly snapAt: number[];
  private readonly leader: Engine | undefined;

  constructor(readonly sides: readonly Side[]) {
    const leader = sides[0]?.engine;
    this.leader = leader;
    this.plans = sides.map((s, i) => (i > 0 && leader instanceof MachineEngine && s.engine instanceof MachineEngine ? followerPlan(leader, s.engine) : undefined));
    this.snapAt = [...new Set(this.plans.flatMap((p) => (p !== undefined ? [p.step] : [])))].sort((a, b) => a - b);
  }

  /**
   * Transcribes and writes one batch of items (`keys[i]`: the entry key of item i when it is a row) into each side's state.
   *
   * Row by row, every variety in turn: what one row's varieties share (the lines of the variety
   * before, the leader's snapshots) is dropped before the next row. Held for a whole batch, the
   * row's entries were all alive whenever two collections of V8's young generation came close
   * together (as at start-up); V8 then judged the sites that make them long-lived and allocated every
   * later entry in the old generation (its allocation-site pretenuring), which made a four-variety
   * build of the CMU dictionary now and then 40% slower and 200 MB larger (README, "What the speed figures leave out").
   */
  take(batch: readonly LexiconItem[], keys: readonly string[], states: readonly SideState[]): void {
    const { sides, snapAt, plans, leader } = this;
    const shared: SharedSlot | undefined = sides.length > 1 ? { lines: undefined } : undefined;
    for (let i = 0; i < batch.length; i++) {
      const item = batch[i]!;
      if (shared !== undefined) shared.lines = undefined;
      const snaps: WalkSnapshot[] | undefined = snapAt.length > 0 ? [] : undefined;
      for (let v = 0; v < sides.length; v++) {
        const side = sides[v]!;
        const state = states[v]!;
        if (item.kind !== "row") {
          emit(side, state, item);
          continue;
        }
        if (side.ov?.replaced(item, keys[i]!) === true) continue;
        const plan = plans[v];
        const share: WalkShare | undefined =
          snaps === undefined ? undefined
          : v === 0 ? { snapAt, give: (s) => void snaps.push(s) }
          : plan !== undefined ? { leader: leader!, translate: plan.translate, ...resumeAt(snaps, plan.step) } : undefined;
        emit(side, state, transcribeRow(side.engine, item, keys[i]!, side.needs, share), shared, item);
      }
    }
  }
}

/** The leader's snapshot before `step`, when it recorded one. */
function resumeAt(snaps: readonly WalkSnapshot[], step: number): { resume?: WalkSnapshot } {
  const s = snaps.find((x) => x.step === step);
  return s !== undefined ? { resume: s } : {};
}

/** Writes one entry or reject; `shared`, when given, holds (and receives) the row's lines of the variety before. */
export function emit(side: Side, state: SideState, r: EntryResult | RejectedRow, shared?: SharedSlot, row?: LexiconRow): void {
  if (r.kind === "entry" && row !== undefined) state.hygiene.observe(row, r.key);
  if (r.kind === "reject") {
    state.rejects.push(r);
    return;
  }
  const c = state.counts;
  c.entries++;
  if (r.variants.length > 1) c.withVariants++;
  if (r.capped === true) c.entriesCapped++;
  if (r.ambiguous === true) c.entriesAmbiguous++;
  c.variantsTotal += r.variants.length;
  for (const step of r.rules) state.changed.set(step, (state.changed.get(step) ?? 0) + 1);
  if (state.tsv !== undefined || state.jsonl !== undefined) {
    const before = shared?.lines;
    if (before !== undefined && sameTranscription(before.entry, r)) {
      state.tsv?.push(before.tsv);
      state.jsonl?.pushBytes(before.jsonl);
    } else {
      const tsv = state.tsv !== undefined ? formatTsvEntry({ key: r.key, word: r.word, narrow: r.narrow, broad: r.broad }) : "";
      state.tsv?.push(tsv);
      const j = state.jsonl;
      if (j !== undefined) {
        const file = state.relFile(r.file);
        const start = putJsonRecord(j, r, file, r.line);
        // Lines of a variety that did not write a format are no use to the next one.
        if (shared !== undefined && state.tsv !== undefined) {
          const jsonl = start >= 0 ? j.target.slice(start, j.position) : utf8Bytes(entryJsonRecord(r, file) + "\n");
          shared.lines = { entry: r, tsv, jsonl };
        }
      }
    }
  }
  if (side.formats.has("pls")) addPhonemes(state.lexemes, r.word, plsPhonemesCompact(r, side.pls), r.file, r.line);
}

/** Adds a row's phonemes (one, or a list) to its word's lexeme (a new lexeme at the word's first row, `file` and `line`). */
export function addPhonemes(lexemes: Map<string, Lexeme>, word: string, mine: string | string[], file: string, line: number): void {
  const lx = lexemes.get(word);
  if (lx === undefined) {
    lexemes.set(word, { phonemes: typeof mine === "string" || mine.length !== 1 ? mine : mine[0]!, file, line });
    return;
  }
  if (typeof mine === "string") addOne(lx, mine);
  else for (const p of mine) addOne(lx, p);
}

function addOne(lx: Lexeme, p: string): void {
  const have = lx.phonemes;
  if (typeof have === "string") {
    if (have !== p) lx.phonemes = [have, p];
  } else if (!have.includes(p)) have.push(p);
}
