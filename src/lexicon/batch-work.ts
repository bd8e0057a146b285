// The work of a run on each batch of rows, for every variety of the run: transcribe each row, check
// its stress, count it, format its TSV and JSON Lines lines and gather its PLS phonemes, into a
// `SideState` per variety. The same code runs on the main thread (rows as the reader streams them)
// and in each worker thread (a chunk of the file, worker.ts), so the outputs cannot differ between
// the two: the main thread only puts the chunks' results together in file order (variety-out.ts).

import { ByteChunks, utf8Bytes } from "../emit/bytes.js";
import { putJsonRecord } from "../emit/jsonl-bytes.js";
import { formatTsvEntry } from "../emit/tsv.js";
import { putTsvLine } from "../emit/tsv-batch.js";
import type { Engine, EntryResult, Needs } from "./engine.js";
import { MachineEngine } from "./engine-machine.js";
import type { LexiconItem, LexiconRow, RejectedRow } from "./read.js";
import type { Overrides } from "./overrides.js";
import { entryJsonRecord, transcribeRow, type OutputFormat } from "./runner.js";
import { StressHygiene } from "./hygiene.js";
import type { StressContext } from "./lint-stress.js";
import { plsPhonemesCompact, type PlsPhonemes } from "./ipa-options.js";
import { followerPlan, type WalkSnapshot, type WalkShare } from "./walk-share.js";
import { LexemeBook } from "./lexemes.js";
import { WordTable } from "./word-table.js";

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
  readonly lexemes: LexemeBook;
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
    /** The numbers of words, shared by the states of one run's varieties (the batch work looks a row's word up once). */
    words: WordTable = new WordTable(),
  ) {
    this.hygiene = new StressHygiene(stress, relFile);
    this.lexemes = new LexemeBook(words);
  }
}

/**
 * The lines written for one row by the variety before, kept for the next: when the next variety's
 * entry is the same in every field the lines are the same, and are not formatted again.
 */
interface SharedLines {
  readonly entry: EntryResult;
  /** The TSV line and the JSON Lines record, each with its line feed, as UTF-8. */
  readonly tsv: Uint8Array;
  readonly jsonl: Uint8Array;
}

/**
 * The row's lines of the variety before, while the row goes through the varieties in turn. A
 * record's bytes are copied into `scratch` (one buffer for the whole batch, grown as needed): a
 * copy of its own per record (`slice`) is a new ArrayBuffer outside the heap, and those cost about
 * 0.2 s of a four-variety CMU build's 8 s (CPU profile) in allocation and collection.
 */
interface SharedSlot {
  lines: SharedLines | undefined;
  /** For the JSON Lines record ([0]) and the TSV line ([1]). */
  readonly scratch: Uint8Array[];
}

/** `bytes[from … to)` copied into the slot's scratch buffer `k`; a view of the copy. */
function keepBytes(slot: SharedSlot, k: number, bytes: Uint8Array, from: number, to: number): Uint8Array {
  const n = to - from;
  let room = slot.scratch[k]!;
  if (n > room.length) room = slot.scratch[k] = new Uint8Array(Math.max(n, 2 * room.length));
  room.set(bytes.subarray(from, to));
  return room.subarray(0, n);
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
    // The row's word is numbered once for every variety that writes PLS (their books share the numbers).
    const words = sides.some((s) => s.formats.has("pls")) ? states[0]?.lexemes.words : undefined;
    if (words !== undefined && states.some((st) => st.lexemes.words !== words)) throw new Error("the varieties' states do not share their word numbers");
    const shared: SharedSlot | undefined = sides.length > 1 ? { lines: undefined, scratch: [new Uint8Array(4096), new Uint8Array(1024)] } : undefined;
    for (let i = 0; i < batch.length; i++) {
      const item = batch[i]!;
      if (shared !== undefined) shared.lines = undefined;
      const wordId = words !== undefined && item.kind === "row" ? words.numberOf(item.word) : undefined;
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
        emit(side, state, transcribeRow(side.engine, item, keys[i]!, side.needs, share), shared, item, wordId);
      }
    }
  }
}

/** The leader's snapshot before `step`, when it recorded one. */
function resumeAt(snaps: readonly WalkSnapshot[], step: number): { resume?: WalkSnapshot } {
  const s = snaps.find((x) => x.step === step);
  return s !== undefined ? { resume: s } : {};
}

/**
 * Writes one entry or reject; `shared`, when given, holds (and receives) the row's lines of the
 * variety before; `wordId`, when given, is the number of the row's word in `state.lexemes.words`.
 */
export function emit(side: Side, state: SideState, r: EntryResult | RejectedRow, shared?: SharedSlot, row?: LexiconRow, wordId?: number): void {
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
      state.tsv?.pushBytes(before.tsv);
      state.jsonl?.pushBytes(before.jsonl);
    } else {
      const t = state.tsv;
      const tsvLine = { key: r.key, word: r.word, narrow: r.narrow, broad: r.broad };
      const tsvAt = t !== undefined ? putTsvLine(t, tsvLine) : -1;
      const j = state.jsonl;
      if (j !== undefined) {
        const file = state.relFile(r.file);
        const start = putJsonRecord(j, r, file, r.line);
        // Lines of a variety that did not write a format are no use to the next one.
        if (shared !== undefined && t !== undefined) {
          // The next variety copies these bytes before it writes its own lines into the slot.
          const tsv = tsvAt >= 0 ? keepBytes(shared, 1, t.target, tsvAt, t.position) : utf8Bytes(formatTsvEntry(tsvLine));
          const jsonl = start >= 0 ? keepBytes(shared, 0, j.target, start, j.position) : utf8Bytes(entryJsonRecord(r, file) + "\n");
          shared.lines = { entry: r, tsv, jsonl };
        }
      }
    }
  }
  if (side.formats.has("pls")) state.lexemes.add(r.word, plsPhonemesCompact(r, side.pls), r.file, r.line, wordId);
}
