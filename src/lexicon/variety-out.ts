// One variety's side of a run (runner.ts): its staging folder and file writers, the entries in file
// order (on this thread, or through a worker pool), its counts, and at the end the PLS, rejects,
// reconciliation and summary. A build reads the lexicon once and hands every batch of rows to each
// of its varieties in turn.

import { join } from "node:path";
import { formatDiagnostic, type Diagnostic } from "../diagnostics.js";
import { capPerFile } from "../diagnostic-cap.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { ByteChunks } from "../emit/bytes.js";
import { writePls, type PlsEntry } from "../emit/pls.js";
import { formatTsvEntry, tsvHeader } from "../emit/tsv.js";
import { Channel } from "./channel.js";
import type { Engine, EntryResult, Transcription } from "./engine.js";
import { MachineEngine } from "./engine-machine.js";
import type { WorkerPool } from "./pool.js";
import { writeRejects, type LexiconItem, type LexiconRow, type RejectedRow } from "./read.js";
import { stageFolder } from "./outdir.js";
import { countInputRecords, countWritten, reconcile, type InputRecords } from "./reconcile.js";
import { Overrides, writeReplaced } from "./overrides.js";
import { asCompound } from "./compound.js";
import type { Inventory } from "../inventory/types.js";
import { entryJsonRecord, entryOf, failedSummary, outsideAlphabet, transcribeRow, type OutputFormat, type RunSummary } from "./runner.js";
import { outputError, relativeTo, summaryJson } from "./summary.js";
import { unwritableEntry } from "./writable.js";
import type { WalkShare } from "./walk-share.js";
import { StressHygiene, STRESS_REPORT } from "./hygiene.js";
import { reconcileStressReport } from "./reconcile-stress.js";
import { plsPhonemes, type PlsPhonemes } from "./ipa-options.js";

/** Words per batch sent to a worker thread. */
const BATCH = 1024;

/** One variety of a run. */
export interface VarietyRun {
  readonly engine: Engine;
  readonly outDir: string;
  readonly variety: { readonly name: string; readonly lang: string };
  /** Worker threads running this variety's machines (output identical to one thread). */
  readonly pool?: WorkerPool;
  /** The variety's override CSV (overrides.ts): its rows replace the lexicon's rows of their words. */
  readonly overrides?: string;
  /** Whether the grammar has a `stress` step (default: the engine has a step named `stress`); for the stress checks. */
  readonly assignsStress?: boolean;
}

/**
 * The lines written for one row by the variety before, kept for the next: when the next variety's
 * entry is the same in every field the lines are the same, and are not formatted again.
 */
export interface SharedLines {
  readonly entry: EntryResult;
  readonly tsv: string;
  /** The JSON Lines record without its line feed. */
  readonly jsonl: string;
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

export class VarietyOutput {
  private readonly files: Record<string, string> = {};
  private readonly channels: Channel<string | Uint8Array>[] = [];
  private readonly writers: Promise<number>[] = [];
  private readonly tsvOut: ByteChunks | undefined;
  private readonly jsonlOut: ByteChunks | undefined;
  private readonly tsv: Channel<string | Uint8Array> | undefined;
  private readonly jsonl: Channel<string | Uint8Array> | undefined;
  private readonly rejects: RejectedRow[] = [];
  private readonly lexemes = new Map<string, { phonemes: string[]; source: { file: string; line: number; column: number } }>();
  private readonly changed: Map<string, number>;
  private entries = 0;
  private withVariants = 0;
  private variantsTotal = 0;
  private entriesCapped = 0;
  private entriesAmbiguous = 0;
  /** Every entry of a run names the same file or few: its relative path is worked out once per file. */
  private readonly relFiles = new Map<string, string>();
  /** Batches in flight on the worker pool, emitted strictly in submission order. */
  private readonly queue: { items: (LexiconRow | RejectedRow | EntryResult)[]; keys: string[]; done: Promise<(Transcription | null)[]> }[] = [];
  /** Stress hygiene of every entry written, in output order (lexicon/hygiene.ts). */
  private readonly hygiene: StressHygiene;
  /** Entries transcribed on this thread while a pool runs the rest, with their rows (for the stress checks at emit time). */
  private readonly rowOf = new WeakMap<LexiconRow | RejectedRow | EntryResult, LexiconRow>();
  private pending: { items: (LexiconRow | RejectedRow | EntryResult)[]; keys: string[]; words: { ids: number[]; bids: number[] }[] } = { items: [], keys: [], words: [] };

