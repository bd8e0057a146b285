// The up-front check that every output format can hold an entry: an entry one format cannot write
// (a character XML 1.0 forbids, for PLS) becomes a reject before any format writes it, so the
// TSV, the JSON Lines and the PLS of a run always hold the same entries.

import { plsTextProblem } from "../emit/pls.js";
import type { Transcription } from "./engine.js";
import type { LexiconRow, RejectedRow } from "./read.js";

/**
 * The reject for a row whose word or narrow forms cannot be written in every format, or undefined.
 * The word first, then the narrow form, then the variants; nothing is made for a row without a
 * problem (this runs for every entry of a build).
 */
export function unwritableEntry(row: LexiconRow, t: Transcription): RejectedRow | undefined {
  return unwritableWord(row) ?? unwritableForm(row, t.narrow) ?? firstUnwritable(row, t.variants);
}

/** `unwritableEntry` of an entry with these narrow forms (the preferred first). */
export function unwritableForms(row: LexiconRow, forms: readonly string[]): RejectedRow | undefined {
  return unwritableWord(row) ?? firstUnwritable(row, forms);
}

function firstUnwritable(row: LexiconRow, forms: readonly string[]): RejectedRow | undefined {
  for (const form of forms) {
    const r = unwritableForm(row, form);
    if (r !== undefined) return r;
  }
  return undefined;
}

function unwritableWord(row: LexiconRow): RejectedRow | undefined {
  const w = plsTextProblem(row.word);
  return w === undefined ? undefined : reject(row, 1, w.code, `The word ${w.reason}`);
}

function unwritableForm(row: LexiconRow, form: string): RejectedRow | undefined {
  const p = plsTextProblem(form);
  return p === undefined ? undefined : reject(row, row.pronColumn, p.code, `The narrow form '${form}' ${p.reason}`);
}

const reject = (row: LexiconRow, column: number, code: string, reason: string): RejectedRow => ({
  kind: "reject", file: row.file, line: row.line, column, code, raw: `${row.word},${row.pron}`,
  reason: `${reason}; the entry is left out of every output.`,
});
