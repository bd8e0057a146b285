// The rejects file: every row the reader (or the ARPAbet import) could not read, as CSV with its
// position, reason and the line exactly as read.

import { writeFileAtomic } from "../emit/atomic.js";
import { csvLine } from "../emit/csv.js";
import type { RejectedRow } from "./read.js";

/** The rejects file's columns. `raw` is the rejected line exactly as read. */
export const REJECT_COLUMNS = ["file", "line", "column", "code", "reason", "raw"] as const;

/** One reject as one CSV record (LF-terminated). */
export function formatRejectLine(r: RejectedRow): string {
  return csvLine([r.file, String(r.line), String(r.column), r.code, r.reason, r.raw]);
}

/**
 * Writes the rejects as CSV (header `file,line,column,code,reason,raw`), atomically.
 * Returns how many rejects were written.
 */
export async function writeRejects(path: string, rejects: Iterable<RejectedRow> | AsyncIterable<RejectedRow>): Promise<number> {
  let n = 0;
  async function* lines(): AsyncGenerator<string> {
    yield csvLine([...REJECT_COLUMNS]);
    for await (const r of rejects) {
      n++;
      yield formatRejectLine(r);
    }
  }
  await writeFileAtomic(path, lines());
  return n;
}
