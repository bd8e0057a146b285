// The lexicon CSV reader: streams rows (word, IPA pronunciation with stress marks, optional id, pos,
// tags, note) into symbol strings for the runner, and every row it cannot read into a positioned reject.

import { Utf8Decoder } from "../files.js";
import { openFile } from "./open-file.js";
import { diagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { tokenise } from "../inventory/index.js";
import type { Inventory } from "../inventory/types.js";
import type { Word } from "../interp/types.js";
import { checkQuoting, columnInField, findForbidden } from "./fields.js";
import type { Field } from "./fields.js";
import { RecordSplitter } from "./records.js";
import type { SourceRecord } from "./records.js";
import { applyStress, unstressAll } from "./stress.js";
import { pronReader } from "./pron.js";
import { duplicateIdReason, plainColumns, readPlainRow, type PlainColumns } from "./row.js";

export { checkQuoting, columnInField, findForbidden } from "./fields.js";
export type { Field, FieldSpan, QuoteCheck } from "./fields.js";
export { applyStress } from "./stress.js";
export type { StressResult } from "./stress.js";
export { REJECT_COLUMNS, formatRejectLine, writeRejects } from "./rejects.js";
export { splitRecords, RecordSplitter } from "./records.js";
export type { SourceRecord, RecordKind } from "./records.js";

/*
 * The file format (README, "The lexicon file"):
 * - UTF-8, with or without a byte-order mark; lines end in CR LF, LF or a lone CR (src/lines.ts).
 * - Records: one per line, except that a lone CR inside a quoted field does not end the record
 *   (RFC 4180); an LF always does, so a broken quote costs one row, never the rest of the file
 *   (records.ts has the exact grammar).
 * - A line whose very first character is `#` is a comment; a line of only spaces and tabs is blank.
 *   Both are skipped. `#` anywhere else is data (in a pronunciation it is the word break of a
 *   phrase), so a word that itself starts with `#` must be quoted.
 * - The first other record is the header. `word` and `pron` are required; `id`, `pos`, `tags` and
 *   `note` are optional; any other column is kept out of the rows with a warning.
 * - Every other record is one row (RFC 4180 fields: comma-separated, `"`-quoted with `""` for a
 *   quote; a `"` inside an unquoted field is an ordinary character).
 * - No field holds a control character (tab excepted), a NUL, a byte-order mark, U+FFFD or a
 *   non-character (fields.ts): such a row is rejected at the character.
 * - Several rows with the same word are that word's alternative pronunciations, in file order.
 * - An `id`, when given, is unique in the file: a second row with the same id is rejected
 *   (`lexicon/duplicate-id`, naming the line of the first).
 * Every data record ends up as exactly one row or one reject, in file order.
 */

/** The tag (in the `tags` column) of a weak form: every vowel unstressed, no default stress. */
export const WEAK_TAG = "weak";

/** The columns the reader knows. */
export const LEXICON_COLUMNS = ["word", "pron", "id", "pos", "tags", "note"] as const;
export type LexiconColumn = (typeof LEXICON_COLUMNS)[number];

/** One row read. */
export interface LexiconRow {
  readonly kind: "row";
  readonly file: string;
  /** 1-based physical line the row starts on. */
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
  /** The whole record as read (no line end), for rejects made later (e.g. by the runner). */
  readonly raw: string;
  /**
   * Whether the pronunciation had any stress mark, or the row is tagged `weak` (if neither, every
   * nucleus is [0stress 0primary]; tagged `weak`, every nucleus is [-stress -primary]).
   */
  readonly stressMarked: boolean;
}

/** One row that could not be read, with the reason and where. */
export interface RejectedRow {
  readonly kind: "reject";
  readonly file: string;
  /** Line and column (1-based; columns count code points) of the problem. */
  readonly line: number;
  readonly column: number;
  /** Stable code, e.g. "lexicon/empty-pron", "ipa/unknown-symbol". */
  readonly code: string;
  readonly reason: string;
  /** The whole record as read (no line end; the BOM removed on line 1); it holds a CR only when one was inside a quoted field. */
  readonly raw: string;
}

export type LexiconItem = LexiconRow | RejectedRow;

/** Counts of one read; final once iteration has finished. */
export interface ReadStats {
  /** Physical lines in the file (src/lines.ts: CR LF, LF and a lone CR each end one). */
  lines: number;
  blankLines: number;
  commentLines: number;
  /** Line of the header, 0 if none was found. */
  headerLine: number;
  /**
   * Data records after the header (one per line, but a record with a CR inside a quoted field spans
   * two lines): always rows + rejects once reading has finished.
   */
  dataLines: number;
  rows: number;
  rejects: number;
  /** Most records held in memory at once (bounded by stream buffers, not by file size). */
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

/** Text chunks of the source, decoded as UTF-8 (a multi-byte character split across chunks is kept whole). */
async function* textChunks(source: NodeJS.ReadableStream | AsyncIterable<Buffer>): AsyncGenerator<string> {
  const decoder = new Utf8Decoder();
  for await (const chunk of source as AsyncIterable<string | Buffer>) {
    const s = typeof chunk === "string" ? chunk : decoder.write(chunk);
    if (s !== "") yield s;
  }
  const rest = decoder.end();
  if (rest !== "") yield rest;
}

/** The header as read: which field holds each known column, and how many fields it has. */
export interface HeaderColumns {
  readonly map: Map<LexiconColumn, number>;
  readonly fields: number;
}

/**
 * Where the ids of a file are remembered: `first` is asked of each row's id (in file order) and
 * answers the line of an earlier row with the same id, or undefined (the id is then remembered).
 */
export interface IdBook {
  first(id: string, line: number, column: number): number | undefined;
}

/** The ids of one streaming read. */
export const idBook = (): IdBook => {
  const ids = new Map<string, number>();
  return {
    first(id, line) {
      const first = ids.get(id);
      if (first === undefined) ids.set(id, line);
      return first;
    },
  };
};

export { duplicateIdReason } from "./row.js";

/** One record with its fields, as the row reader sees it. */
export interface LineInfo {
  readonly line: number;
  readonly raw: string;
  readonly fields: readonly Field[];
}

export { openFile, type OpenFile } from "./open-file.js";

/**
 * Reads a lexicon CSV file (or stream) row by row, streaming: memory does not grow with the number
 * of rows (ids are remembered, to find duplicates). Every data record ends up as exactly one
 * LexiconRow or RejectedRow, in file order. A file-level error (unreadable file, no header, a header
 * that cannot be read or lacks `word`/`pron`) is put in `diagnostics` (all of them) and ends the iteration.
 */
export function readLexicon(source: string | NodeJS.ReadableStream, opts: ReadOptions): LexiconReader {
  const file = typeof source === "string" ? source : (opts.file ?? "<stdin>");
  const diagnostics: Diagnostic[] = [];
  const stats: ReadStats = { lines: 0, blankLines: 0, commentLines: 0, headerLine: 0, dataLines: 0, rows: 0, rejects: 0, maxInFlight: 0 };
  const inv = opts.inventory;

  /**
   * The items of each input chunk's complete records, in file order: every record is handled
   * synchronously, so a consumer of batches pays one asynchronous step per chunk, not per row.
   */
  async function* batches(): AsyncGenerator<LexiconItem[]> {
    let stream: NodeJS.ReadableStream | AsyncIterable<Buffer>;
    let close = (): void => undefined;
    if (typeof source === "string") {
      const o = await openFile(source);
      if ("why" in o) {
        diagnostics.push(diagnostic("error", "lexicon/unreadable", `Cannot read the lexicon: ${o.why}.`, { file, line: 1, column: 1 }));
        return;
      }
      stream = o.chunks;
      close = o.close;
    } else {
      stream = source;
    }
    const splitter = new RecordSplitter();
    const taker = recordTaker(inv, file, stats, diagnostics, idBook());
    const take = (rec: SourceRecord): LexiconItem | undefined => taker.take(rec);
    const count = (item: LexiconItem): LexiconItem => {
      if (item.kind === "row") stats.rows++;
      else stats.rejects++;
      return item;
    };

    // A chunk's records become its items in this function, so that the generator, while it waits
    // at a yield, holds the items alone and not the records as well.
    const itemsOf = (recs: readonly SourceRecord[]): LexiconItem[] => {
      if (recs.length > stats.maxInFlight) stats.maxInFlight = recs.length;
      const items: LexiconItem[] = [];
      for (const rec of recs) {
        const item = take(rec);
        if (taker.headerFailed) break;
        if (item !== undefined) items.push(count(item));
      }
      return items;
    };

    try {
      for await (const chunk of textChunks(stream)) {
        const items = itemsOf(splitter.push(chunk));
        stats.lines = splitter.lines;
        if (items.length > 0) yield items;
        if (taker.headerFailed) return;
      }
      const items = itemsOf(splitter.end());
      if (items.length > 0) yield items;
      if (taker.headerFailed) return;
    } catch (e) {
      diagnostics.push(diagnostic("error", "lexicon/unreadable", `Reading the lexicon failed after line ${splitter.lines}: ${(e as Error).message}.`, { file, line: Math.max(1, splitter.lines), column: 1 }));
      return;
    } finally {
      stats.lines = splitter.lines;
      close();
    }
    if (taker.header === undefined) {
      diagnostics.push(diagnostic("error", "lexicon/no-header", "The lexicon has no header line (expected at least the columns word and pron).", { file, line: 1, column: 1 }));
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

/**
 * Turns records into items: comments and blank lines are counted, the first other record is the
 * header (`header`, or `headerFailed` with its errors in `diagnostics`), every later one a row or
 * a reject. `header`: the header already read (a chunk of the file after it, read-chunk.ts).
 */
export function recordTaker(inv: Inventory, file: string, stats: Pick<ReadStats, "commentLines" | "blankLines" | "headerLine" | "dataLines">, diagnostics: Diagnostic[], ids: IdBook, header?: HeaderColumns) {
  const reject = (line: number, column: number, code: string, reason: string, raw: string): RejectedRow => ({ kind: "reject", file, line, column, code, reason, raw });
  // The fast path's columns (row.ts), made once per header, and its field ends, kept between records.
  let plain: { readonly of: HeaderColumns; readonly cols: PlainColumns } | undefined;
  const ends: number[] = [];
  const t = {
    header,
    headerFailed: false,
    /** One record: a row or a reject for a data record, nothing otherwise (header, comment, blank). */
    take(rec: SourceRecord): LexiconItem | undefined {
      if (rec.kind === "comment") {
        stats.commentLines++;
        return undefined;
      }
      if (rec.kind === "blank") {
        stats.blankLines++;
        return undefined;
      }
      if (t.header === undefined) {
        stats.headerLine = rec.line;
        const h = readHeaderRecord(rec, file, diagnostics);
        if (h === undefined) t.headerFailed = true;
        else t.header = h;
        return undefined;
      }
      stats.dataLines++;
      if (plain?.of !== t.header) plain = { of: t.header, cols: plainColumns(t.header) };
      const fast = readPlainRow(inv, file, rec.line, rec.raw, plain.cols, ids, ends);
      if (fast !== undefined) return fast;
      const bad = findForbidden(rec.raw);
      if (bad !== undefined) return reject(rec.line, bad.column, bad.code, bad.reason, rec.raw);
      const q = checkQuoting(rec.raw);
      if (!q.ok) return reject(rec.line, q.column, q.code, q.reason, rec.raw);
      return readRow(inv, file, { line: rec.line, raw: rec.raw, fields: q.fields }, q.fields.map((f) => f.value), t.header.map, t.header.fields, ids);
    },
  };
  return t;
}

/** Reads the header record; returns the column map and field count, or undefined after adding every error found. */
export function readHeaderRecord(rec: SourceRecord, file: string, out: Diagnostic[]): HeaderColumns | undefined {
  const bad = findForbidden(rec.raw);
  if (bad !== undefined) {
    out.push(diagnostic("error", bad.code, `The header line cannot be read: ${bad.reason}`, { file, line: rec.line, column: bad.column }));
    return undefined;
  }
  const q = checkQuoting(rec.raw);
  if (!q.ok) {
    out.push(diagnostic("error", q.code, `The header line cannot be read: ${q.reason}`, { file, line: rec.line, column: q.column }));
    return undefined;
  }
  const map = readHeader(q.fields.map((f) => f.value), { line: rec.line, raw: rec.raw, fields: q.fields }, file, out);
  return map === undefined ? undefined : { map, fields: q.fields.length };
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

export function readRow(
  inv: Inventory,
  file: string,
  info: LineInfo,
  fields: readonly string[],
  header: ReadonlyMap<LexiconColumn, number>,
  headerFields: number,
  ids: IdBook,
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
  const id = get("id")?.trim();
  if (id !== undefined && id !== "") {
    const first = ids.first(id, info.line, colOf("id"));
    if (first !== undefined) return reject(colOf("id"), "lexicon/duplicate-id", duplicateIdReason(id, first));
  }
  const trimmed = (get("word") ?? "").trim();
  // ASCII is already NFC (Unicode normalisation leaves it unchanged): skip the normaliser for it.
  const word = ASCII.test(trimmed) ? trimmed : trimmed.normalize("NFC");
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
  const tags = splitTags(get("tags"));
  // The tag `weak`: a weak form, every vowel unstressed rather than given default stress.
  const weak = tags.includes(WEAK_TAG);
  if (weak && s.marked) {
    return reject(colOf("tags"), "lexicon/weak-with-stress", `'${word}' is tagged ${WEAK_TAG} (every vowel unstressed) but its pronunciation has stress marks.`);
  }

  const opt = (c: LexiconColumn): string | undefined => {
    const v = get(c)?.trim();
    return v === undefined || v === "" ? undefined : v;
  };
  const row: LexiconRow = {
    kind: "row",
    file,
    line: info.line,
    raw: info.raw,
    word,
    pron,
    pronColumn: pronField.column,
    tags,
    symbols: weak ? unstressAll(inv, s.symbols) : s.symbols,
    stressMarked: s.marked || weak,
    ...optional("id", opt("id")),
    ...optional("pos", opt("pos")),
    ...optional("note", opt("note")),
  };
  return row;
}

const ASCII = /^[\x00-\x7f]*$/;

/** The `tags` field split at white space, commas and semicolons (no field, or an empty one: no tags). */
const splitTags = (text: string | undefined): string[] =>
  text === undefined || text === "" ? [] : text.split(/[\s,;]+/u).filter((x) => x !== "");

const optional = <K extends string>(k: K, v: string | undefined): { [P in K]?: string } =>
  (v === undefined ? {} : { [k]: v }) as { [P in K]?: string };
