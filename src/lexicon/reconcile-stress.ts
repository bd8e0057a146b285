// The stress report read back before a variety's folder is swapped in: it must hold exactly the
// findings the run counted, each on a line of the lexicon that became an entry, holding that line's
// word (the input's own record count, lexicon/reconcile.ts, not the reader's).

import { readFile } from "node:fs/promises";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { csvRecords, type InputRecords } from "./reconcile.js";
import { STRESS_REPORT, STRESS_REPORT_COLUMNS } from "./hygiene.js";

/** An input file as the outputs name it (relative to the lexicon folder), with its own record count. */
export interface StressSource {
  readonly file: string;
  readonly input: InputRecords;
}

/**
 * Errors (code `run/unreconciled`) when the report at `path` does not hold `expected` records with
 * the agreed header, or a record names a line that is not an entry (not a record of its file, or
 * rejected or replaced: `notEntries`), or a word other than that line's. Records are told apart by
 * file and line (a variety with an override file has two inputs).
 */
export async function reconcileStressReport(lexicon: string, path: string, expected: number, sources: readonly StressSource[], notEntries: readonly { readonly file: string; readonly line: number }[]): Promise<Diagnostic[]> {
  const out: Diagnostic[] = [];
  const fail = (message: string, line = 1): void => {
    out.push(diagnostic("error", "run/unreconciled", `${message} This is a bug in Strata; please report it with the lexicon.`, { file: lexicon, line, column: 1 }));
  };
  const records = csvRecords(await readFile(path, "utf8"));
  const header = records[0] ?? [];
  if (header.join(",") !== STRESS_REPORT_COLUMNS.join(",")) fail(`${STRESS_REPORT} does not start with its header (${STRESS_REPORT_COLUMNS.join(",")}).`);
  const rows = records.slice(1);
  if (rows.length !== expected) fail(`The run found ${expected} stress problem${expected === 1 ? "" : "s"} but ${STRESS_REPORT} holds ${rows.length}.`);
  const tag = (file: string, line: number): string => `${file}\n${line}`;
  const wordOf = recordWords(sources);
  const excluded = new Set(notEntries.map((r) => tag(r.file, r.line)));
  const at = { file: STRESS_REPORT_COLUMNS.indexOf("file"), line: STRESS_REPORT_COLUMNS.indexOf("line"), word: STRESS_REPORT_COLUMNS.indexOf("word") };
  for (const r of rows) {
    const line = Number(r[at.line]);
    const t = tag(r[at.file] ?? "", line);
    const word = wordOf(r[at.file] ?? "", line);
    if (word === undefined || excluded.has(t)) {
      fail(`${STRESS_REPORT} names ${r[at.file]} line ${r[at.line]}, which is not an entry.`, word === undefined ? 1 : line);
      break;
    }
    if (word !== r[at.word]) {
      fail(`${STRESS_REPORT} gives ${r[at.file]} line ${line} the word '${r[at.word]}', but that line holds '${word}'.`, line);
      break;
    }
  }
  return out;
}

/**
 * The word of the record that starts on line `line` of file `file` among `sources` (a later source
 * naming the same file wins), or undefined when none does. The report names few lines, so each is
 * looked up on its own: by binary search in a source's lines (ascending, as `countInputRecords`
 * gives them), or through a map of every record for a source whose lines are not in order.
 */
function recordWords(sources: readonly StressSource[]): (file: string, line: number) => string | undefined {
  const finders = sources.map((s) => {
    const lines = s.input.lines;
    let ascending = true;
    for (let i = 1; i < lines.length && ascending; i++) ascending = lines[i - 1]! < lines[i]!;
    if (!ascending) {
      const byLine = new Map<number, string>();
      lines.forEach((l, i) => byLine.set(l, s.input.words[i]!));
      return (line: number): string | undefined => byLine.get(line);
    }
    return (line: number): string | undefined => {
      let lo = 0;
      let hi = lines.length - 1;
      while (lo <= hi) {
        const mid = (lo + hi) >> 1;
        const l = lines[mid]!;
        if (l === line) return s.input.words[mid]!;
        if (l < line) lo = mid + 1;
        else hi = mid - 1;
      }
      return undefined;
    };
  });
  return (file, line) => {
    for (let k = sources.length - 1; k >= 0; k--) {
      if (sources[k]!.file !== file) continue;
      const word = finders[k]!(line);
      if (word !== undefined) return word;
    }
    return undefined;
  };
}