  private constructor(
    readonly run: VarietyRun,
    private readonly ov: Overrides | undefined,
    private readonly stage: Awaited<ReturnType<typeof stageFolder>>,
    private readonly formats: ReadonlySet<OutputFormat>,
    private readonly lexiconPath: string,
    private readonly root: string,
    private readonly t0: number,
    inventory: Inventory,
    private readonly pls: PlsPhonemes | undefined,
  ) {
    this.hygiene = new StressHygiene({ inventory, assignsStress: run.assignsStress ?? run.engine.steps.includes("stress") }, (f) => this.relFile(f));
    this.changed = new Map<string, number>(run.engine.steps.map((s) => [s, 0]));
    this.tsv = formats.has("tsv") ? this.open("lexicon.tsv") : undefined;
    this.jsonl = formats.has("jsonl") ? this.open("lexicon.jsonl") : undefined;
    this.tsv?.push(tsvHeader());
    // Lines are encoded into chunks of about 1 MiB before they go to a file writer (one hand-over
    // per chunk, not per line; emit/bytes.ts).
    const tsv = this.tsv;
    const jsonl = this.jsonl;
    this.tsvOut = tsv !== undefined ? new ByteChunks((c) => tsv.push(c)) : undefined;
    this.jsonlOut = jsonl !== undefined ? new ByteChunks((c) => jsonl.push(c)) : undefined;
  }

  /** Opens the variety's staging folder; a folder that cannot be made is the variety's failed summary. */
  static async open(run: VarietyRun, inventory: Inventory, formats: ReadonlySet<OutputFormat>, lexiconPath: string, root: string, t0: number, pls?: PlsPhonemes): Promise<VarietyOutput | RunSummary> {
    // The override file is read whole first: a file that cannot be read stops the variety before anything is written.
    const ov = run.overrides !== undefined ? await Overrides.read(run.overrides, inventory) : undefined;
    if (ov?.failed === true) {
      return { ...failedSummary(run.variety.name, lexiconPath, [], t0, ov.diagnostics.filter((d) => d.severity === "error")), overrideDiagnostics: ov.diagnostics.filter((d) => d.severity !== "error") };
    }
    try {
      return new VarietyOutput(run, ov, await stageFolder(run.outDir), formats, lexiconPath, root, t0, inventory, pls);
    } catch (err) {
      return failedSummary(run.variety.name, lexiconPath, [], t0, [outputError(run.outDir, err)]);
    }
  }

  private staged(name: string): string {
    return join(this.stage.path, name);
  }

  private open(name: string): Channel<string | Uint8Array> {
    const ch = new Channel<string | Uint8Array>();
    this.files[name] = join(this.run.outDir, name);
    this.channels.push(ch);
    this.writers.push(writeFileAtomic(this.staged(name), ch));
    return ch;
  }

  private relFile(f: string): string {
    let r = this.relFiles.get(f);
    if (r === undefined) this.relFiles.set(f, (r = relativeTo(this.root, f)));
    return r;
  }

  /** Writes one entry or reject; `shared[at]`, when given, holds (and receives) the row's lines of the variety before. */
  private emit(r: EntryResult | RejectedRow, shared?: (SharedLines | undefined)[], at = 0, row?: LexiconRow): void {
    if (r.kind === "entry" && row !== undefined) this.hygiene.observe(row, r.key);
    if (r.kind === "reject") {
      this.rejects.push(r);
      return;
    }
    this.entries++;
    if (r.variants.length > 1) this.withVariants++;
    if (r.capped === true) this.entriesCapped++;
    if (r.ambiguous === true) this.entriesAmbiguous++;
    this.variantsTotal += r.variants.length;
    for (const step of r.rules) this.changed.set(step, (this.changed.get(step) ?? 0) + 1);
    if (this.tsvOut !== undefined || this.jsonlOut !== undefined) {
      const before = shared?.[at];
      let lines: SharedLines;
      if (before !== undefined && sameTranscription(before.entry, r)) lines = before;
      else {
        lines = {
          entry: r,
          tsv: this.tsvOut !== undefined ? formatTsvEntry({ key: r.key, word: r.word, narrow: r.narrow, broad: r.broad }) : "",
          jsonl: this.jsonlOut !== undefined ? entryJsonRecord(r, this.relFile(r.file)) : "",
        };
        // Lines of a variety that did not write a format are no use to the next one.
        if (shared !== undefined && this.tsvOut !== undefined && this.jsonlOut !== undefined) shared[at] = lines;
      }
      this.tsvOut?.push(lines.tsv);
      this.jsonlOut?.pushLine(lines.jsonl);
    }
    if (this.formats.has("pls")) {
      const lx = this.lexemes.get(r.word);
      const mine = plsPhonemes(r, this.pls);
      if (lx === undefined) this.lexemes.set(r.word, { phonemes: mine, source: { file: r.file, line: r.line, column: 1 } });
      else for (const p of mine) if (!lx.phonemes.includes(p)) lx.phonemes.push(p);
    }
  }

