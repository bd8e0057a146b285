// Reconciliation from what was actually written: the input's records are counted here on their own
// (not by the reader), the written files are read back, and every input record must be exactly one
// entry or exactly one reject. A mismatch is an error (a bug in Strata), never a silent flag.

import { Utf8Decoder } from "../files.js";
import { createReadStream } from "node:fs";
import { readFile } from "node:fs/promises";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { countTag, readBackJsonl, readBackTsv, type JsonlBack, type TsvBack } from "./readback.js";

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
  const decoder = new Utf8Decoder();
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
  /** The `source.line`, `source.file` and `word` of every JSONL record, when written. */
  readonly jsonlLines?: readonly number[];
  readonly jsonlFiles?: readonly string[];
  readonly jsonlWords?: readonly string[];
  /** `lexeme` elements of lexicon.pls, when written. */
  readonly plsLexemes?: number;
  /** Records of rejects.csv (header excluded) and their `line` and `file` columns. */
  readonly rejects: number;
  readonly rejectLines: readonly number[];
  readonly rejectFiles: readonly string[];
  /** Records of replaced.csv (a variety with overrides): file, line and word of each lexicon row replaced. */
  readonly replaced?: readonly { readonly file: string; readonly line: number; readonly word: string }[];
}

/** Reads back the files of one variety's staging folder (each path given is a file that was written; readback.ts reads them on bytes). */
export async function countWritten(
  files: { readonly tsv?: string; readonly jsonl?: string; readonly pls?: string; readonly rejects: string; readonly replaced?: string },
  /** The TSV and JSON Lines files already read back (as they were written, check-written.ts): not read again. */
  known: { readonly tsv?: TsvBack; readonly jsonl?: JsonlBack } = {},
): Promise<WrittenCounts> {
  let tsv: number | undefined;
  let tsvWords: number | undefined;
  if (files.tsv !== undefined) {
    const t = known.tsv ?? (await readBackTsv(files.tsv));
    tsv = t.entries;
    tsvWords = t.words;
  }
  let jsonl: number | undefined;
  let jsonlLines: number[] | undefined;
  let jsonlWords: string[] | undefined;
  let jsonlFiles: string[] | undefined;
  if (files.jsonl !== undefined) {
    const j = known.jsonl ?? (await readBackJsonl(files.jsonl));
    jsonl = j.count;
    jsonlLines = j.lines;
    jsonlWords = j.words;
    jsonlFiles = j.files;
  }
  let plsLexemes: number | undefined;
  if (files.pls !== undefined) {
    // Counted in the bytes (the tag is ASCII; UTF-8 never repeats an ASCII byte inside a character).
    plsLexemes = await countTag(files.pls, "<lexeme>");
  }
  const rej = csvRecords(await readFile(files.rejects, "utf8")).slice(1);
  const replaced = files.replaced === undefined ? undefined : csvRecords(await readFile(files.replaced, "utf8")).slice(1).map((r) => ({ file: r[0] ?? "", line: Number(r[1]), word: r[3] ?? "" }));
  return {
    ...(tsv !== undefined ? { tsv, tsvWords } : {}),
    ...(jsonl !== undefined ? { jsonl, jsonlLines, jsonlFiles, jsonlWords } : {}),
    ...(plsLexemes !== undefined ? { plsLexemes } : {}),
    rejects: rej.length,
    rejectLines: rej.map((r) => Number(r[1])),
    rejectFiles: rej.map((r) => r[0] ?? ""),
    ...(replaced !== undefined ? { replaced } : {}),
  };
}

const rows = (n: number): string => `${n} ${n === 1 ? "row" : "rows"}`;
const entries = (n: number): string => `${n} ${n === 1 ? "entry" : "entries"}`;

/** A variety's override file, for reconciliation: the lexicon's and its names as the outputs write them, and its records. */
export interface OverrideInput {
  /** The lexicon file as outputs name it (relative to the lexicon folder). */
  readonly lexicon: string;
  /** The override file as outputs name it. */
  readonly overrides: string;
  readonly input: InputRecords;
}

/**
 * Compares the input's records with what was written: each output format holds entries for
 * exactly the records that were not rejected, and (with JSON Lines, which names every entry's
 * line) every record's line is in exactly one of lexicon.jsonl and rejects.csv, and each entry's
 * word is the word of the record on its line (so rows shifted between lines are caught even when
 * the counts come out even). With an override file (`over`), its records are input too, and a
 * lexicon record may instead be one row of replaced.csv, holding the same word; lines are then
 * told apart by file. Returns the errors (code `run/unreconciled`), positioned at the first line
 * that is missing or doubled when known.
 */
