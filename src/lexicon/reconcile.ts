// Reconciliation from what was actually written: the input's records are counted here on their own
// (not by the reader), the written files are read back, and every input record must be exactly one
// entry or exactly one reject. A mismatch is an error (a bug in Strata), never a silent flag.

import { createReadStream } from "node:fs";
import { readFile } from "node:fs/promises";
import { StringDecoder } from "node:string_decoder";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { readBackJsonl, readBackTsv } from "./readback.js";

/** The data records of a lexicon file: how many, the 1-based line of each, and each one's word. */
export interface InputRecords {
  readonly count: number;
  readonly lines: readonly number[];
  /** The `word` field of each record (trimmed, NFC, as the reader gives it), parallel to `lines`. */
  readonly words: readonly string[];
}

/**
 * Calls `fn` with every line of a text file, decoded as UTF-8, split at LF with one CR before the
 * LF dropped; streamed in chunks, the lines of a chunk handled in one synchronous loop.
 */
async function eachLine(path: string, fn: (line: string) => void): Promise<void> {
  const decoder = new StringDecoder("utf8");
  let carry = "";
  const split = (text: string): void => {
    let start = 0;
    for (let nl = text.indexOf("\n"); nl >= 0; nl = text.indexOf("\n", start)) {
      fn(text.slice(start, nl > start && text.charCodeAt(nl - 1) === 13 ? nl - 1 : nl));
      start = nl + 1;
    }
    carry = text.slice(start);
  };
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) split(carry + decoder.write(chunk as Buffer));
  split(carry + decoder.end());
  if (carry !== "") fn(carry.endsWith("\r") ? carry.slice(0, -1) : carry);
}

/** Field `at` of one CSV line: split at commas when the line has no quote, else by RFC 4180 quoting. */
function fieldOf(line: string, at: number): string {
  if (line.indexOf('"') >= 0) return csvRecords(line)[0]?.[at] ?? "";
  let from = 0;
  for (let k = 0; k < at; k++) {
    const comma = line.indexOf(",", from);
    if (comma < 0) return "";
    from = comma + 1;
  }
  const end = line.indexOf(",", from);
  return line.slice(from, end < 0 ? line.length : end);
}

/**
 * Splits one LF-terminated stretch of text (its LF, and the CR of a CR LF, already removed) into
 * records by the lexicon format's grammar (README, "The lexicon CSV"; RFC 4180 §2 with two
 * differences): a lone CR ends a physical line and, outside a quoted field, the record; inside a
 * quoted field it is data (the record then spans lines); a record starting with `#` is a comment
 * up to the end of its line. Calls `fn` with each record's first line and text; returns the
 * number of physical lines the stretch held.
 */
function splitStretch(seg: string, first: number, fn: (line: number, raw: string) => void): number {
  let line = first;
  let pos = 0;
  for (;;) {
    const start = line;
    let end = seg.indexOf("\r", pos);
    if (end < 0) end = seg.length;
    else if (seg.charCodeAt(pos) !== 35 /* # */) {
      // A CR ahead: read the quoting up to the first CR outside a quoted field.
      let fieldStart = true;
      let quoted = false;
      let i = pos;
      for (; i < seg.length; i++) {
        const c = seg.charCodeAt(i);
        if (quoted) {
          if (c === 34) {
            if (seg.charCodeAt(i + 1) === 34) i++;
            else quoted = false;
          } else if (c === 13) line++;
          continue;
        }
        if (c === 13) break;
        if (c === 44) fieldStart = true;
        else {
          if (c === 34 && fieldStart) quoted = true;
          fieldStart = false;
        }
      }
      end = i;
    }
    fn(start, seg.slice(pos, end));
    line++;
    if (end >= seg.length) return line - first;
    pos = end + 1;
  }
}

/**
 * Counts a lexicon CSV's data records independently of the reader, by the lexicon format's record
 * grammar (see `splitStretch`): lines end at CR LF, LF or a lone CR (RFC 4180 §2.1 writes CR LF;
 * LF and CR alone are common practice, no source); a record of spaces and tabs only is blank; a
 * comment or blank record is not data; the first other record is the header; the BOM is not text.
 * Fields are split by RFC 4180 §2 quoting; the header's `word` column (any case) names the word.
 */