  /** Lets the file writers drain (memory stays bounded by the back-log, not the lexicon). */
  private async drain(): Promise<void> {
    if ((this.tsv?.backlog ?? 0) > 2 || (this.jsonl?.backlog ?? 0) > 2) await new Promise((res) => setImmediate(res));
  }

  /**
   * Transcribes and writes one batch of read items (`keys[i]`: the entry key of item i when it is a
   * row; `share(i)`: item i's walk shared with the run's other varieties, walk-share.ts). On this thread the batch is written before this returns; with a worker pool it is
   * written as the pool's results come back, in order (`finishRows` waits for the rest).
   */
  async take(batch: readonly LexiconItem[], keys: readonly string[], shared?: (SharedLines | undefined)[], share?: (i: number) => WalkShare | undefined): Promise<void> {
    const { engine, pool } = this.run;
    if (pool === undefined || !(engine instanceof MachineEngine)) {
      for (let i = 0; i < batch.length; i++) {
        const item = batch[i]!;
        if (item.kind !== "row") this.emit(item);
        else if (this.ov?.replaced(item, keys[i]!) !== true) this.emit(transcribeRow(engine, item, keys[i]!, undefined, share?.(i)), shared, i, item);
      }
      await this.drain();
      return;
    }
    for (let i = 0; i < batch.length; i++) {
      const item = batch[i]!;
      // The batch being gathered (a new one after each submit).
      const p = this.pending;
      if (item.kind === "row") {
        // A row an override replaces in this variety is not written.
        if (this.ov?.replaced(item, keys[i]!) === true) continue;
        const e = engine.encode(item.symbols);
        if (e === undefined) {
          // Segments the workers' machines lack: this thread's engine widens its alphabet.
          const r = transcribeRow(engine, item, keys[i]!);
          this.rowOf.set(r, item);
          p.items.push(r);
          p.keys.push("");
          continue;
        }
        p.words.push(e);
      }
      p.items.push(item);
      p.keys.push(keys[i]!);
      if (p.words.length >= BATCH) this.submit(pool);
      while (this.queue.length > 2 * pool.size) await this.drainOne();
    }
  }

  private submit(pool: WorkerPool): void {
    const p = this.pending;
    this.queue.push({ items: p.items, keys: p.keys, done: pool.submit(p.words) });
    this.pending = { items: [], keys: [], words: [] };
  }

  private async drainOne(): Promise<void> {
    const head = this.queue.shift()!;
    const results = await head.done;
    let k = 0;
    head.items.forEach((item, i) => {
      if (item.kind !== "row") {
        this.emit(item, undefined, 0, this.rowOf.get(item));
        return;
      }
      const t = results[k++];
      const bad = t === null || t === undefined ? outsideAlphabet(item) : unwritableEntry(item, t);
      this.emit(bad ?? entryOf(item, head.keys[i]!, asCompound(item, t!, this.run.engine.writesSyllables ?? true)), undefined, 0, item);
    });
    await this.drain();
  }

  /** Every row read has been taken: waits for the pool's batches still out. */
  async finishRows(): Promise<void> {
    if (this.run.pool !== undefined && this.pending.items.length > 0) this.submit(this.run.pool);
    while (this.queue.length > 0) await this.drainOne();
    // The override rows (and their rejects) after the lexicon's own entries.
    if (this.ov !== undefined) for (const t of this.ov.tail()) this.emit(t.kind === "row" ? transcribeRow(this.run.engine, t.row, t.key) : t, undefined, 0, t.kind === "row" ? t.row : undefined);
  }

  /** Fails the file writers (their temporary files go) and removes the staging folder. */
  async abort(err: unknown): Promise<void> {
    for (const ch of this.channels) ch.fail(err);
    await Promise.allSettled(this.writers);
    await this.stage.abort();
  }

