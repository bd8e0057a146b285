// The lexicon CSV reader: streams rows (word, IPA pronunciation with stress marks, optional id, pos,
// tags, note) into symbol strings for the runner, and every row it cannot read into a positioned reject.

import { createReadStream } from "node:fs";
import type { Readable } from "node:stream";
import { StringDecoder } from "node:string_decoder";
import { parse as parseSync } from "csv-parse/sync";
import { diagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { tokenise } from "../inventory/index.js";
import type { Bundle, FeatureValue, Inventory, PronToken } from "../inventory/types.js";
import { SYLLABLE_EDGE, WORD_EDGE, segment } from "../interp/types.js";
import type { Sym, Word } from "../interp/types.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { csvLine } from "../emit/csv.js";
import { pronReader } from "./pron.js";

/*
 * The file format:
 * - UTF-8, with or without a byte-order mark; lines end in LF or CRLF.
 * - A line whose very first character is `#` is a comment; a line of only white space is blank.
 *   Both are skipped. `#` anywhere else is data (in a pronunciation it is the word break of a
 *   phrase), so a word that itself starts with `#` must be quoted.
 * - The first other line is the header. `word` and `pron` are required; `id`, `pos`, `tags` and
 *   `note` are optional; any other column is kept out of the rows with a warning.
 * - Every other line is one row (RFC 4180 fields: comma-separated, `"`-quoted with `""` for a quote;
 *   a `"` inside an unquoted field is an ordinary character). A record is one physical line: a
 *   quoted field cannot span lines, so a broken quote costs one row, never the rest of the file.
 * - Several rows with the same word are that word's alternative pronunciations, in file order.
 */

/** The columns the reader knows. */
export const LEXICON_COLUMNS = ["word", "pron", "id", "pos", "tags", "note"] as const;
export type LexiconColumn = (typeof LEXICON_COLUMNS)[number];

/** One row read. */
export interface LexiconRow {
  readonly kind: "row";
  readonly file: string;
  /** 1-based physical line of the row. */
  readonly line: number;
  /** The spelling, trimmed, NFC. */
  readonly word: string;
  /** The pronunciation exactly as written. */
  readonly pron: string;
  /** 1-based column (code points) where the pronunciation field's text starts on its line. */
  readonly pronColumn: number;
  readonly id?: string;
  readonly pos?: string;
  /** The `tags` field split at white space, commas and semicolons. */
  readonly tags: readonly string[];
  readonly note?: string;
  /**
   * The pronunciation as symbols (segments, `.` syllable and `#` word boundaries between words of a
   * phrase), without the outer `#` … `#` the runner adds. Stress marks are on the nuclei as the
   * prosodic features (DEVELOPERS.md, "The string every stage sees").
   */
  readonly symbols: Word;
  /** Whether the pronunciation had any stress mark (if not, every nucleus is [0stress 0primary]). */
  readonly stressMarked: boolean;
}

/** One row that could not be read, with the reason and where. */
export interface RejectedRow {
  readonly kind: "reject";
  readonly file: string;
  readonly line: number;
  readonly column: number;
  /** Stable code, e.g. "lexicon/empty-pron", "ipa/unknown-symbol". */
  readonly code: string;
  readonly reason: string;
  /** The whole physical line as read (no line break; the BOM removed on line 1). */
  readonly raw: string;
}

export type LexiconItem = LexiconRow | RejectedRow;

/** Counts of one read; final once iteration has finished. */
export interface ReadStats {
  /** Physical lines in the file. */
  lines: number;
  blankLines: number;
  commentLines: number;
  /** Line of the header, 0 if none was found. */
  headerLine: number;
  /** Lines after the header that hold data: always rows + rejects once reading has finished. */
  dataLines: number;
  rows: number;
  rejects: number;
  /** Most physical lines held in memory at once (bounded by stream buffers, not by file size). */
  maxInFlight: number;
}

export interface ReadOptions {
  /** The inventory whose tokeniser reads the pronunciations. */
  readonly inventory: Inventory;
  /** The name used in positions when the source is a stream (default "<stdin>"). */
  readonly file?: string;
}

/** An async iterable of rows and rejects, in line order, with file-level diagnostics and counts. */
export interface LexiconReader extends AsyncIterable<LexiconItem> {
  /** The same items, a batch per input chunk (one asynchronous step per batch: the fast way to consume a large file). */
  batches(): AsyncIterable<LexiconItem[]>;
  /** File-level problems: unreadable file, header errors (reading stops), unknown columns (warnings). */
  readonly diagnostics: readonly Diagnostic[];
  readonly stats: Readonly<ReadStats>;
}

/** A reject as a Diagnostic (for rendering with a caret). */
export const rejectDiagnostic = (r: RejectedRow): Diagnostic =>
  diagnostic("error", r.code, r.reason, { file: r.file, line: r.line, column: r.column });

// ---------------------------------------------------------------------------------------------
// Physical lines and quoting

interface LineInfo {
  readonly line: number;
  readonly raw: string;
  /** Per field: 1-based column of the first character of its value, and whether it was quoted. */
  readonly fields: readonly { readonly column: number; readonly quoted: boolean }[];
}

type QuoteCheck =
  | { readonly ok: true; readonly fields: LineInfo["fields"] }
  | { readonly ok: false; readonly column: number; readonly code: string; readonly reason: string };

/**
 * Checks one line against RFC 4180 §2 quoting (as csv-parse reads it with `relax_quotes`), and finds
 * where each field's value starts. Columns count code points from 1.
 */
export function checkQuoting(raw: string): QuoteCheck {
  // Scan UTF-16 units; columns are code points, so count surrogate pairs once (only when there are any).
  const col = /[\ud800-\udfff]/.test(raw) ? (i: number): number => Array.from(raw.slice(0, i)).length + 1 : (i: number): number => i + 1;
  const QUOTE = 34;
  const COMMA = 44;
  const n = raw.length;
  const fields: { column: number; quoted: boolean }[] = [];
  let i = 0;
  for (;;) {
    if (raw.charCodeAt(i) === QUOTE) {
      const open = i;
      fields.push({ column: col(i) + 1, quoted: true });
      i++;
      for (;;) {
        if (i >= n) {
          const c = col(open);
          return { ok: false, column: c, code: "lexicon/unclosed-quote", reason: `The quoted field that starts at column ${c} is not closed on this line (a field cannot span lines).` };
        }
        if (raw.charCodeAt(i) === QUOTE) {
          if (raw.charCodeAt(i + 1) === QUOTE) {
            i += 2;
            continue;
          }
          i++;
          break;
        }
        i++;
      }
      if (i < n && raw.charCodeAt(i) !== COMMA) {
        const ch = String.fromCodePoint(raw.codePointAt(i)!);
        return { ok: false, column: col(i), code: "lexicon/text-after-quote", reason: `Unexpected '${ch}' after the closing quote of a field; write a quote inside a quoted field as "".` };
      }
    } else {
      fields.push({ column: col(i), quoted: false });
      const comma = raw.indexOf(",", i);
      i = comma < 0 ? n : comma;
    }
    if (i >= n) return { ok: true, fields };
    i++; // the comma
    if (i === n) {
      fields.push({ column: col(i), quoted: false });
      return { ok: true, fields };
    }
  }
}

/**
 * The column (1-based) on the physical line of the character at code-point `offset` of a field's
 * value: inside a quoted field every `""` before it counts two columns.
 */
function columnInField(raw: string, field: { column: number; quoted: boolean }, offset: number): number {
  if (!field.quoted) return field.column + offset;
  const cps = Array.from(raw);
  let col = field.column;
  for (let k = 0; k < offset; k++) col += cps[col - 1] === '"' ? 2 : 1;
  return col;
}

/** Text chunks of the source, decoded as UTF-8 (a multi-byte character split across chunks is kept whole). */
async function* textChunks(source: NodeJS.ReadableStream): AsyncGenerator<string> {
  const decoder = new StringDecoder("utf8");
  for await (const chunk of source as AsyncIterable<string | Buffer>) {
    const s = typeof chunk === "string" ? chunk : decoder.write(chunk);
    if (s !== "") yield s;
  }
  const rest = decoder.end();
  if (rest !== "") yield rest;
}

/** Lines handed on in one batch at most (bounds the lines in flight; larger batches mean fewer asynchronous steps). */
const BATCH_LINES = 256;

/**
 * Physical lines, in batches (the complete lines of one input chunk, at most BATCH_LINES each):
 * split at LF, a CR before the LF dropped, the BOM removed from line 1.
 */
async function* physicalLines(chunks: AsyncIterable<string>): AsyncGenerator<string[]> {
  let carry = "";
  let first = true;
  for await (const chunk of chunks) {
    let text = carry + chunk;
    if (first && text.length > 0) {
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
      first = false;
    }
    let start = 0;
    let batch: string[] = [];
    for (;;) {
      const nl = text.indexOf("\n", start);
      if (nl < 0) break;
      const end = nl > start && text.charCodeAt(nl - 1) === 13 ? nl - 1 : nl;
      batch.push(text.slice(start, end));
      if (batch.length === BATCH_LINES) {
        yield batch;
        batch = [];
      }
      start = nl + 1;
    }
    if (batch.length > 0) yield batch;
    carry = text.slice(start);
  }
  if (carry !== "") yield [carry.endsWith("\r") ? carry.slice(0, -1) : carry];
}

// ---------------------------------------------------------------------------------------------
// Stress marks → prosodic features

type StressResult =
  | { readonly ok: true; readonly symbols: Word; readonly marked: boolean }
  | { readonly ok: false; readonly column: number; readonly code: string; readonly reason: string };

/**
 * Turns tokens into symbols. A stress mark sets [+stress +primary] (ˈ) or [+stress -primary] (ˌ) on
 * the next nucleus ([+syllabic] segment) of the same word; if the pronunciation has any mark, every
 * other nucleus is [-stress -primary]; with no mark every nucleus keeps [0stress 0primary]
 * (DEVELOPERS.md, "The string every stage sees"). `column` of a failure is an offset-free column.
 */
export function applyStress(inv: Inventory, tokens: readonly PronToken[]): StressResult {
  const syllabic = inv.featureIndex.get("syllabic");
  const stressF = inv.featureIndex.get("stress");
  const primaryF = inv.featureIndex.get("primary");
  if (syllabic === undefined || stressF === undefined || primaryF === undefined) {
    const missing = syllabic === undefined ? "syllabic" : stressF === undefined ? "stress" : "primary";
    return { ok: false, column: tokens[0]?.column ?? 1, code: "lexicon/no-feature", reason: `The inventory has no feature '${missing}', needed to place stress.` };
  }
  const marked = tokens.some((t) => t.kind === "stress");
  const out: Sym[] = [];
  let pending: { level: "primary" | "secondary"; column: number } | undefined;
  let wordHasSegment = false;
  let lastWordBreak: number | undefined;
  const withStress = (b: Bundle, s: FeatureValue, p: FeatureValue): Bundle => {
    if (b[stressF] === s && b[primaryF] === p) return b;
    const c = b.slice();
    c[stressF] = s;
    c[primaryF] = p;
    return c;
  };
  for (const t of tokens) {
    switch (t.kind) {
      case "stress":
        if (pending !== undefined) {
          return { ok: false, column: t.column, code: "lexicon/double-stress", reason: `A second stress mark before the vowel that the mark at column ${pending.column} already stresses.` };
        }
        pending = { level: t.level, column: t.column };
        break;
      case "segment": {
        wordHasSegment = true;
        let b = t.bundle;
        if (b[syllabic] === "+") {
          if (pending !== undefined) b = withStress(b, "+", pending.level === "primary" ? "+" : "-");
          else if (marked) b = withStress(b, "-", "-");
          pending = undefined;
        }
        out.push(segment(b));
        break;
      }
      case "syllable":
        out.push(SYLLABLE_EDGE);
        break;
      case "word":
        if (pending !== undefined) return noVowel(pending);
        if (!wordHasSegment) {
          return { ok: false, column: t.column, code: "lexicon/empty-phrase-word", reason: "A word break '#' must stand between two words of a phrase." };
        }
        wordHasSegment = false;
        lastWordBreak = t.column;
        out.push(WORD_EDGE);
        break;
      default: {
        const never: never = t;
        return never;
      }
    }
  }
  if (pending !== undefined) return noVowel(pending);
  if (!wordHasSegment && lastWordBreak !== undefined) {
    return { ok: false, column: lastWordBreak, code: "lexicon/empty-phrase-word", reason: "A word break '#' must stand between two words of a phrase." };
  }
  return { ok: true, symbols: out, marked };
}

const noVowel = (p: { level: string; column: number }): StressResult => ({
  ok: false,
  column: p.column,
  code: "lexicon/stress-without-vowel",
  reason: `The ${p.level} stress mark is not followed by a vowel (a [+syllabic] segment) in the same word.`,
});

// ---------------------------------------------------------------------------------------------
// The reader

/**
 * Reads a lexicon CSV file (or stream) row by row. Streams in batches of lines; memory does not grow with
 * the number of rows. Every data line ends up as exactly one LexiconRow or RejectedRow, in line order.
 * A file-level error (unreadable file, no header, missing `word`/`pron` column) is put in
 * `diagnostics` and ends the iteration.
 */
export function readLexicon(source: string | NodeJS.ReadableStream, opts: ReadOptions): LexiconReader {
  const file = typeof source === "string" ? source : (opts.file ?? "<stdin>");
  const diagnostics: Diagnostic[] = [];
  const stats: ReadStats = { lines: 0, blankLines: 0, commentLines: 0, headerLine: 0, dataLines: 0, rows: 0, rejects: 0, maxInFlight: 0 };
  const inv = opts.inventory;

  /**
   * The items of each input chunk's complete lines, in line order. Every line is handled in one
   * synchronous pass (comment, blank, header, encoding and quoting checks, fields, row), so the
   * consumer pays one asynchronous step per batch, not per row.
   */
  async function* batches(): AsyncGenerator<LexiconItem[]> {
    let stream: NodeJS.ReadableStream;
    if (typeof source === "string") {
      const s = createReadStream(source, { highWaterMark: 1 << 16 });
      const opened = await new Promise<Error | undefined>((resolve) => {
        s.once("open", () => resolve(undefined));
        s.once("error", (e) => resolve(e));
      });
      if (opened !== undefined) {
        const code = (opened as NodeJS.ErrnoException).code;
        const why = code === "ENOENT" ? "there is no such file" : code === "EISDIR" ? "it is a folder" : opened.message;
        diagnostics.push(diagnostic("error", "lexicon/unreadable", `Cannot read the lexicon: ${why}.`, { file, line: 1, column: 1 }));
        return;
      }
      stream = s;
    } else {
      stream = source;
    }

    let headerPending = true;
    let header: Map<LexiconColumn, number> | undefined;
    let headerFields = 0;
    let fatal: Diagnostic | undefined;
    let readError: Error | undefined;
    let stop = false;

    const reject = (line: number, column: number, code: string, reason: string, raw: string): RejectedRow => ({
      kind: "reject", file, line, column, code, reason, raw,
    });
    const count = (item: LexiconItem): LexiconItem => {
      if (item.kind === "row") stats.rows++;
      else stats.rejects++;
      return item;
    };

    const lines = physicalLines(textChunks(stream));
    try {
      for (;;) {
        let batch: string[];
        try {
          const r = await lines.next();
          if (r.done) break;
          batch = r.value;
        } catch (e) {
          readError = e as Error;
          break;
        }
        if (batch.length > stats.maxInFlight) stats.maxInFlight = batch.length;
        const items: LexiconItem[] = [];
        for (const raw of batch) {
          const line = ++stats.lines;
          if (raw.startsWith("#")) {
            stats.commentLines++;
            continue;
          }
          if (raw.trim() === "") {
            stats.blankLines++;
            continue;
          }
          const q = checkQuoting(raw);
          if (headerPending) {
            headerPending = false;
            stats.headerLine = line;
            const cr = raw.indexOf("\r");
            if (cr >= 0) {
              fatal = diagnostic("error", "lexicon/cr-line-ends", "The lines of this file end in a bare carriage return (CR); Strata reads lines that end in LF or CRLF.", { file, line, column: Array.from(raw.slice(0, cr)).length + 1 });
              stop = true;
              break;
            }
            if (!q.ok) {
              fatal = diagnostic("error", q.code, `The header line cannot be read: ${q.reason}`, { file, line, column: q.column });
              stop = true;
              break;
            }
          } else {
            stats.dataLines++;
            const bad = raw.indexOf("\ufffd");
            if (bad >= 0) {
              items.push(count(reject(line, Array.from(raw.slice(0, bad)).length + 1, "lexicon/bad-encoding", "This line is not valid UTF-8 (U+FFFD stands for bytes that could not be decoded).", raw)));
              continue;
            }
            if (!q.ok) {
              items.push(count(reject(line, q.column, q.code, q.reason, raw)));
              continue;
            }
          }
          const info: LineInfo = { line, raw, fields: q.ok ? q.fields : [] };
          const parsed = lineFields(raw);
          if (!parsed.ok) {
            if (header === undefined) continue; // cannot happen: the header passed the quoting check
            items.push(count(reject(line, 1, "lexicon/csv", parsed.reason, raw)));
            continue;
          }
          if (header === undefined) {
            const h = readHeader(parsed.fields, info, file, diagnostics);
            if (h === undefined) {
              stop = true;
              break;
            }
            header = h;
            headerFields = parsed.fields.length;
            continue;
          }
          items.push(count(readRow(inv, file, info, parsed.fields, header, headerFields)));
        }
        if (items.length > 0) yield items;
        if (stop) break;
      }
      if (fatal !== undefined) {
        diagnostics.push(fatal);
        return;
      }
      if (stop) return;
      if (readError !== undefined) {
        diagnostics.push(diagnostic("error", "lexicon/unreadable", `Reading the lexicon failed: ${readError.message}.`, { file, line: stats.lines + 1, column: 1 }));
        return;
      }
      if (header === undefined) {
        diagnostics.push(diagnostic("error", "lexicon/no-header", "The lexicon has no header line (expected at least the columns word and pron).", { file, line: 1, column: 1 }));
      }
    } finally {
      await lines.return(undefined);
      if (typeof source === "string") (stream as unknown as Readable).destroy();
    }
  }

  async function* iterate(): AsyncGenerator<LexiconItem> {
    for await (const items of batches()) yield* items;
  }

  return {
    diagnostics,
    stats,
    batches,
    [Symbol.asyncIterator]: () => iterate(),
  };
}

/** csv-parse's reading of one line, the way the reader has always called it (one record per line). */
const CSV_OPTIONS = {
  record_delimiter: "\n",
  relax_quotes: true,
  relax_column_count: true,
  skip_empty_lines: true,
} as const;

/**
 * The fields of one physical line, exactly as csv-parse reads it (RFC 4180 with relaxed quotes).
 * A line with no quote and no carriage return is split at its commas (what csv-parse does with such
 * a line; tests/lexicon/read-fields.test.ts checks it against csv-parse); any other line is given to
 * csv-parse itself.
 */
export function lineFields(raw: string): { readonly ok: true; readonly fields: readonly string[] } | { readonly ok: false; readonly reason: string } {
  if (raw.indexOf('"') < 0 && raw.indexOf("\r") < 0) return { ok: true, fields: raw.split(",") };
  let records: string[][];
  try {
    records = parseSync(raw + "\n", CSV_OPTIONS) as string[][];
  } catch (e) {
    return { ok: false, reason: `This line cannot be read as CSV: ${(e as Error).message}.` };
  }
  if (records.length !== 1) return { ok: false, reason: "This line could not be read as a CSV record." };
  return { ok: true, fields: records[0]! };
}

/** Reads the header record; returns the column map, or undefined after adding an error. */
function readHeader(fields: readonly string[], info: LineInfo, file: string, out: Diagnostic[]): Map<LexiconColumn, number> | undefined {
  const map = new Map<LexiconColumn, number>();
  let ok = true;
  fields.forEach((f, i) => {
    const name = f.trim().toLowerCase();
    const column = info.fields[i]?.column ?? 1;
    const where = { file, line: info.line, column, length: Math.max(1, Array.from(f).length) };
    if ((LEXICON_COLUMNS as readonly string[]).includes(name)) {
      const col = name as LexiconColumn;
      if (map.has(col)) {
        out.push(diagnostic("error", "lexicon/duplicate-column", `The column '${name}' appears twice in the header.`, where));
        ok = false;
      } else {
        map.set(col, i);
      }
    } else {
      out.push(diagnostic("warning", "lexicon/unknown-column", `Unknown column '${f.trim()}' is ignored (known: ${LEXICON_COLUMNS.join(", ")}).`, where));
    }
  });
  for (const req of ["word", "pron"] as const) {
    if (!map.has(req)) {
      out.push(diagnostic("error", "lexicon/missing-column", `The header has no '${req}' column (required: word, pron).`, { file, line: info.line, column: 1 }));
      ok = false;
    }
  }
  return ok ? map : undefined;
}

function readRow(
  inv: Inventory,
  file: string,
  info: LineInfo,
  fields: readonly string[],
  header: ReadonlyMap<LexiconColumn, number>,
  headerFields: number,
): LexiconItem {
  const reject = (column: number, code: string, reason: string): RejectedRow => ({ kind: "reject", file, line: info.line, column, code, reason, raw: info.raw });
  if (fields.length > headerFields) {
    const col = info.fields[headerFields]?.column ?? 1;
    return reject(col, "lexicon/extra-fields", `This row has ${fields.length} fields but the header has ${headerFields}.`);
  }
  const get = (c: LexiconColumn): string | undefined => {
    const i = header.get(c);
    return i === undefined ? undefined : fields[i];
  };
  const colOf = (c: LexiconColumn): number => {
    const i = header.get(c);
    return (i !== undefined ? info.fields[i]?.column : undefined) ?? Array.from(info.raw).length + 1;
  };
  const word = (get("word") ?? "").trim().normalize("NFC");
  if (word === "") return reject(colOf("word"), "lexicon/empty-word", "The word is empty.");
  const pron = get("pron") ?? "";
  const pronIndex = header.get("pron")!;
  const pronField = info.fields[pronIndex] ?? { column: colOf("pron"), quoted: false };
  if (pron.trim() === "") return reject(pronField.column, "lexicon/empty-pron", `The pronunciation of '${word}' is empty.`);

  // The memoising fast path (lexicon/pron.ts) for the common case; every other case, errors included, below.
  let s: { readonly symbols: Word; readonly marked: boolean } | undefined = pronReader(inv).read(pron);
  if (s === undefined) {
    const t = tokenise(inv, pron, { file, line: info.line, column: pronField.column });
    if (!t.ok) {
      return reject(columnInField(info.raw, pronField, t.error.column - pronField.column), t.error.code, t.error.message);
    }
    const r = applyStress(inv, t.tokens);
    if (!r.ok) return reject(columnInField(info.raw, pronField, r.column - pronField.column), r.code, r.reason);
    s = r;
  }

  const opt = (c: LexiconColumn): string | undefined => {
    const v = get(c)?.trim();
    return v === undefined || v === "" ? undefined : v;
  };
  const row: LexiconRow = {
    kind: "row",
    file,
    line: info.line,
    word,
    pron,
    pronColumn: pronField.column,
    tags: (get("tags") ?? "").split(/[\s,;]+/u).filter((x) => x !== ""),
    symbols: s.symbols,
    stressMarked: s.marked,
    ...optional("id", opt("id")),
    ...optional("pos", opt("pos")),
    ...optional("note", opt("note")),
  };
  return row;
}

const optional = <K extends string>(k: K, v: string | undefined): { [P in K]?: string } =>
  (v === undefined ? {} : { [k]: v }) as { [P in K]?: string };

// ---------------------------------------------------------------------------------------------
// Rejects file

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
