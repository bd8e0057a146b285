// The batch runner: a lexicon through one variety's compiled grammar, rows in file order, into
// TSV, JSON Lines and PLS written whole, a rejects file, and a summary that reconciles every row.

import { join } from "node:path";
import { formatDiagnostic, type Diagnostic } from "../diagnostics.js";
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

export type OutputFormat = "tsv" | "jsonl" | "pls";
export const ALL_FORMATS: readonly OutputFormat[] = ["tsv", "jsonl", "pls"];

export interface RunOptions {
  readonly formats?: readonly OutputFormat[];
  /** Called every `progressEvery` rows with the rows read so far (for a progress bar). */
  readonly onProgress?: (rowsRead: number) => void;
  readonly progressEvery?: number;
  /** Worker threads to spread the machines' work over (output identical to one thread). */
  readonly pool?: WorkerPool;
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
  /** How many entries each rule (and syllabify/stress step) changed, in grammar order. */
  readonly changedBy: readonly { readonly step: string; readonly entries: number }[];
  readonly files: Readonly<Record<string, string>>;
  readonly diagnostics: readonly Diagnostic[];
  /** Outputs that could not be written (e.g. a character XML 1.0 does not allow, for PLS); that file is absent. */
  readonly outputErrors: readonly Diagnostic[];
  readonly seconds: number;
  /** rowsRead === entriesWritten + rowsRejected. */
  readonly reconciled: boolean;
}

/** Transcribes one read row through the engine; a row the machine cannot take becomes a reject. */
function outsideAlphabet(row: LexiconRow): RejectedRow {
  return {
    kind: "reject", file: row.file, line: row.line, column: row.pronColumn, code: "run/outside-alphabet",
    reason: "the compiled grammar does not accept this pronunciation (a symbol outside its alphabet)", raw: `${row.word},${row.pron}`,
  };
}

/** One entry as a JSON Lines record. */
export const entryJsonLine = (r: EntryResult): string =>
  formatJsonLine({ word: r.word, narrow: r.narrow, broad: r.broad, variants: r.variants, rules: r.rules, ...(r.id !== undefined ? { id: r.id } : {}), source: { file: r.file, line: r.line } });

/** An entry's pronunciations for PLS: the preferred narrow form first, then the other variants. */
export const entryPhonemes = (r: EntryResult): string[] => [r.narrow, ...r.variants.filter((v) => v !== r.narrow)];

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

export function transcribeRow(engine: Engine, row: LexiconRow, needs?: Needs): EntryResult | RejectedRow {
  const t = engine.transcribeWord(row.symbols, needs);
  if (t === undefined) return outsideAlphabet(row);
  return { kind: "entry", file: row.file, line: row.line, word: row.word, ...(row.id !== undefined ? { id: row.id } : {}), ...t };
}