  /**
   * After the last row: closes the files, writes the PLS and rejects, reads everything back and
   * reconciles it with the input's records, writes summary.json and puts the folder in place.
   * `diagnostics`: the reader's (file-level problems); with an error among them nothing is kept.
   */
  async finish(diagnostics: readonly Diagnostic[], input: Promise<InputRecords>): Promise<RunSummary> {
    const { variety, outDir } = this.run;
    const lexiconPath = this.lexiconPath;
    const t0 = this.t0;
    if (diagnostics.some((d) => d.severity === "error")) {
      await this.abort(new Error(diagnostics.map(formatDiagnostic).join("\n")));
      return failedSummary(variety.name, lexiconPath, [...diagnostics], t0);
    }
    this.tsvOut?.flush();
    this.jsonlOut?.flush();
    for (const ch of this.channels) ch.close();
    // Every file of the variety, or none: a failed write (or PLS, or reconciliation) leaves outDir as it was.
    const failWith = async (errors: Diagnostic[]): Promise<RunSummary> => {
      await this.stage.abort();
      return failedSummary(variety.name, lexiconPath, [...diagnostics], t0, errors);
    };
    // A path that cannot be written is one positioned error.
    const failWrite = (err: unknown): Promise<RunSummary> => failWith([outputError(outDir, err)]);
    const settled = await Promise.allSettled(this.writers);
    const broken = settled.find((r): r is PromiseRejectedResult => r.status === "rejected");
    if (broken !== undefined) return failWrite(broken.reason);
    const files = this.files;
    const staged = (name: string): string => this.staged(name);
    let rowsRead: number;
    let reconcileErrors: Diagnostic[];
    try {
      if (this.formats.has("pls")) {
        files["lexicon.pls"] = join(outDir, "lexicon.pls");
        const plsEntries: PlsEntry[] = [...this.lexemes].map(([word, lx]) => ({ word, phonemes: lx.phonemes, preferred: 0, source: lx.source }));
        const res = await writePls(staged("lexicon.pls"), plsEntries, { lang: variety.lang });
        if (!res.ok) return failWith([res.error]);
      }
      files["rejects.csv"] = join(outDir, "rejects.csv");
      await writeRejects(staged("rejects.csv"), this.rejects.map((r) => ({ ...r, file: relativeTo(this.root, r.file) })));
      const ov = this.ov;
      const overrides = this.run.overrides;
      if (ov !== undefined) {
        files["replaced.csv"] = join(outDir, "replaced.csv");
        await writeReplaced(staged("replaced.csv"), ov.replacedRows, (f) => this.relFile(f));
      }
      files[STRESS_REPORT] = join(outDir, STRESS_REPORT);
      await writeFileAtomic(staged(STRESS_REPORT), this.hygiene.report());
      const counted = await input;
      const written = await countWritten({
        ...(this.formats.has("tsv") ? { tsv: staged("lexicon.tsv") } : {}),
        ...(this.formats.has("jsonl") ? { jsonl: staged("lexicon.jsonl") } : {}),
        ...(this.formats.has("pls") ? { pls: staged("lexicon.pls") } : {}),
        rejects: staged("rejects.csv"),
        ...(ov !== undefined ? { replaced: staged("replaced.csv") } : {}),
      });
      const overInput = overrides !== undefined ? await countInputRecords(overrides) : undefined;
      rowsRead = counted.count + (overInput?.count ?? 0);
      reconcileErrors = reconcile(lexiconPath, counted, written, overInput !== undefined ? { lexicon: this.relFile(lexiconPath), overrides: this.relFile(overrides!), input: overInput } : undefined);
      const sources = [{ file: this.relFile(lexiconPath), input: counted }, ...(overInput !== undefined ? [{ file: this.relFile(overrides!), input: overInput }] : [])];
      const notEntries = [...written.rejectLines.map((line, i) => ({ file: written.rejectFiles[i] ?? "", line })), ...(written.replaced ?? []).map((r) => ({ file: r.file, line: r.line }))];
      reconcileErrors.push(...(await reconcileStressReport(lexiconPath, staged(STRESS_REPORT), this.hygiene.total, sources, notEntries)));
    } catch (err) {
      return failWrite(err);
    }
    if (reconcileErrors.length > 0) return failWith(reconcileErrors);
    const outputErrors: Diagnostic[] = [];
    const engine = this.run.engine;
    const summary: RunSummary = {
      variety: variety.name,
      lexicon: lexiconPath,
      rowsRead,
      entriesWritten: this.entries,
      rowsRejected: this.rejects.length,
      words: this.lexemes.size,
      entriesWithVariants: this.withVariants,
      variantsTotal: this.variantsTotal,
      entriesCapped: this.entriesCapped,
      entriesAmbiguous: this.entriesAmbiguous,
      changedBy: engine.steps.map((s) => ({ step: s, entries: this.changed.get(s) ?? 0 })),
      files,
      outputErrors,
      fileDiagnostics: capPerFile(diagnostics, "lexicon/too-many-problems"),
      diagnostics: [...diagnostics, ...outputErrors, ...this.rejects.map((r) => ({ severity: "error" as const, code: r.code, message: r.reason, file: r.file, line: r.line, column: r.column, length: 1 }))],
      seconds: (performance.now() - t0) / 1000,
      reconciled: true,
      stress: this.hygiene.summary(),
      ...(this.ov !== undefined ? { rowsReplaced: this.ov.replacedRows.length, overrideDiagnostics: this.ov.diagnostics } : {}),
    };
    files["summary.json"] = join(outDir, "summary.json");
    try {
      await writeFileAtomic(staged("summary.json"), summaryJson(summary, this.root));
      await this.stage.commit();
    } catch (err) {
      return failWrite(err);
    }
    return summary;
  }
}
