// The up-front check that every output format can hold an entry: an entry one format cannot write
// (a character XML 1.0 forbids, for PLS) becomes a reject before any format writes it, so the
// TSV, the JSON Lines and the PLS of a run always hold the same entries.

import { plsTextProblem } from "../emit/pls.js";
import type { Transcription } from "./engine.js";
import type { LexiconRow, RejectedRow } from "./read.js";

/** The reject for a row whose word or narrow forms cannot be written in every format, or undefined. */
export function unwritableEntry(row: LexiconRow, t: Transcription): RejectedRow | undefined {
  // The common case, without building a list of the forms: neither the word nor any form has a problem.
  if (plsTextProblem(row.word) === undefined && plsTextProblem(t.narrow) === undefined && t.variants.every((v) => plsTextProblem(v) === undefined)) return undefined;
  return unwritableForms(row, [t.narrow, ...t.variants]);
}

/** `unwritableEntry` of an entry with these narrow forms (the preferred first). */
export function unwritableForms(row: LexiconRow, forms: readonly string[]): RejectedRow | undefined {
  const reject = (column: number, code: string, reason: string): RejectedRow => ({
    kind: "reject", file: row.file, line: row.line, column, code, raw: `${row.word},${row.pron}`,
    reason: `${reason}; the entry is left out of every output.`,
  });
  const w = plsTextProblem(row.word);
  if (w !== undefined) return reject(1, w.code, `The word ${w.reason}`);
  for (const form of forms) {
    const p = plsTextProblem(form);
    if (p !== undefined) return reject(row.pronColumn, p.code, `The narrow form '${form}' ${p.reason}`);
  }
  return undefined;
}