/**
 * Runs a lexicon file through one variety and writes `<outDir>/lexicon.{tsv,jsonl,pls}`,
 * `<outDir>/rejects.csv` (always, possibly with only its header) and `<outDir>/summary.json`.
 * Every output is written whole; when the run fails midway, none of them is left half-written.
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
  const channels: Channel<string>[] = [];
  const writers: Promise<number>[] = [];
  const open = (name: string): Channel<string> => {
    const ch = new Channel<string>();
    const path = join(outDir, name);
    files[name] = path;
    channels.push(ch);
    writers.push(writeFileAtomic(path, ch));
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
  const reader = readLexicon(lexiconPath, { inventory });
  let seen = 0;
  const every = opts.progressEvery ?? 1000;
  // Lines are gathered into chunks of about 64 KiB before they go to a file writer (one hand-over
  // per chunk, not per line).
  const tsvOut = tsv !== undefined ? new ChunkedPush(tsv) : undefined;
  const jsonlOut = jsonl !== undefined ? new ChunkedPush(jsonl) : undefined;
  const wantPls = formats.has("pls");
  const emitOne = (r: EntryResult | RejectedRow): void => {
    if (r.kind === "reject") {
      rejects.push(r);
      return;
    }
    entries++;
    if (r.variants.length > 1) withVariants++;
    variantsTotal += r.variants.length;
    for (const step of r.rules) changed.set(step, (changed.get(step) ?? 0) + 1);
    tsvOut?.push(formatTsvEntry({ word: r.word, narrow: r.narrow, broad: r.broad }));
    jsonlOut?.push(entryJsonLine(r));
    if (wantPls) {
      const lx = lexemes.get(r.word);
      const mine = entryPhonemes(r);
      if (lx === undefined) lexemes.set(r.word, { phonemes: mine, source: { file: r.file, line: r.line, column: 1 } });
      else for (const p of mine) if (!lx.phonemes.includes(p)) lx.phonemes.push(p);
    }
  };
  // Let the file writers drain (memory stays bounded by the back-log, not the lexicon).
  const drain = async (): Promise<void> => {
    if ((tsv?.backlog ?? 0) > 16 || (jsonl?.backlog ?? 0) > 16) await new Promise((res) => setImmediate(res));
  };
  const pool = opts.pool;
  try {
    if (pool === undefined || !(engine instanceof MachineEngine)) {
      for await (const batch of reader.batches()) {
        for (const item of batch) {
          seen++;
          if (opts.onProgress && seen % every === 0) opts.onProgress(seen);
          emitOne(item.kind === "row" ? transcribeRow(engine, item) : item);
        }
        await drain();
      }
    } else {
      // Batches in flight on the workers, emitted strictly in submission order.
      const queue: { items: (LexiconRow | RejectedRow)[]; done: Promise<(Transcription | null)[]> }[] = [];
      let items: (LexiconRow | RejectedRow)[] = [];
      let words: { ids: number[]; bids: number[] }[] = [];
      const drainOne = async (): Promise<void> => {
        const head = queue.shift()!;
        const results = await head.done;
        let k = 0;
        for (const item of head.items) {
          if (item.kind === "reject") {
            emitOne(item);
            continue;
          }
          const t = results[k++];
          emitOne(t === null || t === undefined ? outsideAlphabet(item) : { kind: "entry", file: item.file, line: item.line, word: item.word, ...(item.id !== undefined ? { id: item.id } : {}), ...t });
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
          const e = engine.encode(item.symbols);
          if (e === undefined) {
            items.push(outsideAlphabet(item));
            continue;
          }
          words.push(e);
        }
        items.push(item);
        if (words.length >= BATCH) submit();
        while (queue.length > 2 * pool.size) await drainOne();
      }
      if (items.length > 0) submit();
      while (queue.length > 0) await drainOne();
    }
  } catch (err) {
    for (const ch of channels) ch.fail(err);
    await Promise.allSettled(writers);
    throw err;
  }
  const diagnostics = [...reader.diagnostics];
  const outputErrors: Diagnostic[] = [];
  if (diagnostics.some((d) => d.severity === "error")) {
    const err = new Error(diagnostics.map(formatDiagnostic).join("\n"));
    for (const ch of channels) ch.fail(err);
    await Promise.allSettled(writers);
    return failedSummary(variety.name, lexiconPath, diagnostics, t0);
  }
  tsvOut?.flush();
  jsonlOut?.flush();
  for (const ch of channels) ch.close();
  await Promise.all(writers);

  if (formats.has("pls")) {
    const path = join(outDir, "lexicon.pls");
    files["lexicon.pls"] = path;
    const plsEntries: PlsEntry[] = [...lexemes].map(([word, lx]) => ({ word, phonemes: lx.phonemes, preferred: 0, source: lx.source }));
    const res = await writePls(path, plsEntries, { lang: variety.lang });
    if (!res.ok) {
      outputErrors.push(res.error);
      delete files["lexicon.pls"];
    }
  }
  files["rejects.csv"] = join(outDir, "rejects.csv");
  await writeRejects(files["rejects.csv"], rejects);

  const rowsRead = reader.stats.dataLines;
  const summary: RunSummary = {
    variety: variety.name,
    lexicon: lexiconPath,
    rowsRead,
    entriesWritten: entries,
    rowsRejected: rejects.length,
    words: lexemes.size,
    entriesWithVariants: withVariants,
    variantsTotal,
    changedBy: engine.steps.map((s) => ({ step: s, entries: changed.get(s) ?? 0 })),
    files,
    outputErrors,
    diagnostics: [...diagnostics, ...outputErrors, ...rejects.map((r) => ({ severity: "error" as const, code: r.code, message: r.reason, file: r.file, line: r.line, column: r.column, length: 1 }))],
    seconds: (performance.now() - t0) / 1000,
    reconciled: rowsRead === entries + rejects.length,
  };
  files["summary.json"] = join(outDir, "summary.json");
  await writeFileAtomic(files["summary.json"], JSON.stringify({ ...summary, diagnostics: summary.diagnostics.map(formatDiagnostic) }, null, 2) + "\n");
  return summary;
}

function failedSummary(variety: string, lexicon: string, diagnostics: Diagnostic[], t0: number): RunSummary {
  return {
    variety, lexicon, rowsRead: 0, entriesWritten: 0, rowsRejected: 0, words: 0, entriesWithVariants: 0, variantsTotal: 0,
    changedBy: [], files: {}, diagnostics, outputErrors: [], seconds: (performance.now() - t0) / 1000, reconciled: false,
  };
}
