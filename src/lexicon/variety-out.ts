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
import { countInputRecords, countWritten, reconcile, type InputRecords } from "./reconcile.js";
import { Overrides, writeReplaced } from "./overrides.js";
import type { Inventory } from "../inventory/types.js";
import { failedSummary, transcribeRow, type OutputFormat, type RunSummary } from "./runner.js";
import { outputError, relativeFiles, summaryJson } from "./summary.js";
import { STRESS_REPORT } from "./hygiene.js";
import { reconcileStressReport } from "./reconcile-stress.js";
import type { PlsPhonemes } from "./ipa-options.js";
import { emit, SideState, type Side } from "./batch-work.js";
import { phonemesOf, type WordIds } from "./lexemes.js";
import type { SideChunk } from "./worker.js";
import { unpackLexemes } from "./chunk-lane.js";

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
    words: WordIds | undefined,
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

  /** Opens the variety's staging folder; a folder that cannot be made is the variety's failed summary. */
  /** `words`: the numbers of words, shared by the varieties of one run (lexemes.ts). */
  static async open(run: VarietyRun, inventory: Inventory, formats: ReadonlySet<OutputFormat>, lexiconPath: string, root: string, t0: number, pls?: PlsPhonemes, words?: WordIds): Promise<VarietyOutput | RunSummary> {
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
    this.writers.push(writeFileAtomic(this.staged(name), ch));
    return ch;
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
    this.state.tsv?.flush();
    this.state.jsonl?.flush();
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
        const plsEntries: PlsEntry[] = [...this.state.lexemes].map((lx) => ({ word: lx.word, phonemes: phonemesOf(lx), preferred: 0, source: { file: lx.file, line: lx.line, column: 1 } }));
        const res = await writePls(staged("lexicon.pls"), plsEntries, { lang: variety.lang });
        if (!res.ok) return failWith([res.error]);
      }
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
      reconcileErrors = reconcile(lexiconPath, counted, written, overInput !== undefined ? { lexicon: this.state.relFile(lexiconPath), overrides: this.state.relFile(overrides!), input: overInput } : undefined);
      const sources = [{ file: this.state.relFile(lexiconPath), input: counted }, ...(overInput !== undefined ? [{ file: this.state.relFile(overrides!), input: overInput }] : [])];
      const notEntries = [...written.rejectLines.map((line, i) => ({ file: written.rejectFiles[i] ?? "", line })), ...(written.replaced ?? []).map((r) => ({ file: r.file, line: r.line }))];
      reconcileErrors.push(...(await reconcileStressReport(lexiconPath, staged(STRESS_REPORT), this.state.hygiene.total, sources, notEntries)));
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
