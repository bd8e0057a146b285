// `--workers` of `strata build` and `strata transcribe`: how many worker threads share the work on
// a lexicon, a chunk of the file each (lexicon/chunks.ts). The main thread then only reads the file,
// hands out the chunks and writes their results, so on a machine with spare cores the work is
// spread over all of them.

import { availableParallelism } from "node:os";
import { InvalidArgumentError } from "commander";
import { wholeNumber } from "./common.js";

/** Lexicons at least this long are spread over worker threads when --workers is auto (below it, starting the workers costs more than they save). */
export const WORKERS_FROM_ROWS = 20_000;

export const WORKERS_HELP = "worker threads sharing the work, a chunk of the lexicon each: a number (0: all on the main thread), or auto (one per core, for lexicons of 20,000 rows or more)";

/** `--workers`: auto or a whole number. */
export function workersArg(value: string): string {
  if (value === "auto") return value;
  try {
    return String(wholeNumber(value));
  } catch {
    throw new InvalidArgumentError("It must be 'auto' or a whole number (0: no worker threads).");
  }
}

/** The worker threads for `--workers` (`auto` when absent) and a lexicon of about `rows` rows. */
export function workerCount(option: string | number | undefined, rows: number): number {
  const w = String(option ?? "auto");
  if (w !== "auto") return Number(w);
  return rows >= WORKERS_FROM_ROWS ? Math.min(8, availableParallelism()) : 0;
}
