// One variety's side of a run (runner.ts): its staging folder and file writers, the entries in file
// order (its batches done on this thread into its state, or each chunk's results from a worker
// thread put together here, batch-work.ts and chunks.ts), its counts, and at the end the PLS,
// rejects, reconciliation and summary.

import { join } from "node:path";
import { formatDiagnostic, type Diagnostic } from "../diagnostics.js";
import { capPerFile } from "../diagnostic-cap.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { ByteChunks } from "../emit/bytes.js";
import { writePls, type PlsEntry } from "../emit/pls.js";
import { tsvHeader } from "../emit/tsv.js";
import { Channel } from "./channel.js";
import type { Engine } from "./engine.js";
import { writeRejects } from "./read.js";
import { stageFolder } from "./outdir.js";
import { plsMismatch } from "./reconcile.js";
import { countTag } from "./readback.js";
import type { Checker, CheckResult, Follow } from "./check-written.js";
import { Overrides, writeReplaced } from "./overrides.js";
import type { Inventory } from "../inventory/types.js";
import { failedSummary, transcribeRow, type OutputFormat, type RunSummary } from "./runner.js";
import { outputError, relativeFiles, summaryJson } from "./summary.js";
import { isFsError } from "../tempfile.js";
import { STRESS_REPORT } from "./hygiene.js";
import type { PlsPhonemes } from "./ipa-options.js";
import { emit, SideState, type Side } from "./batch-work.js";
import { phonemesOf, type Lexeme } from "./lexemes.js";
import type { WordTable } from "./word-table.js";
import type { SideChunk } from "./worker.js";
import { unpackLexemes } from "./chunk-lane.js";

/**
 * The PLS entries of a variety's lexemes, made one at a time as the writer takes them: a list of
 * them all (135,000 for the CMU dictionary, each with its source) lived until the file was written,
 * and the collector copied it into the old generation at the end of every build.
 */
function* plsEntries(lexemes: Iterable<Lexeme>): Generator<PlsEntry> {
  for (const lx of lexemes) yield { word: lx.word, phonemes: phonemesOf(lx), preferred: 0, source: { file: lx.file, line: lx.line, column: 1 } };
}

/** One variety of a run. */
export interface VarietyRun {
  readonly engine: Engine;
  readonly outDir: string;
  readonly variety: { readonly name: string; readonly lang: string };
  /** The variety's override CSV (overrides.ts): its rows replace the lexicon's rows of their words. */
  readonly overrides?: string;
  /** Whether the grammar has a `stress` step (default: the engine has a step named `stress`); for the stress checks. */
  readonly assignsStress?: boolean;
}

export class VarietyOutput {
  private readonly files: Record<string, string> = {};
  private readonly channels: Channel<string | Uint8Array>[] = [];
  private readonly writers: Promise<number>[] = [];
  private readonly tsv: Channel<string | Uint8Array> | undefined;
  private readonly jsonl: Channel<string | Uint8Array> | undefined;
  /** The TSV and JSON Lines files as the checking thread follows them while they are written (`follow`). */
  private readonly follows = new Map<string, Follow>();
  /** What the variety's entries have given so far (batches done on this thread write into it; chunks from workers are added to it). */
  readonly state: SideState;
  readonly side: Side;

  private constructor(
    readonly run: VarietyRun,
    private readonly ov: Overrides | undefined,
    private readonly stage: Awaited<ReturnType<typeof stageFolder>>,
    private readonly formats: ReadonlySet<OutputFormat>,
    private readonly lexiconPath: string,
    private readonly root: string,
    private readonly t0: number,
    inventory: Inventory,
    pls: PlsPhonemes | undefined,
    words: WordTable | undefined,
  ) {
    this.tsv = formats.has("tsv") ? this.open("lexicon.tsv") : undefined;
    this.jsonl = formats.has("jsonl") ? this.open("lexicon.jsonl") : undefined;
    this.tsv?.push(tsvHeader());
    // Lines are encoded into chunks of about 1 MiB before they go to a file writer (one hand-over
    // per chunk, not per line; emit/bytes.ts).
    const tsv = this.tsv;
    const jsonl = this.jsonl;
    this.state = new SideState({ inventory, assignsStress: run.assignsStress ?? run.engine.steps.includes("stress") }, relativeFiles(root),
      tsv !== undefined ? new ByteChunks((c) => tsv.push(c)) : undefined,
      jsonl !== undefined ? new ByteChunks((c) => jsonl.push(c)) : undefined, words);
    this.side = { engine: run.engine, formats, ...(pls !== undefined ? { pls } : {}), ...(ov !== undefined ? { ov } : {}) };
  }