export async function countInputRecords(path: string): Promise<InputRecords> {
  const found: number[] = [];
  const words: string[] = [];
  let line = 1;
  let wordAt = -2;
  const record = (at: number, raw: string): void => {
    if (raw.charCodeAt(0) === 35 /* # */ || /^[ \t]*$/.test(raw)) return;
    if (wordAt === -2) {
      wordAt = (csvRecords(raw)[0] ?? []).findIndex((f) => f.trim().toLowerCase() === "word");
      return;
    }
    found.push(at);
    words.push(wordAt < 0 ? "" : fieldOf(raw, wordAt).trim().normalize("NFC"));
  };
  await eachLine(path, (raw) => {
    const text = line === 1 && raw.charCodeAt(0) === 0xfeff ? raw.slice(1) : raw;
    line += splitStretch(text, line, record);
  });
  return { count: found.length, lines: found, words };
}

/**
 * RFC 4180 records of a CSV text (§2: fields in double quotes may hold commas, quotes written
 * twice, CR and LF; a record ends at a line break outside quotes; the last record may lack one).
 * Returns every record's fields.
 */
export function csvRecords(text: string): string[][] {
  const records: string[][] = [];
  let fields: string[] = [];
  let field = "";
  let quoted = false;
  let any = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    any = true;
    if (quoted) {
      if (c === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i++;
        } else quoted = false;
      } else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ",") {
      fields.push(field);
      field = "";
    } else if (c === "\n" || (c === "\r" && text[i + 1] === "\n")) {
      if (c === "\r") i++;
      fields.push(field);
      records.push(fields);
      fields = [];
      field = "";
      any = false;
    } else field += c;
  }
  if (any) {
    fields.push(field);
    records.push(fields);
  }
  return records;
}

/** What a staging folder holds, counted from the files themselves. */
export interface WrittenCounts {
  /** Entry lines of lexicon.tsv (header excluded), when written. */
  readonly tsv?: number;
  /** Distinct values of the TSV's `word` column, when written. */
  readonly tsvWords?: number;
  /** Lines of lexicon.jsonl, when written. */
  readonly jsonl?: number;
  /** The `source.line` and `word` of every JSONL record, when written. */
  readonly jsonlLines?: readonly number[];
  readonly jsonlWords?: readonly string[];
  /** `lexeme` elements of lexicon.pls, when written. */
  readonly plsLexemes?: number;
  /** Records of rejects.csv (header excluded) and their `line` column. */
  readonly rejects: number;
  readonly rejectLines: readonly number[];
}

/** Reads back the files of one variety's staging folder (each path given is a file that was written; readback.ts reads them on bytes). */
export async function countWritten(files: { readonly tsv?: string; readonly jsonl?: string; readonly pls?: string; readonly rejects: string }): Promise<WrittenCounts> {
  let tsv: number | undefined;
  let tsvWords: number | undefined;
  if (files.tsv !== undefined) {
    const t = await readBackTsv(files.tsv);
    tsv = t.entries;
    tsvWords = t.words;
  }
  let jsonl: number | undefined;
  let jsonlLines: number[] | undefined;
  let jsonlWords: string[] | undefined;
  if (files.jsonl !== undefined) {
    const j = await readBackJsonl(files.jsonl);
    jsonl = j.count;
    jsonlLines = j.lines;
    jsonlWords = j.words;
  }
  let plsLexemes: number | undefined;
  if (files.pls !== undefined) {
    plsLexemes = 0;
    // Counted in the bytes (the tag is ASCII; UTF-8 never repeats an ASCII byte inside a character).
    const tag = Buffer.from("<lexeme>");
    let tail: Buffer = Buffer.alloc(0);
    for await (const chunk of createReadStream(files.pls, { highWaterMark: 1 << 20 })) {
      const buf = tail.length === 0 ? (chunk as Buffer) : Buffer.concat([tail, chunk as Buffer]);
      for (let at = buf.indexOf(tag); at >= 0; at = buf.indexOf(tag, at + tag.length)) plsLexemes++;
      tail = buf.subarray(Math.max(0, buf.length - (tag.length - 1))); // shorter than the tag: never counted twice
    }
  }
  const rej = csvRecords(await readFile(files.rejects, "utf8")).slice(1);
  return {
    ...(tsv !== undefined ? { tsv, tsvWords } : {}),
    ...(jsonl !== undefined ? { jsonl, jsonlLines, jsonlWords } : {}),
    ...(plsLexemes !== undefined ? { plsLexemes } : {}),
    rejects: rej.length,
    rejectLines: rej.map((r) => Number(r[1])),
  };
}

