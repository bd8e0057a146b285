// Reading the inventory's CSV files (csv-parse) while keeping the line and column of every cell,
// so that each complaint about a value can point at it. Comments start with '#'; blank lines are skipped.

import { parse } from "csv-parse/sync";
import { diagnostic, type Diagnostic } from "../diagnostics.js";

export interface CsvRow {
  /** Cells, trimmed of surrounding spaces. */
  readonly cells: readonly string[];
  /** 1-based line of the row's first character. */
  readonly line: number;
  /** 1-based column (in code points) of each cell's first non-space character. */
  readonly columns: readonly number[];
}

interface ParsedRecord {
  readonly record: string[];
  readonly info: { readonly lines: number };
}

/** Start columns (1-based, code points) of the comma-separated fields of one source line. */
function fieldColumns(lineText: string): number[] {
  const cps = Array.from(lineText);
  const cols: number[] = [];
  let start = 0;
  let inQuotes = false;
  const firstNonSpace = (from: number): number => {
    let k = from;
    while (k < cps.length && (cps[k] === " " || cps[k] === "\t")) k++;
    return k + 1;
  };
  for (let k = 0; k < cps.length; k++) {
    const c = cps[k];
    if (c === '"') inQuotes = !inQuotes;
    else if (!inQuotes && c === "#") break;
    else if (!inQuotes && c === ",") {
      cols.push(firstNonSpace(start));
      start = k + 1;
    }
  }
  cols.push(firstNonSpace(start));
  return cols;
}

/**
 * Parses CSV text into positioned rows. Syntax errors (an unclosed quote) become one
 * diagnostic with the line csv-parse reports; rows read before it are kept.
 */
export function readCsv(text: string, file: string, codePrefix: string): { rows: CsvRow[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  // One line break per line end (CR LF, LF or a lone CR: src/lines.ts), so that the lines counted
  // here are the lines diagnostics show.
  text = text.replace(/\r\n?/g, "\n");
  const lines = text.split(/\r?\n/);
  let records: ParsedRecord[] = [];
  try {
    records = parse(text, {
      bom: true,
      comment: "#",
      relax_column_count: true,
      skip_empty_lines: true,
      trim: true,
      info: true,
    }) as unknown as ParsedRecord[];
  } catch (e) {
    const err = e as { message?: string; lines?: number; code?: string };
    const line = typeof err.lines === "number" && err.lines > 0 ? err.lines : 1;
    const msg = (err.message ?? "unreadable CSV").replace(/\s*at line \d+.*$/, "");
    diagnostics.push(diagnostic("error", `${codePrefix}/csv-syntax`, `This is not valid CSV: ${msg}.`, { file, line, column: 1 }));
    return { rows: [], diagnostics };
  }
  const rows: CsvRow[] = [];
  for (const r of records) {
    const cells = r.record.map((c) => c.trim());
    if (cells.every((c) => c === "")) continue; // a line holding only spaces before a comment
    const embedded = r.record.reduce((n, c) => n + (c.match(/\n/g)?.length ?? 0), 0);
    const line = Math.max(1, r.info.lines - embedded);
    const cols = fieldColumns(lines[line - 1] ?? "");
    const columns = cells.map((_, k) => cols[k] ?? cols[cols.length - 1] ?? 1);
    rows.push({ cells, line, columns });
  }
  return { rows, diagnostics };
}
