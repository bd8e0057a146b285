// The batch runner: a lexicon through one variety's compiled grammar, rows in file order, into
// TSV, JSON Lines and PLS written whole, a rejects file, and a summary that reconciles every row.

import { dirname, join } from "node:path";
import { formatDiagnostic, type Diagnostic } from "../diagnostics.js";
import { capPerFile } from "../diagnostic-cap.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { formatJsonLine } from "../emit/jsonl.js";
import { writePls, type PlsEntry } from "../emit/pls.js";
import { formatTsvEntry, tsvHeader } from "../emit/tsv.js";
import type { Inventory } from "../inventory/types.js";
import { Channel } from "./channel.js";
import type { Engine, EntryResult, Needs, Transcription } from "./engine.js";
import { MachineEngine } from "./engine-machine.js";
import type { WorkerPool } from "./pool.js";
import { readLexicon, writeRejects, type LexiconRow, type RejectedRow } from "./read.js";
import { EntryKeys } from "./keys.js";
import { Overrides, writeReplaced } from "./overrides.js";
import { stageFolder } from "./outdir.js";
import { countInputRecords, countWritten, reconcile } from "./reconcile.js";
import { outputError, relativeTo, summaryJson } from "./summary.js";
import { unwritableEntry } from "./writable.js";
import { StressHygiene, STRESS_REPORT, type StressSummary } from "./hygiene.js";
import { reconcileStressReport } from "./reconcile-stress.js";
import { plsPhonemes, type PlsPhonemes } from "./ipa-options.js";
import { asCompound } from "./compound.js";

export type OutputFormat = "tsv" | "jsonl" | "pls";
export const ALL_FORMATS: readonly OutputFormat[] = ["tsv", "jsonl", "pls"];

