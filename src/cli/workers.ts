// `--workers` of `strata build` and `strata transcribe`: how many worker threads share the work on
// a lexicon with the main thread, a chunk of the file each (lexicon/chunks.ts). The main thread
// reads the file, hands out the chunks, does some itself and writes every chunk's results in order.

import { availableParallelism } from "node:os";
import { stat } from "node:fs/promises";
import { InvalidArgumentError } from "commander";
import { wholeNumber } from "./common.js";

/**
 * Lexicons at least this long are spread over worker threads when --workers is auto; below it,
 * starting a worker costs more than it saves. Measured on a 2-core machine: a worker adds about
 * 0.3 s of CPU and 0.45 s of wall time before its first chunk is done (2,000 CMU rows, TSV), and
 * takes half of each row's work: about 7 µs a row for TSV (transcribe), about 22 µs a row with
 * JSON Lines and PLS (build).
 */
export const WORKERS_FROM_ROWS = { transcribeTsv: 60_000, build: 20_000 } as const;

/**
 * Cores needed before --workers auto starts any. On the 2-core machine the whole CMU dictionary
 * took more CPU with one worker beside the main thread than on the main thread alone (transcribe
 * to TSV 3.35 s against 2.07 s, build with three formats 7.56 s against 5.79 s; medians of 3, the
 * machine shared, load about 7.5) and no less wall time: each thread loads the machines, warms up
 * its own compiled code and memo tables and collects its own garbage, and the main thread still
 * ends the build alone (PLS, read-back, reconciliation).
 */
export const WORKERS_FROM_CORES = 4;

export const WORKERS_HELP = "worker threads beside the main thread, sharing the work a chunk of the lexicon each: a number (0: all on the main thread), or auto (on 4 or more cores, one less than the cores, for large lexicons)";

/** About how many rows a lexicon file holds (from its size: CMU rows are about 27 bytes), for `--workers auto`. */
export async function approxRows(file: string | undefined): Promise<number> {
  if (file === undefined) return 0;
  try {
    return Math.floor((await stat(file)).size / 27);
  } catch {
    return 0;
  }
}

/** `--workers`: auto or a whole number. */
export function workersArg(value: string): string {
  if (value === "auto") return value;
  try {
    return String(wholeNumber(value));
  } catch {
    throw new InvalidArgumentError("It must be 'auto' or a whole number (0: no worker threads).");
  }
}

/** The worker threads for `--workers` (`auto` when absent) and a lexicon of about `rows` rows (`from`: the threshold). */
export function workerCount(option: string | number | undefined, rows: number, from: number): number {
  const w = String(option ?? "auto");
  if (w !== "auto") return Number(w);
  const cores = availableParallelism();
  return rows >= from && cores >= WORKERS_FROM_CORES ? Math.min(8, cores - 1) : 0;
}
