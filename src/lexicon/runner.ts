// The batch runner: a lexicon through one variety's compiled grammar (or several varieties, reading
// the lexicon once), rows in file order, into TSV, JSON Lines and PLS written whole, a rejects file,
// and a summary that reconciles every row (each variety's side: variety-out.ts).

import { dirname } from "node:path";
import type { Diagnostic } from "../diagnostics.js";
import { capPerFile } from "../diagnostic-cap.js";
import { jsonRecord } from "../emit/jsonl.js";
import type { Inventory } from "../inventory/types.js";
import { NARROW_ONLY, type Engine, type EntryResult, type Needs, type Transcription } from "./engine.js";
import { readLexicon, type LexiconRow, type RejectedRow } from "./read.js";
import { EntryKeys } from "./keys.js";
import { countInputRecords, type InputRecords } from "./reconcile.js";
import { unwritableEntry, unwritableForms } from "./writable.js";
import { VarietyOutput, type VarietyRun } from "./variety-out.js";
import { MachineEngine } from "./engine-machine.js";
import type { WalkShare } from "./walk-share.js";
import { BatchWork } from "./batch-work.js";
import { WordTable } from "./word-table.js";
import { Checker } from "./check-written.js";
import { ChunkPool } from "./chunks.js";
import { ChunkLane } from "./chunk-lane.js";
import type { WorkerSide } from "./worker.js";
import type { StressSummary } from "./hygiene.js";
import { plsPhonemes, type PlsPhonemes } from "./ipa-options.js";
import { asCompound, compoundBroad, compoundNarrow, isCompound } from "./compound.js";

export type { VarietyRun } from "./variety-out.js";

export type OutputFormat = "tsv" | "jsonl" | "pls";

/** A variety's engine as a worker thread loads it: the grammar and the options it was made with. */
export type WorkerEngine = Omit<WorkerSide, "formats" | "needs" | "assignsStress">;
export const ALL_FORMATS: readonly OutputFormat[] = ["tsv", "jsonl", "pls"];

export interface RunOptions {
  readonly formats?: readonly OutputFormat[];
  /** Called every `progressEvery` rows with the rows read so far (for a progress bar). */
  readonly onProgress?: (rowsRead: number) => void;
  readonly progressEvery?: number;
  /**
   * Worker threads to spread the whole work over, a chunk of the file each, beside this thread, which
   * takes chunks too (output identical to one thread; chunks.ts), with each run's engine as a
   * worker loads it (parallel to the runs). The run stays on this thread without compiled workers
   * (dist/), or when a variety has overrides.
   */
  readonly workers?: { readonly count: number; readonly engines: readonly WorkerEngine[] };
  /** The lexicon folder: file names in the outputs are relative to it (default: the lexicon file's folder). */
  readonly sourceRoot?: string;
  /**
   * The lexicon's records counted on their own (`countInputRecords`), when the caller has counted
   * them already: a build counts them once for all its varieties. Counted here when absent.
   */
  readonly inputRecords?: Promise<InputRecords>;
  /** Whether the grammar has a `stress` step (default: the engine has a step named `stress`); for the stress checks (runLexicon; runVarieties takes one per variety). */
  readonly assignsStress?: boolean;
  /** What PLS phonemes hold: every narrow variant (default) or the broad form alone (ipa-options.ts). */
  readonly plsPhonemes?: PlsPhonemes;
  /** The variety's override CSV (overrides.ts): its rows replace the lexicon's rows of their words (runLexicon; runVarieties takes one per variety). */
  readonly overrides?: string;
}

export interface RunSummary {
  readonly variety: string;
  readonly lexicon: string;
  /** Physical data rows in the file (header, comments and blank lines excluded). */
  readonly rowsRead: number;
  /** Rows written as entries (one pronunciation each). */
  readonly entriesWritten: number;
  readonly rowsRejected: number;
  /** Distinct words (PLS lexemes). */
  readonly words: number;
  /** Entries with more than one narrow variant. */
  readonly entriesWithVariants: number;
  readonly variantsTotal: number;
  /** Entries whose variants were more than the cap (some left out; marked `capped` in JSON Lines). */
  readonly entriesCapped: number;
  /** Entries whose preferred machine had more than one output (marked `ambiguous` in JSON Lines). */
  readonly entriesAmbiguous: number;
  /** How many entries each rule (and syllabify/stress step) changed, in grammar order. */
  readonly changedBy: readonly { readonly step: string; readonly entries: number }[];
  readonly files: Readonly<Record<string, string>>;
  readonly diagnostics: readonly Diagnostic[];
  /** The lexicon file's own problems (unreadable, header): every one, capped per file with a count of the rest. */
  readonly fileDiagnostics: readonly Diagnostic[];
  /** Why the variety's outputs were not replaced (a path that cannot be written, rows that do not reconcile); empty on success. */
  readonly outputErrors: readonly Diagnostic[];
  readonly seconds: number;
  /** The written files account for every input record exactly once (lexicon/reconcile.ts). */
  readonly reconciled: boolean;
  /** Stress problems and policies (lexicon/hygiene.ts); absent when the run failed. */
  readonly stress?: StressSummary;
  /** With an override file: lexicon rows replaced by it (in replaced.csv), and its warnings and problems. */
  readonly rowsReplaced?: number;
  readonly overrideDiagnostics?: readonly Diagnostic[];
}