export interface RunOptions {
  readonly formats?: readonly OutputFormat[];
  /** Called every `progressEvery` rows with the rows read so far (for a progress bar). */
  readonly onProgress?: (rowsRead: number) => void;
  readonly progressEvery?: number;
  /** Worker threads to spread the machines' work over (output identical to one thread). */
  readonly pool?: WorkerPool;
  /** The lexicon folder: file names in the outputs are relative to it (default: the lexicon file's folder). */
  readonly sourceRoot?: string;
  /** Whether the grammar has a `stress` step (default: the engine has a step named `stress`); for the stress checks. */
  readonly assignsStress?: boolean;
  /** What PLS phonemes hold: every narrow variant (default) or the broad form alone (ipa-options.ts). */
  readonly plsPhonemes?: PlsPhonemes;
  /** The variety's override CSV (overrides.ts): its rows replace the lexicon's rows of their words. */
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

/** Transcribes one read row through the engine; a row the machine cannot take becomes a reject. */
function outsideAlphabet(row: LexiconRow): RejectedRow {
  return {
    kind: "reject", file: row.file, line: row.line, column: row.pronColumn, code: "run/outside-alphabet",
    reason: "the compiled grammar does not accept this pronunciation (a symbol outside its alphabet)", raw: row.raw,
  };
}

/** One entry as a JSON Lines record. */
export const entryJsonLine = (r: EntryResult): string =>
  formatJsonLine({ key: r.key, word: r.word, narrow: r.narrow, broad: r.broad, variants: r.variants, rules: r.rules, ...(r.id !== undefined ? { id: r.id } : {}), source: { file: r.file, line: r.line }, derivation: r.derivation, variantSteps: r.variantSteps, input: r.input,
  ...(r.capped === true ? { capped: true } : {}), ...(r.ambiguous === true ? { ambiguous: true } : {}) });

/** A read row and its transcription as one entry. */
const entryOf = (row: LexiconRow, key: string, t: Transcription): EntryResult => ({
  kind: "entry", file: row.file, line: row.line, word: row.word, key, ...(row.id !== undefined ? { id: row.id } : {}), ...t,
  input: { pron: row.pron, ...(row.pos !== undefined ? { pos: row.pos } : {}), tags: row.tags },
});

/** An entry's pronunciations for PLS: the preferred narrow form first, then the other variants. */
export const entryPhonemes = (r: EntryResult): string[] => plsPhonemes(r, "narrow");

/** Lines gathered into one chunk before it is handed to a file writer. */
class ChunkedPush {
  private buf = "";
  constructor(private readonly ch: Channel<string>) {}
  push(line: string): void {
    this.buf += line;
    if (this.buf.length >= 1 << 16) this.flush();
  }
  flush(): void {
    if (this.buf !== "") this.ch.push(this.buf);
    this.buf = "";
  }
}

/** Words per batch sent to a worker thread. */
const BATCH = 1024;

/** `key`: the entry key (see keys.ts; an EntryKeys gives them in file order). */
export function transcribeRow(engine: Engine, row: LexiconRow, key: string, needs?: Needs): EntryResult | RejectedRow {
  const t0 = engine.transcribeWord(row.symbols, needs);
  if (t0 === undefined) return outsideAlphabet(row);
  const t = asCompound(row, t0, engine.writesSyllables ?? true);
  const bad = unwritableEntry(row, t);
  if (bad !== undefined) return bad;
  return entryOf(row, key, t);
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
  const t0 = performance.now();
  const formats = new Set(opts.formats ?? ALL_FORMATS);
  const files: Record<string, string> = {};
  const root = opts.sourceRoot ?? dirname(lexiconPath);
  // The override file is read whole first: a file that cannot be read stops the variety before anything is written.
  const ov = opts.overrides !== undefined ? await Overrides.read(opts.overrides, inventory) : undefined;
  if (ov?.failed === true) {
    return { ...failedSummary(variety.name, lexiconPath, [], t0, ov.diagnostics.filter((d) => d.severity === "error")), overrideDiagnostics: ov.diagnostics.filter((d) => d.severity !== "error") };
  }
  let stage: Awaited<ReturnType<typeof stageFolder>>;
  try {
    stage = await stageFolder(outDir);
  } catch (err) {
    return failedSummary(variety.name, lexiconPath, [], t0, [outputError(outDir, err)]);
  }
  const staged = (name: string): string => join(stage.path, name);
  const channels: Channel<string>[] = [];
  const writers: Promise<number>[] = [];
  const open = (name: string): Channel<string> => {
    const ch = new Channel<string>();
    files[name] = join(outDir, name);
    channels.push(ch);
    writers.push(writeFileAtomic(staged(name), ch));
    return ch;
  };
  const tsv = formats.has("tsv") ? open("lexicon.tsv") : undefined;
  const jsonl = formats.has("jsonl") ? open("lexicon.jsonl") : undefined;
  tsv?.push(tsvHeader());

  const rejects: RejectedRow[] = [];
  const lexemes = new Map<string, { phonemes: string[]; source: { file: string; line: number; column: number } }>();
  const changed = new Map<string, number>(engine.steps.map((s) => [s, 0]));
  let entries = 0;
  let withVariants = 0;
  let variantsTotal = 0;
  let entriesCapped = 0;
  let entriesAmbiguous = 0;
  const reader = readLexicon(lexiconPath, { inventory });
  let seen = 0;
  const every = opts.progressEvery ?? 1000;
  // Lines are gathered into chunks of about 64 KiB before they go to a file writer (one hand-over
  // per chunk, not per line).
  const tsvOut = tsv !== undefined ? new ChunkedPush(tsv) : undefined;
  const jsonlOut = jsonl !== undefined ? new ChunkedPush(jsonl) : undefined;
  const wantPls = formats.has("pls");
  // Every entry of a run names the same file or few: its relative path is worked out once per file.
  const relFiles = new Map<string, string>();
  const relFile = (f: string): string => {
    let r = relFiles.get(f);
    if (r === undefined) relFiles.set(f, (r = relativeTo(root, f)));
    return r;
  };
  // Stress hygiene of every entry written, in output order (lexicon/hygiene.ts).
  const hygiene = new StressHygiene({ inventory, assignsStress: opts.assignsStress ?? engine.steps.includes("stress") }, relFile);
  const emitOne = (r: EntryResult | RejectedRow, row?: LexiconRow | RejectedRow | EntryResult): void => {
    if (r.kind === "entry" && row?.kind === "row") hygiene.observe(row, r.key);
    if (r.kind === "reject") {
      rejects.push(r);
      return;
    }
    entries++;
    if (r.variants.length > 1) withVariants++;
    if (r.capped === true) entriesCapped++;
    if (r.ambiguous === true) entriesAmbiguous++;
    variantsTotal += r.variants.length;
    for (const step of r.rules) changed.set(step, (changed.get(step) ?? 0) + 1);
    tsvOut?.push(formatTsvEntry({ key: r.key, word: r.word, narrow: r.narrow, broad: r.broad }));
    jsonlOut?.push(entryJsonLine({ ...r, file: relFile(r.file) }));
    if (wantPls) {
      const lx = lexemes.get(r.word);
      const mine = plsPhonemes(r, opts.plsPhonemes);
      if (lx === undefined) lexemes.set(r.word, { phonemes: mine, source: { file: r.file, line: r.line, column: 1 } });
      else for (const p of mine) if (!lx.phonemes.includes(p)) lx.phonemes.push(p);
    }
  };
  // Let the file writers drain (memory stays bounded by the back-log, not the lexicon).
  const drain = async (): Promise<void> => {
    if ((tsv?.backlog ?? 0) > 16 || (jsonl?.backlog ?? 0) > 16) await new Promise((res) => setImmediate(res));
  };
  const pool = opts.pool;
  const keys = new EntryKeys();
  /** A lexicon row's key, or undefined when an override replaces the row in this variety. */
  const baseKey = (row: LexiconRow): string | undefined => {
    const key = keys.next(row.word, row.id);
    return ov?.replaced(row, key) === true ? undefined : key;
  };
  try {
    if (pool === undefined || !(engine instanceof MachineEngine)) {
      for await (const batch of reader.batches()) {
        for (const item of batch) {
          seen++;
          if (opts.onProgress && seen % every === 0) opts.onProgress(seen);
          if (item.kind !== "row") emitOne(item);
          else {
            const key = baseKey(item);
            if (key !== undefined) emitOne(transcribeRow(engine, item, key), item);
          }
        }
        await drain();
      }
    } else {
      // Batches in flight on the workers, emitted strictly in submission order.
      const queue: { items: (LexiconRow | RejectedRow | EntryResult)[]; done: Promise<(Transcription | null)[]> }[] = [];
      let items: (LexiconRow | RejectedRow | EntryResult)[] = [];
      let words: { ids: number[]; bids: number[] }[] = [];
      const rowKeys = new Map<LexiconRow, string>();
      // Entries transcribed on this thread, with their rows (for the stress checks at emit time).
      const rowOf = new WeakMap<LexiconRow | RejectedRow | EntryResult, LexiconRow>();
      const drainOne = async (): Promise<void> => {
        const head = queue.shift()!;
        const results = await head.done;
        let k = 0;
        for (const item of head.items) {
          if (item.kind !== "row") {
            emitOne(item, rowOf.get(item));
            continue;
          }
          const t = results[k++];
          const key = rowKeys.get(item)!;
          rowKeys.delete(item);
          const bad = t === null || t === undefined ? outsideAlphabet(item) : unwritableEntry(item, t);
          emitOne(bad ?? entryOf(item, key, asCompound(item, t!, engine.writesSyllables ?? true)), item);
        }
        await drain();
      };
      const submit = (): void => {
        queue.push({ items, done: pool.submit(words) });
        items = [];
        words = [];
      };
      for await (const batch of reader.batches()) for (const item of batch) {
        seen++;
        if (opts.onProgress && seen % every === 0) opts.onProgress(seen);
        if (item.kind === "row") {
          const key = baseKey(item);
          if (key === undefined) continue;
          const e = engine.encode(item.symbols);
          if (e === undefined) {
            // Segments the workers' machines lack: this thread's engine widens its alphabet.
            const r = transcribeRow(engine, item, key);
            rowOf.set(r, item);
            items.push(r);
            continue;
          }
          words.push(e);
          rowKeys.set(item, key);
        }
        items.push(item);
        if (words.length >= BATCH) submit();
        while (queue.length > 2 * pool.size) await drainOne();
      }
      if (items.length > 0) submit();
      while (queue.length > 0) await drainOne();
    }
    // The override rows (and their rejects) after the lexicon's own entries.
    if (ov !== undefined) for (const t of ov.tail()) emitOne(t.kind === "row" ? transcribeRow(engine, t.row, t.key) : t, t.kind === "row" ? t.row : undefined);
  } catch (err) {
    for (const ch of channels) ch.fail(err);
    await Promise.allSettled(writers);
    await stage.abort();
    throw err;
  }
  const diagnostics = [...reader.diagnostics];
  if (diagnostics.some((d) => d.severity === "error")) {
    const err = new Error(diagnostics.map(formatDiagnostic).join("\n"));
    for (const ch of channels) ch.fail(err);
    await Promise.allSettled(writers);
    await stage.abort();
    return failedSummary(variety.name, lexiconPath, diagnostics, t0);
  }
  tsvOut?.flush();
  jsonlOut?.flush();
  for (const ch of channels) ch.close();
  // Every file of the variety, or none: a failed write (or PLS, or reconciliation) leaves outDir as it was.
  const failWith = async (errors: Diagnostic[]): Promise<RunSummary> => {
    await stage.abort();
    return failedSummary(variety.name, lexiconPath, diagnostics, t0, errors);
  };
  // A path that cannot be written is one positioned error; anything else is re-thrown (a bug).
  const failWrite = async (err: unknown): Promise<RunSummary> => {
    await stage.abort();
    return failedSummary(variety.name, lexiconPath, diagnostics, t0, [outputError(outDir, err)]);
  };
  const settled = await Promise.allSettled(writers);
  const broken = settled.find((r): r is PromiseRejectedResult => r.status === "rejected");
  if (broken !== undefined) return failWrite(broken.reason);

  let rowsRead: number;
  let reconcileErrors: Diagnostic[];
  try {
    if (formats.has("pls")) {
      files["lexicon.pls"] = join(outDir, "lexicon.pls");
      const plsEntries: PlsEntry[] = [...lexemes].map(([word, lx]) => ({ word, phonemes: lx.phonemes, preferred: 0, source: lx.source }));
      const res = await writePls(staged("lexicon.pls"), plsEntries, { lang: variety.lang });
      if (!res.ok) return failWith([res.error]);
    }
    files["rejects.csv"] = join(outDir, "rejects.csv");
    await writeRejects(staged("rejects.csv"), rejects.map((r) => ({ ...r, file: relativeTo(root, r.file) })));
    if (ov !== undefined) {
      files["replaced.csv"] = join(outDir, "replaced.csv");
      await writeReplaced(staged("replaced.csv"), ov.replacedRows, relFile);
    }
    files[STRESS_REPORT] = join(outDir, STRESS_REPORT);
    await writeFileAtomic(staged(STRESS_REPORT), hygiene.report());
    const input = await countInputRecords(lexiconPath);
    const written = await countWritten({
      ...(formats.has("tsv") ? { tsv: staged("lexicon.tsv") } : {}),
      ...(formats.has("jsonl") ? { jsonl: staged("lexicon.jsonl") } : {}),
      ...(formats.has("pls") ? { pls: staged("lexicon.pls") } : {}),
      rejects: staged("rejects.csv"),
      ...(ov !== undefined ? { replaced: staged("replaced.csv") } : {}),
    });
    const overInput = opts.overrides !== undefined ? await countInputRecords(opts.overrides) : undefined;
    rowsRead = input.count + (overInput?.count ?? 0);
    reconcileErrors = reconcile(lexiconPath, input, written, overInput !== undefined ? { lexicon: relFile(lexiconPath), overrides: relFile(opts.overrides!), input: overInput } : undefined);
    const sources = [{ file: relFile(lexiconPath), input }, ...(overInput !== undefined ? [{ file: relFile(opts.overrides!), input: overInput }] : [])];
    const notEntries = [...written.rejectLines.map((line, i) => ({ file: written.rejectFiles[i] ?? "", line })), ...(written.replaced ?? []).map((r) => ({ file: r.file, line: r.line }))];
    reconcileErrors.push(...(await reconcileStressReport(lexiconPath, staged(STRESS_REPORT), hygiene.total, sources, notEntries)));
  } catch (err) {
    return failWrite(err);
  }
  if (reconcileErrors.length > 0) return failWith(reconcileErrors);
  const outputErrors: Diagnostic[] = [];
  const summary: RunSummary = {
    variety: variety.name,
    lexicon: lexiconPath,
    rowsRead,
    entriesWritten: entries,
    rowsRejected: rejects.length,
    words: lexemes.size,
    entriesWithVariants: withVariants,
    variantsTotal,
    entriesCapped,
    entriesAmbiguous,
    changedBy: engine.steps.map((s) => ({ step: s, entries: changed.get(s) ?? 0 })),
    files,
    outputErrors,
    fileDiagnostics: capPerFile(reader.diagnostics, "lexicon/too-many-problems"),
    diagnostics: [...diagnostics, ...outputErrors, ...rejects.map((r) => ({ severity: "error" as const, code: r.code, message: r.reason, file: r.file, line: r.line, column: r.column, length: 1 }))],
    seconds: (performance.now() - t0) / 1000,
    reconciled: true,
    stress: hygiene.summary(),
    ...(ov !== undefined ? { rowsReplaced: ov.replacedRows.length, overrideDiagnostics: ov.diagnostics } : {}),
  };
  files["summary.json"] = join(outDir, "summary.json");
  try {
    await writeFileAtomic(staged("summary.json"), summaryJson(summary, root));
    await stage.commit();
  } catch (err) {
    return failWrite(err);
  }
  return summary;
}

function failedSummary(variety: string, lexicon: string, diagnostics: Diagnostic[], t0: number, outputErrors: Diagnostic[] = []): RunSummary {
  return {
    variety, lexicon, rowsRead: 0, entriesWritten: 0, rowsRejected: 0, words: 0, entriesWithVariants: 0, variantsTotal: 0, entriesCapped: 0, entriesAmbiguous: 0,
    changedBy: [], files: {}, diagnostics: [...diagnostics, ...outputErrors], fileDiagnostics: capPerFile(diagnostics, "lexicon/too-many-problems"), outputErrors, seconds: (performance.now() - t0) / 1000, reconciled: false,
  };
}
