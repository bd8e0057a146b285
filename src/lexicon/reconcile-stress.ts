// The stress report read back before a variety's folder is swapped in: it must hold exactly the
// findings the run counted, each on a line of the lexicon that became an entry, holding that line's
// word (the input's own record count, lexicon/reconcile.ts, not the reader's).

import { readFile } from "node:fs/promises";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { csvRecords, type InputRecords } from "./reconcile.js";
import { STRESS_REPORT, STRESS_REPORT_COLUMNS } from "./hygiene.js";

/**
 * Errors (code `run/unreconciled`) when the report at `path` does not hold `expected` records with
 * the agreed header, or a record names a line that is not an entry of the lexicon (not a record, or
 * rejected), or a word other than that line's.
 */
export async function reconcileStressReport(lexicon: string, path: string, expected: number, input: InputRecords, rejectLines: readonly number[]): Promise<Diagnostic[]> {
  const out: Diagnostic[] = [];
  const fail = (message: string, line = 1): void => {
    out.push(diagnostic("error", "run/unreconciled", `${message} This is a bug in Strata; please report it with the lexicon.`, { file: lexicon, line, column: 1 }));
  };
  const records = csvRecords(await readFile(path, "utf8"));
  const header = records[0] ?? [];
  if (header.join(",") !== STRESS_REPORT_COLUMNS.join(",")) fail(`${STRESS_REPORT} does not start with its header (${STRESS_REPORT_COLUMNS.join(",")}).`);
  const rows = records.slice(1);
  if (rows.length !== expected) fail(`The run found ${expected} stress problem${expected === 1 ? "" : "s"} but ${STRESS_REPORT} holds ${rows.length}.`);
  const wordOf = new Map<number, string>(input.lines.map((l, i) => [l, input.words[i]!]));
  const rejected = new Set(rejectLines);
  const at = { line: STRESS_REPORT_COLUMNS.indexOf("line"), word: STRESS_REPORT_COLUMNS.indexOf("word") };
  for (const r of rows) {
    const line = Number(r[at.line]);
    const word = wordOf.get(line);
    if (word === undefined || rejected.has(line)) {
      fail(`${STRESS_REPORT} names line ${r[at.line]}, which is not an entry of the lexicon.`, word === undefined ? 1 : line);
      break;
    }
    if (word !== r[at.word]) {
      fail(`${STRESS_REPORT} gives line ${line} the word '${r[at.word]}', but that line holds '${word}'.`, line);
      break;
    }
  }
  return out;
}