export function reconcile(lexicon: string, input: InputRecords, w: WrittenCounts, over?: OverrideInput): Diagnostic[] {
  const out: Diagnostic[] = [];
  const fail = (message: string, line = 1): void => void out.push(unreconciled(lexicon, message, line));
  const replaced = w.replaced ?? [];
  const total = input.count + (over?.input.count ?? 0);
  const check = (name: string, n: number | undefined): void => {
    if (n !== undefined && n + w.rejects + replaced.length !== total) {
      const more = over === undefined ? "" : ` and replaced.csv ${rows(replaced.length)}`;
      fail(`The ${over === undefined ? "lexicon has" : "lexicon and its override file have"} ${rows(total)} but ${name} holds ${entries(n)}, rejects.csv ${rows(w.rejects)}${more}.`);
    }
  };
  check("lexicon.tsv", w.tsv);
  check("lexicon.jsonl", w.jsonl);
  const pls = plsMismatch(lexicon, w.plsLexemes, w.tsvWords);
  if (pls !== undefined) out.push(pls);
  if (w.jsonlLines === undefined) return out;
  const found = (over === undefined ? findingsByLine(input, w) : undefined) ?? findingsByTag(input, w, over);
  const list = (ls: readonly string[]): string => ls.slice(0, 5).join(", ") + (ls.length > 5 ? `, … (${ls.length} in all)` : "");
  const { missing, doubled, moved, stray } = found;
  if (missing.length > 0) fail(`Line${missing.length === 1 ? "" : "s"} ${list(missing.map((r) => r.shown))} of the ${over === undefined ? "lexicon" : "input"} ${missing.length === 1 ? "is" : "are"} neither an entry nor a reject${over === undefined ? "" : " nor replaced"}.`, missing[0]!.line);
  if (doubled.length > 0) fail(`Line${doubled.length === 1 ? "" : "s"} ${list(doubled.map((r) => r.shown))} of the ${over === undefined ? "lexicon" : "input"} ${doubled.length === 1 ? "was" : "were"} written more than once.`, doubled[0]!.line);
  if (moved.length > 0) fail(`The entr${moved.length === 1 ? "y" : "ies"} written for line${moved.length === 1 ? "" : "s"} ${list(moved.map((r) => r.shown))} of the ${over === undefined ? "lexicon" : "input"} ${moved.length === 1 ? "does" : "do"} not hold the word on that line.`, moved[0]!.line);
  if (stray.length > 0) fail(`Entries or rejects name line${stray.length === 1 ? "" : "s"} ${list(stray.map((r) => r.shown))}, which ${stray.length === 1 ? "is not a record" : "are not records"} of the ${over === undefined ? "lexicon" : "input"}.`, found.strayLine);
  return out;
}

/** A reconciliation error (`run/unreconciled`, a bug in Strata) at `line` of the lexicon. */
function unreconciled(lexicon: string, message: string, line = 1): Diagnostic {
  return diagnostic("error", "run/unreconciled", `${message} This is a bug in Strata; please report it with the lexicon.`, { file: lexicon, line, column: 1 });
}

/** The error when the PLS file's lexemes are not the TSV's distinct words (both counted). */
export function plsMismatch(lexicon: string, plsLexemes: number | undefined, tsvWords: number | undefined): Diagnostic | undefined {
  if (plsLexemes === undefined || tsvWords === undefined || plsLexemes === tsvWords) return undefined;
  return unreconciled(lexicon, `lexicon.pls holds ${plsLexemes} lexemes but lexicon.tsv ${tsvWords} distinct words.`);
}

/** A record line found missing, doubled, moved or stray: as a message names it, and its line. */
interface Found {
  readonly shown: string;
  readonly line: number;
}

/**
 * The line checks of `reconcile`: input records neither written nor rejected (`missing`, in input
 * order), written more than once (`doubled`), entries not holding their line's word (`moved`, in
 * JSON Lines order, then replaced.csv's), and lines written that are no record (`stray`), with the
 * line a stray finding is positioned at.
 */
export interface LineFindings {
  readonly missing: readonly Found[];
  readonly doubled: readonly Found[];
  readonly moved: readonly Found[];
  readonly stray: readonly Found[];
  readonly strayLine: number | undefined;
}

/**
 * The line checks for one input file, on arrays indexed by line number (no string per record): the
 * common case. Undefined when a line read back is not a whole number (a damaged file) or rows were
 * replaced: `findingsByTag` then answers.
 */