/** A row the machine cannot take: a reject. */
export function outsideAlphabet(row: LexiconRow): RejectedRow {
  return {
    kind: "reject", file: row.file, line: row.line, column: row.pronColumn, code: "run/outside-alphabet",
    reason: "the compiled grammar does not accept this pronunciation (a symbol outside its alphabet)", raw: row.raw,
  };
}

/** One entry as a JSON Lines record (`file`: the source file as written there, default the entry's). */
export const entryJsonLine = (r: EntryResult, file = r.file): string => entryJsonRecord(r, file) + "\n";

/** `entryJsonLine` without its line feed. */
export const entryJsonRecord = (r: EntryResult, file = r.file): string => jsonRecord(r, file, r.line);

/** A read row and its transcription as one entry. */
export function entryOf(row: LexiconRow, key: string, t: Transcription): EntryResult {
  const input = row.pos !== undefined ? { pron: row.pron, pos: row.pos, tags: row.tags } : { pron: row.pron, tags: row.tags };
  // The usual entry (no id, no flags) written out field by field: a Transcription's fields, in the
  // order the spread below gives them. Spreading into every entry cost about 25 ms of a CMU build.
  if (row.id === undefined && t.ambiguous === undefined && t.capped === undefined) {
    return { kind: "entry", file: row.file, line: row.line, word: row.word, key, narrow: t.narrow, broad: t.broad, variants: t.variants, rules: t.rules, derivation: t.derivation, variantSteps: t.variantSteps, input };
  }
  return { kind: "entry", file: row.file, line: row.line, word: row.word, key, ...(row.id !== undefined ? { id: row.id } : {}), ...t, input };
}

/** An entry's pronunciations for PLS: the preferred narrow form first, then the other variants. */
export const entryPhonemes = (r: EntryResult): string[] => plsPhonemes(r, "narrow");

/** `key`: the entry key (see keys.ts; an EntryKeys gives them in file order). */
export function transcribeRow(engine: Engine, row: LexiconRow, key: string, needs?: Needs, share?: WalkShare): EntryResult | RejectedRow {
  const t = transcription(engine, row, needs, share);
  return isRejected(t) ? t : entryOf(row, key, t);
}

export const isRejected = (t: Transcription | RejectedRow): t is RejectedRow => (t as RejectedRow).kind === "reject";

/** A row's transcription as every format can write it, or its reject (`transcribeRow` without the entry around it). */
export function transcription(engine: Engine, row: LexiconRow, needs?: Needs, share?: WalkShare): Transcription | RejectedRow {
  const t0 = share !== undefined && engine instanceof MachineEngine ? engine.transcribeWord(row.symbols, needs, share) : engine.transcribeWord(row.symbols, needs);
  if (t0 === undefined) return outsideAlphabet(row);
  const t = asCompound(row, t0, engine.writesSyllables ?? true);
  return unwritableEntry(row, t) ?? t;
}

/**
 * A row's preferred narrow and broad forms alone (what TSV prints), or its reject: the forms and
 * rejects of `transcription` with NARROW_ONLY, without the rest of a transcription.
 */
export function narrowForms(engine: Engine, row: LexiconRow): { readonly narrow: string; readonly broad: string } | RejectedRow {
  // Other engines (the interpreter) give every variant whatever is asked: each is checked as before.
  if (!(engine instanceof MachineEngine)) return transcription(engine, row, NARROW_ONLY);
  const t = engine.transcribeNarrow(row.symbols);
  if (t === undefined) return outsideAlphabet(row);
  let { narrow, broad } = t;
  if (isCompound(row)) {
    narrow = compoundNarrow(narrow, engine.writesSyllables ?? true);
    broad = compoundBroad(broad);
  }
  return unwritableForms(row, [narrow]) ?? { narrow, broad };
}

/**
 * Runs a lexicon file through one variety and writes `<outDir>/lexicon.{tsv,jsonl,pls}`,
 * `<outDir>/rejects.csv` (always, possibly with only its header) and `<outDir>/summary.json`.
 * The files are written into a staging folder beside `outDir`, read back and reconciled with an
 * independent count of the input's records, and only then put in `outDir`'s place as a whole
 * (lexicon/outdir.ts): when the run fails or does not reconcile, `outDir` keeps the previous run.
 */
export async function runLexicon(
  engine: Engine,
  inventory: Inventory,
  lexiconPath: string,
  outDir: string,
  variety: { readonly name: string; readonly lang: string },
  opts: RunOptions = {},
): Promise<RunSummary> {
  const [summary] = await runVarieties(inventory, lexiconPath, [{ engine, outDir, variety, ...(opts.overrides !== undefined ? { overrides: opts.overrides } : {}), ...(opts.assignsStress !== undefined ? { assignsStress: opts.assignsStress } : {}) }], opts);
  return summary!;
}

