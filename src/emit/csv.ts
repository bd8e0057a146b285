// Writing CSV records that Strata's own lexicon reader (and any RFC 4180 reader) reads back unchanged.
// The quoting is csv-stringify's (the writing half of the csv-parse family the reader uses).

import { stringify, type Options } from "csv-stringify/sync";

/*
 * RFC 4180 §2: a field holding a comma, a double quote or a line break is enclosed in double quotes
 * and a double quote inside is doubled (csv-stringify does this by itself). Strata also quotes a
 * field that starts with `#` (an unquoted `#` at the start of a line marks a comment line for our
 * reader), and one with a space or tab at either end (so no reader trims it). Empty fields stay empty.
 */
const QUOTED_MATCH = [/^#/, /^[ \t]|[ \t]$/, /\r/];
const OPTIONS: Options = { record_delimiter: "\n", quoted_match: QUOTED_MATCH };

/** One field as it appears in a record. */
export function csvField(value: string): string {
  return csvLine([value]).slice(0, -1);
}

/** Whether csv-stringify quotes `field` under OPTIONS: it holds the delimiter, a quote or LF, or matches QUOTED_MATCH. */
function needsQuotes(field: string): boolean {
  const n = field.length;
  if (n === 0) return false;
  // QUOTED_MATCH, written out: '#' first, a space or tab at either end, a CR anywhere.
  const first = field.charCodeAt(0);
  const last = field.charCodeAt(n - 1);
  if (first === 35 || first === 32 || first === 9 || last === 32 || last === 9) return true;
  for (let i = 0; i < n; i++) {
    const c = field.charCodeAt(i);
    if (c === 44 || c === 34 || c === 10 || c === 13) return true;
  }
  return false;
}

/** One record, terminated by LF. */
export function csvLine(fields: readonly string[]): string {
  // csv-stringify's output, without its per-call setup (about 10 µs a record): the fields joined,
  // each one that needs quotes in double quotes with every double quote inside doubled
  // (tests/emit/lines.test.ts compares the two on random records).
  return fields.some(needsQuotes) ? fields.map((f) => (needsQuotes(f) ? `"${f.replace(/"/g, '""')}"` : f)).join(",") + "\n" : fields.join(",") + "\n";
}

/** `csvLine` without its shortcut: csv-stringify's output for every record (for tests). */
export function csvLineStringified(fields: readonly string[]): string {
  // csv-stringify writes a lone empty field as an empty line, exactly as wanted.
  return stringify([fields as string[]], OPTIONS);
}