export function findingsByLine(input: InputRecords, w: WrittenCounts): LineFindings | undefined {
  if ((w.replaced?.length ?? 0) > 0) return undefined;
  const jl = w.jsonlLines!;
  const rl = w.rejectLines;
  let max = 0;
  for (const ls of [input.lines, jl, rl]) {
    for (let i = 0; i < ls.length; i++) {
      const l = ls[i]!;
      if (!Number.isSafeInteger(l) || l < 0 || l > 0x3fffffff) return undefined;
      if (l > max) max = l;
    }
  }
  const written = new Int32Array(max + 1);
  for (let i = 0; i < jl.length; i++) written[jl[i]!]!++;
  for (let i = 0; i < rl.length; i++) written[rl[i]!]!++;
  // The input's word on each of its lines (undefined: no record starts there).
  const wordAt: (string | undefined)[] = new Array<string | undefined>(max + 1);
  const missing: Found[] = [];
  const doubled: Found[] = [];
  for (let i = 0; i < input.lines.length; i++) {
    const l = input.lines[i]!;
    wordAt[l] = input.words[i]!;
    if (written[l] === 0) missing.push({ shown: String(l), line: l });
  }
  for (let i = 0; i < input.lines.length; i++) {
    const l = input.lines[i]!;
    if (written[l]! > 1) doubled.push({ shown: String(l), line: l });
  }
  const moved: Found[] = [];
  const jw = w.jsonlWords;
  for (let i = 0; i < jl.length; i++) {
    const l = jl[i]!;
    const word = wordAt[l];
    if (word !== undefined && word !== jw?.[i]) moved.push({ shown: String(l), line: l });
  }
  const stray: Found[] = [];
  for (let l = 0; l <= max; l++) if (written[l]! > 0 && wordAt[l] === undefined) stray.push({ shown: String(l), line: l });
  return { missing, doubled, moved, stray, strayLine: stray[0]?.line };
}

/** The line checks on string tags: file and line with an override file (two inputs), the line alone without. */
export function findingsByTag(input: InputRecords, w: WrittenCounts, over: OverrideInput | undefined): LineFindings {
  const replaced = w.replaced ?? [];
  // Records are told apart by line alone without an override file (one input), by file and line with one.
  const tag = (file: string, line: number): string => (over === undefined ? String(line) : `${file}\n${line}`);
  const shown = (t: string): string => (over === undefined ? t : t.replace("\n", " line "));
  const inputs: { tag: string; line: number; word: string }[] = input.lines.map((l, i) => ({ tag: tag(over?.lexicon ?? "", l), line: l, word: input.words[i]! }));
  if (over !== undefined) over.input.lines.forEach((l, i) => inputs.push({ tag: tag(over.overrides, l), line: l, word: over.input.words[i]! }));
  const seen = new Map<string, number>();
  const add = (t: string): void => void seen.set(t, (seen.get(t) ?? 0) + 1);
  const jsonlTags = w.jsonlLines!.map((l, i) => tag(w.jsonlFiles?.[i] ?? "", l));
  jsonlTags.forEach(add);
  w.rejectLines.forEach((l, i) => add(tag(w.rejectFiles[i] ?? "", l)));
  replaced.forEach((r) => add(tag(r.file, r.line)));
  const missing = inputs.filter((r) => (seen.get(r.tag) ?? 0) === 0);
  const doubled = inputs.filter((r) => (seen.get(r.tag) ?? 0) > 1);
  const known = new Set(inputs.map((r) => r.tag));
  const stray = [...seen.keys()].filter((t) => !known.has(t));
  const wordOf = new Map<string, string>(inputs.map((r) => [r.tag, r.word]));
  const moved = [
    ...jsonlTags.flatMap((t, i) => (wordOf.has(t) && wordOf.get(t) !== w.jsonlWords?.[i] ? [t] : [])),
    ...replaced.flatMap((r) => { const t = tag(r.file, r.line); return wordOf.has(t) && wordOf.get(t) !== r.word ? [t] : []; }),
  ];
  const found = (t: string): Found => ({ shown: shown(t), line: Number(t.split("\n").pop()) });
  const strayLines = stray.map((t) => Number(t.split("\n").pop())).sort((a, b) => a - b);
  return {
    missing: missing.map((r) => ({ shown: shown(r.tag), line: r.line })),
    doubled: doubled.map((r) => ({ shown: shown(r.tag), line: r.line })),
    moved: moved.map(found),
    stray: over === undefined ? strayLines.map((l) => ({ shown: String(l), line: l })) : stray.map(found),
    strayLine: strayLines[0],
  };
}