/**
 * Runs a lexicon file through several varieties at once, reading it once: each row of a batch is
 * handed to every variety in turn (each writes its own folder as `runLexicon` does), and an entry a
 * variety transcribes exactly as the one before it reuses that one's formatted lines. The
 * varieties' grammars must read pronunciations with `inventory` (the same segments and
 * diacritics: the rows' symbols are shared). Summaries in the order of `runs`.
 */
export async function runVarieties(inventory: Inventory, lexiconPath: string, runs: readonly VarietyRun[], opts: RunOptions = {}): Promise<RunSummary[]> {
  const t0 = performance.now();
  const formats = new Set(opts.formats ?? ALL_FORMATS);
  const root = opts.sourceRoot ?? dirname(lexiconPath);
  const words = new WordTable();
  const opened = await Promise.all(runs.map((r) => VarietyOutput.open(r, inventory, formats, lexiconPath, root, t0, opts.plsPhonemes, words)));
  const live = opened.filter((o): o is VarietyOutput => o instanceof VarietyOutput);
  const every = opts.progressEvery ?? 1000;
  let seen = 0;
  const progress = (n: number): void => {
    if (opts.onProgress === undefined) return;
    for (let k = seen + every - (seen % every); k <= seen + n; k += every) opts.onProgress(k);
    seen += n;
  };
  // Each variety's files are written, then checked against the input while the next one's are
  // written (check-written.ts); the varieties are put in place in order once their checks are back.
  // The checking thread counts the input's records while the rows are worked on.
  const checker = new Checker(lexiconPath, opts.inputRecords);
  if (live.length > 0) checker.begin();
  // The first variety's TSV and JSON Lines are read back as they are written; the others' checks
  // come while the main thread writes the PLS files, and following them too held every variety's
  // read-back in memory at once (four varieties of the CMU dictionary: 70 MB more peak RSS, no
  // faster).
  live[0]?.follow(checker);
  let diagnostics: Diagnostic[];
  const w = opts.workers;
  const engines = live.map((o) => w?.engines[opened.indexOf(o)]);
  try {
    if (w !== undefined && w.count > 0 && ChunkPool.script() !== undefined && live.length > 0 && live.every((o, i) => o.run.overrides === undefined && engines[i] !== undefined)) {
      const assigns = live.map((o) => o.run.assignsStress ?? o.run.engine.steps.includes("stress"));
      const pool = ChunkPool.start(w.count, {
        file: lexiconPath, sourceRoot: root, ...(opts.plsPhonemes !== undefined ? { plsPhonemes: opts.plsPhonemes } : {}),
        sides: live.map((_, i) => ({ ...engines[i]!, formats: [...formats], assignsStress: assigns[i]! })),
      }, new ChunkLane(live.map((o) => o.side), assigns, inventory, lexiconPath, root));
      try {
        const read = await pool.run(lexiconPath, async (done) => {
          progress(done.stats.rows + done.stats.rejects);
          for (let v = 0; v < live.length; v++) await live[v]!.absorb(done.sides[v]!);
        });
        diagnostics = read.diagnostics;
      } finally {
        await pool.close();
      }
    } else {
      const work = new BatchWork(live.map((o) => o.side));
      const states = live.map((o) => o.state);
      const reader = readLexicon(lexiconPath, { inventory });
      const keys = new EntryKeys();
      for await (const batch of reader.batches()) {
        const rowKeys = batch.map((item) => (item.kind === "row" ? keys.next(item.word, item.id) : ""));
        progress(batch.length);
        work.take(batch, rowKeys, states);
        for (const o of live) await o.drain();
      }
      diagnostics = [...reader.diagnostics];
    }
    for (const o of live) o.finishRows();
  } catch (err) {
    for (const o of live) await o.abort(err);
    await checker.close();
    throw err;
  }
  try {
    const rest: (() => Promise<RunSummary>)[] = [];
    try {
      for (const o of opened) rest.push(o instanceof VarietyOutput ? await o.finish(diagnostics, checker) : async () => o);
    } catch (err) {
      for (const o of opened) if (o instanceof VarietyOutput) await o.discard();
      throw err;
    }
    const summaries: RunSummary[] = [];
    for (let k = 0; k < rest.length; k++) {
      try {
        summaries.push(await rest[k]!());
      } catch (err) {
        // The run ends here: the varieties not yet put in place leave nothing behind.
        for (const o of opened.slice(k + 1)) if (o instanceof VarietyOutput) await o.discard();
        throw err;
      }
    }
    return summaries;
  } finally {
    await checker.close();
  }
}

export function failedSummary(variety: string, lexicon: string, diagnostics: Diagnostic[], t0: number, outputErrors: Diagnostic[] = []): RunSummary {
  return {
    variety, lexicon, rowsRead: 0, entriesWritten: 0, rowsRejected: 0, words: 0, entriesWithVariants: 0, variantsTotal: 0, entriesCapped: 0, entriesAmbiguous: 0,
    changedBy: [], files: {}, diagnostics: [...diagnostics, ...outputErrors], fileDiagnostics: capPerFile(diagnostics, "lexicon/too-many-problems"), outputErrors, seconds: (performance.now() - t0) / 1000, reconciled: false,
  };
}