const rows = (n: number): string => `${n} ${n === 1 ? "row" : "rows"}`;
const entries = (n: number): string => `${n} ${n === 1 ? "entry" : "entries"}`;

/**
 * Compares the input's records with what was written: each output format holds entries for
 * exactly the records that were not rejected, and (with JSON Lines, which names every entry's
 * line) every record's line is in exactly one of lexicon.jsonl and rejects.csv, and each entry's
 * word is the word of the record on its line (so rows shifted between lines are caught even when
 * the counts come out even). Returns the errors
 * (code `run/unreconciled`), positioned at the first line that is missing or doubled when known.
 */
export function reconcile(lexicon: string, input: InputRecords, w: WrittenCounts): Diagnostic[] {
  const out: Diagnostic[] = [];
  const fail = (message: string, line = 1): void => {
    out.push(diagnostic("error", "run/unreconciled", `${message} This is a bug in Strata; please report it with the lexicon.`, { file: lexicon, line, column: 1 }));
  };
  const check = (name: string, n: number | undefined): void => {
    if (n !== undefined && n + w.rejects !== input.count) {
      fail(`The lexicon has ${rows(input.count)} but ${name} holds ${entries(n)} and rejects.csv ${rows(w.rejects)}.`);
    }
  };
  check("lexicon.tsv", w.tsv);
  check("lexicon.jsonl", w.jsonl);
  if (w.plsLexemes !== undefined && w.tsvWords !== undefined && w.plsLexemes !== w.tsvWords) {
    fail(`lexicon.pls holds ${w.plsLexemes} lexemes but lexicon.tsv ${w.tsvWords} distinct words.`);
  }
  if (w.jsonlLines !== undefined) {
    // Per line of the lexicon (typed arrays: a whole dictionary has over a hundred thousand):
    // the record on it (index + 1, 0 for none) and how often an entry or reject names it.
    let last = 0;
    for (const l of input.lines) if (l > last) last = l;
    const recordAt = new Int32Array(last + 1);
    input.lines.forEach((l, i) => (recordAt[l] = i + 1));
    const seen = new Uint32Array(last + 1);
    const strays = new Set<number>();
    const count = (l: number): void => {
      if (Number.isInteger(l) && l >= 1 && l <= last && recordAt[l]! > 0) seen[l]!++;
      else strays.add(l);
    };
    for (const l of w.jsonlLines) count(l);
    for (const l of w.rejectLines) count(l);
    const missing = input.lines.filter((l) => seen[l] === 0);
    const doubled = input.lines.filter((l) => seen[l]! > 1);
    const stray = [...strays].sort((a, b) => a - b);
    const list = (ls: readonly number[]): string => ls.slice(0, 5).join(", ") + (ls.length > 5 ? `, … (${ls.length} in all)` : "");
    if (missing.length > 0) fail(`Line${missing.length === 1 ? "" : "s"} ${list(missing)} of the lexicon ${missing.length === 1 ? "is" : "are"} neither an entry nor a reject.`, missing[0]);
    if (doubled.length > 0) fail(`Line${doubled.length === 1 ? "" : "s"} ${list(doubled)} of the lexicon ${doubled.length === 1 ? "was" : "were"} written more than once.`, doubled[0]);
    const moved: number[] = [];
    w.jsonlLines.forEach((l, i) => {
      const r = Number.isInteger(l) && l >= 1 && l <= last ? recordAt[l]! : 0;
      if (r > 0 && input.words[r - 1] !== w.jsonlWords?.[i]) moved.push(l);
    });
    if (moved.length > 0) fail(`The entr${moved.length === 1 ? "y" : "ies"} written for line${moved.length === 1 ? "" : "s"} ${list(moved)} of the lexicon ${moved.length === 1 ? "does" : "do"} not hold the word on that line.`, moved[0]);
    if (stray.length > 0) fail(`Entries or rejects name line${stray.length === 1 ? "" : "s"} ${list(stray)}, which ${stray.length === 1 ? "is not a record" : "are not records"} of the lexicon.`, stray[0]);
  }
  return out;
}