  /**
   * Opens the variety's staging folder; a folder that cannot be made is the variety's failed
   * summary. `words`: the numbers of words, shared by the varieties of one run (lexemes.ts).
   */
  static async open(run: VarietyRun, inventory: Inventory, formats: ReadonlySet<OutputFormat>, lexiconPath: string, root: string, t0: number, pls?: PlsPhonemes, words?: WordTable): Promise<VarietyOutput | RunSummary> {
    // The override file is read whole first: a file that cannot be read stops the variety before anything is written.
    const ov = run.overrides !== undefined ? await Overrides.read(run.overrides, inventory) : undefined;
    if (ov?.failed === true) {
      return { ...failedSummary(run.variety.name, lexiconPath, [], t0, ov.diagnostics.filter((d) => d.severity === "error")), overrideDiagnostics: ov.diagnostics.filter((d) => d.severity !== "error") };
    }
    try {
      return new VarietyOutput(run, ov, await stageFolder(run.outDir), formats, lexiconPath, root, t0, inventory, pls, words);
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
    this.writers.push(writeFileAtomic(this.staged(name), ch, { written: (temp, bytes) => this.follows.get(name)?.written(temp, bytes) }));
    return ch;
  }

  /**
   * Has `checker` read the TSV and JSON Lines files back as they are written, when it checks on a
   * worker thread (check-written.ts): at the end of the rows only their last chunks are left to
   * read. Called before the rows.
   */
  follow(checker: Checker): void {
    for (const [name, kind] of [["lexicon.tsv", "tsv"], ["lexicon.jsonl", "jsonl"]] as const) {
      if (!(name in this.files)) continue;
      const f = checker.follow(kind);
      if (f !== undefined) this.follows.set(name, f);
    }
  }

  /** Stops following the files (the variety will not be checked). */
  private unfollow(): void {
    for (const f of this.follows.values()) f.drop();
    this.follows.clear();
  }

  /** Lets the file writers drain (memory stays bounded by the back-log, not the lexicon). */
  async drain(): Promise<void> {
    if ((this.tsv?.backlog ?? 0) > 2 || (this.jsonl?.backlog ?? 0) > 2) await new Promise((res) => setImmediate(res));
  }

  /** Adds the variety's results of one chunk a worker did (chunks in file order). */
  async absorb(c: SideChunk): Promise<void> {
    const st = this.state;
    for (const b of c.tsv) this.tsv!.push(b);
    for (const b of c.jsonl) this.jsonl!.push(b);
    for (const r of c.rejects) st.rejects.push(r);
    unpackLexemes(st.lexemes, c.lexemes);
    const n = st.counts;
    n.entries += c.counts.entries;
    n.withVariants += c.counts.withVariants;
    n.variantsTotal += c.counts.variantsTotal;
    n.entriesCapped += c.counts.entriesCapped;
    n.entriesAmbiguous += c.counts.entriesAmbiguous;
    for (const [step, k] of c.changed) st.changed.set(step, (st.changed.get(step) ?? 0) + k);
    st.hygiene.absorb(c.stress, c.stressLines);
    await this.drain();
  }

  /** Every row read has been taken: the override rows (and their rejects) after the lexicon's own entries. */
  finishRows(): void {
    if (this.ov !== undefined) for (const t of this.ov.tail()) emit(this.side, this.state, t.kind === "row" ? transcribeRow(this.run.engine, t.row, t.key) : t, undefined, t.kind === "row" ? t.row : undefined);
  }

  /** Removes the staging folder (after `finish`, when the run ends before this variety is put in place). */
  discard(): Promise<void> {
    this.unfollow();
    return this.stage.abort();
  }

  /** Fails the file writers (their temporary files go) and removes the staging folder. */
  async abort(err: unknown): Promise<void> {
    this.unfollow();
    for (const ch of this.channels) ch.fail(err);
    await Promise.allSettled(this.writers);
    await this.stage.abort();
  }

  /**
   * After the last row: closes the files, writes the rejects and the stress report, hands the
   * reconciliation of what was written with the input's records to `checker` (check-written.ts),
   * and writes the PLS file and counts its lexemes meanwhile. Returns what is left to do once the
   * check is back: summary.json, and the folder put in place (or the variety's failed summary).
   * `diagnostics`: the reader's (file-level problems); with an error among them nothing is kept.
   */
  async finish(diagnostics: readonly Diagnostic[], checker: Checker): Promise<() => Promise<RunSummary>> {
    const { variety, outDir } = this.run;
    const lexiconPath = this.lexiconPath;
    const t0 = this.t0;
    const done = (s: RunSummary) => async (): Promise<RunSummary> => s;
    if (diagnostics.some((d) => d.severity === "error")) {
      await this.abort(new Error(diagnostics.map(formatDiagnostic).join("\n")));
      return done(failedSummary(variety.name, lexiconPath, [...diagnostics], t0));
    }
    this.state.tsv?.flush();
    this.state.jsonl?.flush();
    for (const ch of this.channels) ch.close();
    // Every file of the variety, or none: a failed write (or PLS, or reconciliation) leaves outDir as it was.
    const failWith = async (errors: Diagnostic[]): Promise<RunSummary> => {
      this.unfollow();
      await this.stage.abort();
      return failedSummary(variety.name, lexiconPath, [...diagnostics], t0, errors);
    };
    // A path that cannot be written is one positioned error.
    const failWrite = (err: unknown): Promise<RunSummary> => failWith([outputError(outDir, err)]);
    const settled = await Promise.allSettled(this.writers);
    const broken = settled.find((r): r is PromiseRejectedResult => r.status === "rejected");
    if (broken !== undefined) return done(await failWrite(broken.reason));
    const files = this.files;
    const staged = (name: string): string => this.staged(name);
    let check: Promise<CheckResult>;
    let plsLexemes: number | undefined;
    try {
      // The files in summary.json's order: the PLS file first (it is written after the check starts).
      if (this.formats.has("pls")) files["lexicon.pls"] = join(outDir, "lexicon.pls");
      files["rejects.csv"] = join(outDir, "rejects.csv");
      await writeRejects(staged("rejects.csv"), this.state.rejects.map((r) => ({ ...r, file: this.state.relFile(r.file) })));
      const ov = this.ov;
      const overrides = this.run.overrides;
      if (ov !== undefined) {
        files["replaced.csv"] = join(outDir, "replaced.csv");
        await writeReplaced(staged("replaced.csv"), ov.replacedRows, this.state.relFile);
      }
      files[STRESS_REPORT] = join(outDir, STRESS_REPORT);
      await writeFileAtomic(staged(STRESS_REPORT), this.state.hygiene.report());
      check = checker.run({
        lexicon: lexiconPath,
        relLexicon: this.state.relFile(lexiconPath),
        ...(overrides !== undefined ? { overrides, relOverrides: this.state.relFile(overrides) } : {}),
        files: {
          ...(this.formats.has("tsv") ? { tsv: staged("lexicon.tsv") } : {}),
          ...(this.formats.has("jsonl") ? { jsonl: staged("lexicon.jsonl") } : {}),
          rejects: staged("rejects.csv"),
          ...(ov !== undefined ? { replaced: staged("replaced.csv") } : {}),
          stress: staged(STRESS_REPORT),
        },
        stressTotal: this.state.hygiene.total,
        followed: {
          ...(this.follows.has("lexicon.tsv") ? { tsv: this.follows.get("lexicon.tsv")!.key } : {}),
          ...(this.follows.has("lexicon.jsonl") ? { jsonl: this.follows.get("lexicon.jsonl")!.key } : {}),
        },
      });
      // Taken by the job: nothing is left to drop.
      this.follows.clear();
      // Settled here too: a failure after this point must not leave it unhandled.
      check.catch(() => undefined);
      if (this.formats.has("pls")) {
        const res = await writePls(staged("lexicon.pls"), plsEntries(this.state.lexemes), { lang: variety.lang });
        if (!res.ok) return done(await failWith([res.error]));
        // Counted in the bytes (the tag is ASCII; UTF-8 never repeats an ASCII byte inside a character).
        plsLexemes = await countTag(staged("lexicon.pls"), "<lexeme>");
      }
    } catch (err) {
      return done(await failWrite(err));
    }
    return async () => {
      let rowsRead: number;
      let reconcileErrors: Diagnostic[];
      try {
        const checked = await check;
        rowsRead = checked.rowsRead;
        reconcileErrors = [...checked.errors];
        const pls = plsMismatch(lexiconPath, plsLexemes, checked.tsvWords);
        if (pls !== undefined) reconcileErrors.push(pls);
      } catch (err) {
        // Anything but a file that cannot be read (the check's thread stopped, a bug) ends the run:
        // the staging folder goes first.
        if (!isFsError(err)) await this.stage.abort();
        return failWrite(err);
      }
      if (reconcileErrors.length > 0) return failWith(reconcileErrors);
      return this.complete(diagnostics, rowsRead, failWrite);
    };
  }

  /** summary.json, and the folder put in place. */
  private async complete(diagnostics: readonly Diagnostic[], rowsRead: number, failWrite: (err: unknown) => Promise<RunSummary>): Promise<RunSummary> {
    const { variety, outDir } = this.run;
    const lexiconPath = this.lexiconPath;
    const t0 = this.t0;
    const files = this.files;
    const staged = (name: string): string => this.staged(name);
    const outputErrors: Diagnostic[] = [];
    const engine = this.run.engine;
    const summary: RunSummary = {
      variety: variety.name,
      lexicon: lexiconPath,
      rowsRead,
      entriesWritten: this.state.counts.entries,
      rowsRejected: this.state.rejects.length,
      words: this.state.lexemes.size,
      entriesWithVariants: this.state.counts.withVariants,
      variantsTotal: this.state.counts.variantsTotal,
      entriesCapped: this.state.counts.entriesCapped,
      entriesAmbiguous: this.state.counts.entriesAmbiguous,
      changedBy: engine.steps.map((s) => ({ step: s, entries: this.state.changed.get(s) ?? 0 })),
      files,
      outputErrors,
      fileDiagnostics: capPerFile(diagnostics, "lexicon/too-many-problems"),
      diagnostics: [...diagnostics, ...outputErrors, ...this.state.rejects.map((r) => ({ severity: "error" as const, code: r.code, message: r.reason, file: r.file, line: r.line, column: r.column, length: 1 }))],
      seconds: (performance.now() - t0) / 1000,
      reconciled: true,
      stress: this.state.hygiene.summary(),
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
