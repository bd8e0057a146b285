// `strata transcribe` of a lexicon file through worker threads, a chunk of the file each
// (lexicon/chunks.ts): TSV or JSON Lines on standard output (or in one file with -o) in file order,
// rejects on standard error, stress checks put together in file order. The same lines, rejects and
// counts as the run on the main thread (transcribe.ts), which the tests compare it with.

import { formatDiagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { tsvHeader } from "../emit/tsv.js";
import { ChunkPool } from "../lexicon/chunks.js";
import { StressCounts, stressLine, stressTotal, type StressSummary } from "../lexicon/hygiene.js";
import type { Diagnostic } from "../diagnostics.js";
import { rejectDiagnostic } from "../lexicon/read.js";
import type { WorkerEngine } from "../lexicon/runner.js";
import { NARROW_ONLY, type Engine } from "../lexicon/engine.js";
import { ChunkLane } from "../lexicon/chunk-lane.js";
import type { Inventory } from "../inventory/types.js";
import { EXIT, plural, printDiagnostics } from "./common.js";
import type { TranscribeOptions } from "./transcribe.js";

/** `threads` workers beside this thread, which takes chunks too with `main`, its engine. */
export async function transcribeChunked(file: string, threads: number, engine: WorkerEngine, format: "tsv" | "jsonl", assignsStress: boolean, o: TranscribeOptions, main: { engine: Engine; inventory: Inventory }): Promise<number> {
  const toStdout = o.out === undefined || o.out === "-";
  const chunks: Uint8Array[] = [];
  /** Writes to standard output, waiting when its buffer is full. */
  const write = async (bytes: Uint8Array | string): Promise<void> => {
    if (!toStdout) {
      chunks.push(typeof bytes === "string" ? Buffer.from(bytes) : bytes);
      return;
    }
    if (!process.stdout.write(bytes)) await new Promise((res) => process.stdout.once("drain", res));
  };
  const needs = format === "tsv" ? { needs: NARROW_ONLY } : {};
  const pool = ChunkPool.start(threads, { file, sides: [{ ...engine, formats: [format], assignsStress, ...needs }] },
    new ChunkLane([{ engine: main.engine, formats: new Set([format]), ...needs }], [assignsStress], main.inventory, file, undefined));
  const stress = new StressCounts();
  let rejects = 0;
  let entries = 0;
  if (format === "tsv") await write(tsvHeader());
  let read;
  try {
    read = await pool.run(file, async (done) => {
      const side = done.sides[0]!;
      for (const r of side.rejects) process.stderr.write(formatDiagnostic(rejectDiagnostic(r)) + "\n");
      rejects += side.rejects.length;
      entries += side.counts.entries;
      stress.absorb(side.stress, side.stressLines);
      for (const b of format === "tsv" ? side.tsv : side.jsonl) await write(b);
    });
  } finally {
    await pool.close();
  }
  return transcribeEnd(o, { diagnostics: read.diagnostics, dataLines: read.dataLines, entries, rejects, stress, out: toStdout ? [] : chunks });
}

/**
 * The end of a transcribe run, on one thread or several: the reader's problems, the -o file and
 * the stress report written (unless the file could not be read), the counts on stderr, the exit code.
 */
export async function transcribeEnd(o: TranscribeOptions, r: {
  readonly diagnostics: readonly Diagnostic[]; readonly dataLines: number; readonly entries: number; readonly rejects: number;
  readonly stress: { report(): Iterable<string>; summary(): StressSummary }; readonly out: readonly (string | Uint8Array)[];
}): Promise<number> {
  printDiagnostics(r.diagnostics, { quiet: o.quiet === true });
  const failed = r.diagnostics.some((d) => d.severity === "error");
  if (!failed && r.out.length > 0) await writeFileAtomic(o.out!, r.out);
  if (!failed && o.stressReport !== undefined) await writeFileAtomic(o.stressReport, r.stress.report());
  if (o.quiet !== true) process.stderr.write(`strata: ${plural(r.dataLines, "row")} read = ${r.entries} written + ${r.rejects} rejected\n`);
  const summary = r.stress.summary();
  if (o.quiet !== true && !failed) process.stderr.write(`strata: ${stressLine(summary, o.stressReport)}\n`);
  if (failed) return EXIT.badInput;
  if (o.strict === true && stressTotal(summary) > 0) return EXIT.checksFailed;
  if (r.rejects > 0 && o.allowRejects !== true) return EXIT.rejects;
  return EXIT.ok;
}
