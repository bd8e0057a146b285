// The TSV output: one line per pronunciation with the word, its narrow IPA and its syllabified broad form.
// Fields are escaped so that a line never contains a stray tab or line break (see `escapeTsvField`).

/** One output line of the TSV file. */
export interface TsvEntry {
  /** The entry key (the `id` column, or word#index). */
  readonly key: string;
  /** The spelling, NFC. */
  readonly word: string;
  /** Narrow IPA with stress marks and syllable dots (what the IPA writer produced). */
  readonly narrow: string;
  /** The broad (input) form after syllabification, with stress marks and syllable dots. */
  readonly broad: string;
}

export const TSV_COLUMNS = ["key", "word", "narrow", "broad"] as const;

/**
 * Escapes one field deterministically and reversibly:
 * backslash → `\\`, tab → `\t`, line feed → `\n`, carriage return → `\r` (two characters each).
 * Every other character, including non-ASCII, is written as itself (UTF-8, NFC as given).
 * This is the usual backslash convention of tab-separated files (common practice, no source).
 */
export function escapeTsvField(value: string): string {
  if (!/[\\\t\n\r]/.test(value)) return value;
  return value.replace(/[\\\t\n\r]/g, (c) => (c === "\\" ? "\\\\" : c === "\t" ? "\\t" : c === "\n" ? "\\n" : "\\r"));
}

/** The inverse of `escapeTsvField` (for readers of our TSV and for round-trip tests). */
export function unescapeTsvField(value: string): string {
  return value.replace(/\\([\\tnr])/g, (_m, c: string) => (c === "\\" ? "\\" : c === "t" ? "\t" : c === "n" ? "\n" : "\r"));
}

/** The header line, LF-terminated. */
export function tsvHeader(): string {
  return TSV_COLUMNS.join("\t") + "\n";
}

/** Any row of fields as one LF-terminated line. */
export function tsvLine(fields: readonly string[]): string {
  return fields.map(escapeTsvField).join("\t") + "\n";
}

/** One entry as one LF-terminated line, columns in `TSV_COLUMNS` order. */
export function formatTsvEntry(e: TsvEntry): string {
  return tsvLine([e.key, e.word, e.narrow, e.broad]);
}
