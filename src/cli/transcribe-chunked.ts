// `strata transcribe` of a lexicon file through worker threads, a chunk of the file each
// (lexicon/chunks.ts): TSV or JSON Lines on standard output (or in one file with -o) in file order,
// rejects on standard error, stress checks put together in file order. The same lines, rejects and
// counts as the run on the main thread (transcribe.ts), which the tests compare it with.

import { formatDiagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { tsvHeader } from "../emit/tsv.js";
import { StressTally } from "../lexicon/batch-work.js";
import { ChunkPool } from "../lexicon/chunks.js";
import { stressLine, stressTotal } from "../lexicon/hygiene.js";
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
  const stress = new StressTally();
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
      stress.add(side.stress, side.stressLines);
      for (const b of format === "tsv" ? side.tsv : side.jsonl) await write(b);
    });
  } finally {
    await pool.close();
  }
  printDiagnostics(read.diagnostics, { quiet: o.quiet === true });
  const failed = read.diagnostics.some((d) => d.severity === "error");
  if (!failed && !toStdout) await writeFileAtomic(o.out!, chunks);
  if (!failed && o.stressReport !== undefined) await writeFileAtomic(o.stressReport, stress.report());
  if (o.quiet !== true) process.stderr.write(`strata: ${plural(read.dataLines, "row")} read = ${entries} written + ${rejects} rejected\n`);
  const summary = stress.summary();
  if (o.quiet !== true && !failed) process.stderr.write(`strata: ${stressLine(summary, o.stressReport)}\n`);
  if (failed) return EXIT.badInput;
  if (o.strict === true && stressTotal(summary) > 0) return EXIT.checksFailed;
  if (rejects > 0 && o.allowRejects !== true) return EXIT.rejects;
  return EXIT.ok;
}
