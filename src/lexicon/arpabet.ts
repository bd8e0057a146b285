// Importing ARPAbet-coded pronunciation dictionaries (one entry a line, stress digits on vowels,
// `WORD(2)` alternates) into Strata's lexicon rows, through a mapping table such as lexicons/en-us/arpabet.csv.

import { existsSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { diagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { splitLines } from "../lines.js";
import { checkQuoting, findForbidden } from "./fields.js";
import { splitRecords } from "./records.js";
import type { RejectedRow } from "./read.js";

/** One ARPAbet phone of the mapping table. */
export interface ArpabetPhone {
  readonly arpabet: string;
  /** Vowels carry a stress digit (0, 1, 2); consonants carry none. */
  readonly vowel: boolean;
  /** IPA by stress digit for vowels ("0", "1", "2"); the single value under "-" for consonants. */
  readonly ipa: Readonly<Record<string, string>>;
}

export interface ArpabetTable {
  readonly file: string;
  readonly phones: ReadonlyMap<string, ArpabetPhone>;
}

/** The table shipped with Strata (lexicons/en-us/arpabet.csv), found from this module's location. */
export function defaultArpabetTablePath(): string | undefined {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    const candidate = join(dir, "lexicons", "en-us", "arpabet.csv");
    if (existsSync(candidate)) return candidate;
    const up = dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  return undefined;
}

/**
 * Parses a mapping table: header `arpabet,stress,ipa` (other columns such as example and note are
 * ignored); comment lines start with `#`. `stress` is `-` for a consonant, `*` for a vowel whose IPA
 * is the same at every stress level, or `0`/`1`/`2` for one level (then all three must be given).
 */
export function parseArpabetTable(text: string, file: string): { table?: ArpabetTable; diagnostics: Diagnostic[] } {
  const out: Diagnostic[] = [];
  // The lexicon file's own CSV grammar (records.ts, fields.ts), so lines are counted as everywhere else.
  const records: { record: string[]; info: { lines: number } }[] = [];
  for (const rec of splitRecords(text)) {
    if (rec.kind !== "data") continue;
    const bad = findForbidden(rec.raw, "arpabet");
    const q = bad === undefined ? checkQuoting(rec.raw) : undefined;
    if (bad !== undefined || q === undefined || !q.ok) {
      const why = bad ?? (q !== undefined && !q.ok ? q : undefined)!;
      return { diagnostics: [diagnostic("error", "arpabet/csv", `The mapping table cannot be read as CSV: ${why.reason}`, { file, line: rec.line, column: why.column })] };
    }
    records.push({ record: q.fields.map((f) => f.value), info: { lines: rec.line } });
  }
  const head = records[0];
  if (head === undefined) return { diagnostics: [diagnostic("error", "arpabet/empty", "The mapping table is empty.", { file, line: 1, column: 1 })] };
  const names = head.record.map((h) => h.trim().toLowerCase());
  const col = (n: string): number => names.indexOf(n);
  const [ca, cs, ci] = [col("arpabet"), col("stress"), col("ipa")];
  if (ca < 0 || cs < 0 || ci < 0) {
    return { diagnostics: [diagnostic("error", "arpabet/header", "The mapping table needs the columns arpabet, stress and ipa.", { file, line: head.info.lines, column: 1 })] };
  }
  const building = new Map<string, { vowel: boolean; ipa: Record<string, string>; line: number }>();
  for (const { record, info } of records.slice(1)) {
    const pos = { file, line: info.lines, column: 1 };
    const arpabet = (record[ca] ?? "").trim().toUpperCase();
    const stress = (record[cs] ?? "").trim();
    const ipa = (record[ci] ?? "").trim().normalize("NFC");
    if (!/^[A-Z]+$/.test(arpabet)) {
      out.push(diagnostic("error", "arpabet/bad-phone", `'${arpabet}' is not an ARPAbet phone name (capital letters only).`, pos));
      continue;
    }
    if (!["-", "*", "0", "1", "2"].includes(stress)) {
      out.push(diagnostic("error", "arpabet/bad-stress", `The stress column must be -, *, 0, 1 or 2, not '${stress}'.`, pos));
      continue;
    }
    if (ipa === "") {
      out.push(diagnostic("error", "arpabet/empty-ipa", `No IPA given for ${arpabet}.`, pos));
      continue;
    }
    const vowel = stress !== "-";
    const entry = building.get(arpabet) ?? { vowel, ipa: {}, line: info.lines };
    if (entry.vowel !== vowel) {
      out.push(diagnostic("error", "arpabet/mixed", `${arpabet} is listed both as a consonant and as a vowel.`, pos));
      continue;
    }
    const keys = stress === "*" ? ["0", "1", "2"] : [stress];
    for (const k of keys) {
      if (entry.ipa[k] !== undefined) {
        out.push(diagnostic("error", "arpabet/duplicate", `${arpabet}${k === "-" ? "" : ` with stress ${k}`} is listed twice.`, pos));
      }
      entry.ipa[k] = ipa;
    }
    building.set(arpabet, entry);
  }
  for (const [arpabet, e] of building) {
    if (e.vowel && !["0", "1", "2"].every((k) => e.ipa[k] !== undefined)) {
      out.push(diagnostic("error", "arpabet/incomplete", `The vowel ${arpabet} needs IPA for stress 0, 1 and 2 (or one row with stress *).`, { file, line: e.line, column: 1 }));
    }
  }
  if (out.some((d) => d.severity === "error")) return { diagnostics: out };
  const phones = new Map<string, ArpabetPhone>();
  for (const [arpabet, e] of building) phones.set(arpabet, { arpabet, vowel: e.vowel, ipa: e.ipa });
  return { table: { file, phones }, diagnostics: out };
}

/** Reads a mapping table from a file (by default the shipped en-us table). */
export function loadArpabetTable(path?: string): { table?: ArpabetTable; diagnostics: Diagnostic[] } {
  const file = path ?? defaultArpabetTablePath();
  if (file === undefined) {
    return { diagnostics: [diagnostic("error", "arpabet/unreadable", "The shipped mapping table lexicons/en-us/arpabet.csv was not found.", { file: "arpabet.csv", line: 1, column: 1 })] };
  }
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch (e) {
    const why = (e as NodeJS.ErrnoException).code === "ENOENT" ? "there is no such file" : (e as Error).message;
    return { diagnostics: [diagnostic("error", "arpabet/unreadable", `Cannot read the mapping table: ${why}.`, { file, line: 1, column: 1 })] };
  }
  return parseArpabetTable(text, file);
}

// ---------------------------------------------------------------------------------------------
// Conversion

/** One imported pronunciation, ready to be written as a lexicon CSV row. */
export interface ImportedRow {
  readonly word: string;
  /** IPA, segments separated by spaces, a stress mark written immediately before its vowel (`k ˈæ t`). */
  readonly pron: string;
  /** A trailing `# comment` of the entry, if any. */
  readonly note?: string;
  /** 1-based line of the entry in the source. */
  readonly line: number;
  /** 1 for the first pronunciation of the word, 2 for `WORD(2)`, … */
  readonly variant: number;
}

export interface ImportResult {
  readonly rows: ImportedRow[];
  readonly rejects: RejectedRow[];
  /** Lines seen, and of those the comment and blank ones (lines = rows + rejects + comments + blanks). */
  readonly lines: number;
  readonly comments: number;
  readonly blanks: number;
}

type Converted = { readonly ok: true; readonly pron: string } | { readonly ok: false; readonly offset: number; readonly code: string; readonly reason: string };

/**
 * Converts a space-separated phone string (`K AE1 T`) to IPA. Stress digit 1 writes ˈ and 2 writes ˌ
 * immediately before the vowel (the reader puts a mark on the next nucleus, so this is exact; the
 * syllabifier places syllable boundaries later); 0 writes no mark. An entry whose vowels all lack a
 * digit is imported without marks (stress left to the grammar). `offset` of a failure is the
 * 0-based code-unit offset of the bad phone in `phones` (ARPAbet is ASCII).
 */
export function convertArpabet(phones: string, table: ArpabetTable): Converted {
  const parts: { text: string; offset: number }[] = [];
  for (const m of phones.matchAll(/\S+/g)) parts.push({ text: m[0], offset: m.index ?? 0 });
  if (parts.length === 0) return { ok: false, offset: 0, code: "arpabet/empty", reason: "The entry has no phones." };
  const parsed: { phone: ArpabetPhone; digit: string | undefined; offset: number }[] = [];
  for (const p of parts) {
    const m = /^([A-Za-z]+)([0-9])?$/.exec(p.text);
    const phone = m ? table.phones.get(m[1]!.toUpperCase()) : undefined;
    if (!m || phone === undefined) {
      return { ok: false, offset: p.offset, code: "arpabet/unknown-phone", reason: `'${p.text}' is not a phone of the mapping table ${shortName(table.file)}.` };
    }
    const digit = m[2];
    if (digit !== undefined && !phone.vowel) {
      return { ok: false, offset: p.offset, code: "arpabet/stress-on-consonant", reason: `'${p.text}': the consonant ${phone.arpabet} cannot carry a stress digit.` };
    }
    if (digit !== undefined && !["0", "1", "2"].includes(digit)) {
      return { ok: false, offset: p.offset, code: "arpabet/bad-stress", reason: `'${p.text}': stress digits are 0, 1 and 2.` };
    }
    parsed.push({ phone, digit, offset: p.offset });
  }
  const vowels = parsed.filter((p) => p.phone.vowel);
  const withDigit = vowels.filter((p) => p.digit !== undefined).length;
  if (withDigit > 0 && withDigit < vowels.length) {
    const bare = vowels.find((p) => p.digit === undefined)!;
    return { ok: false, offset: bare.offset, code: "arpabet/missing-stress", reason: `The vowel ${bare.phone.arpabet} has no stress digit while other vowels of the entry have one.` };
  }
  const out = parsed.map((p) => {
    if (!p.phone.vowel) return p.phone.ipa["-"]!;
    // Unmarked entries: the quality of the stressed form (ʌ, ɝ), as a bare ARPAbet vowel is a full vowel.
    const ipa = p.phone.ipa[p.digit ?? "1"]!;
    return (p.digit === "1" ? "ˈ" : p.digit === "2" ? "ˌ" : "") + ipa;
  });
  return { ok: true, pron: out.join(" ") };
}

const shortName = (file: string): string => file.split(/[\\/]/).pop() ?? file;

/** `WORD(2)` → ["WORD", 2]; anything else → [word, 1]. */
function splitVariant(word: string): [string, number] {
  const m = /^(.+)\((\d+)\)$/.exec(word);
  return m ? [m[1]!, Number(m[2])] : [word, 1];
}

/** A `"key": "value",` line of a JSON object written one entry a line. */
const JSON_PAIR = /^(\s*)("(?:[^"\\]|\\.)*")\s*:\s*("(?:[^"\\]|\\.)*")\s*,?\s*$/;

/**
 * Imports an ARPAbet dictionary given as lines. Accepted line forms:
 * - `WORD  PH1 PH2 …` (one or more spaces or tabs after the word), optionally `WORD(2) …` for an
 *   alternative pronunciation, optionally ending in ` # comment` (kept as the row's note);
 * - `"word": "PH1 PH2 …",` — a JSON object written one entry a line; a line ending in `{` and the
 *   lines `}` and `};` are skipped (so a JavaScript module exporting such an object also reads);
 * - `;;;`, `//` and `/*` start a comment line; blank lines are skipped.
 * Every other line becomes a row or a positioned reject; nothing stops the import.
 */
export function importArpabet(lines: Iterable<string>, table: ArpabetTable, opts: { readonly file: string }): ImportResult {
  const acc = new Accumulator(table, opts.file);
  let n = 0;
  for (let raw of lines) {
    n++;
    if (raw.endsWith("\r")) raw = raw.slice(0, -1);
    if (n === 1 && raw.charCodeAt(0) === 0xfeff) raw = raw.slice(1);
    if (/^[ \t]*$/.test(raw)) {
      acc.blanks++;
      continue;
    }
    // NUL, a BOM inside the text, control characters, U+FFFD: positioned rejects, before anything reads the line.
    const bad = findForbidden(raw, "arpabet");
    if (bad !== undefined) {
      acc.rejectAt(n, raw, bad.column, bad.code, bad.reason);
      continue;
    }
    const trimmed = raw.trim();
    // Comment lines, and the lines that open or close a JSON (or JavaScript module) object.
    if (trimmed.startsWith(";;;") || trimmed.startsWith("//") || trimmed.startsWith("/*") || trimmed.endsWith("{") || trimmed === "}" || trimmed === "};") {
      acc.comments++;
      continue;
    }
    const json = JSON_PAIR.exec(raw);
    if (json) {
      let word: string;
      let phones: string;
      try {
        word = JSON.parse(json[2]!) as string;
        phones = JSON.parse(json[3]!) as string;
      } catch {
        acc.reject(n, raw, json[1]!.length, "arpabet/bad-json", "This line is not a valid JSON string pair.");
        continue;
      }
      // An escape can spell what the line itself may not hold.
      const badWord = findForbidden(word, "arpabet") ?? findForbidden(phones, "arpabet");
      if (badWord !== undefined) {
        acc.reject(n, raw, json[1]!.length, badWord.code, `${badWord.reason.replace(/\.$/, "")} (written as an escape in this JSON string).`);
        continue;
      }
      acc.entry(n, raw, word, phones, raw.lastIndexOf(json[3]!) + 1);
      continue;
    }
    const m = /^(\s*)(\S+)(\s+)(.*)$/.exec(raw);
    if (!m) {
      acc.reject(n, raw, raw.length - raw.trimStart().length, "arpabet/no-phones", "The entry has a word but no phones.");
      continue;
    }
    acc.entry(n, raw, m[2]!, m[4]!, m[1]!.length + m[2]!.length + m[3]!.length);
  }
  return acc.result(n);
}

/** Imports an ARPAbet dictionary given as one text: lines end at CR LF, LF or a lone CR (src/lines.ts). */
export function importArpabetText(text: string, table: ArpabetTable, opts: { readonly file: string }): ImportResult {
  return importArpabet(splitLines(text), table, opts);
}

/** Collects rows and rejects; one entry is a word and its phone string, with where the phones start on the line. */
class Accumulator {
  readonly rows: ImportedRow[] = [];
  readonly rejects: RejectedRow[] = [];
  comments = 0;
  blanks = 0;
  constructor(
    private readonly table: ArpabetTable,
    private readonly file: string,
  ) {}

  /** `offset` is in UTF-16 units of `raw`; the reject's column counts code points from 1. */
  reject(line: number, raw: string, offset: number, code: string, reason: string): void {
    this.rejectAt(line, raw, Array.from(raw.slice(0, offset)).length + 1, code, reason);
  }

  rejectAt(line: number, raw: string, column: number, code: string, reason: string): void {
    this.rejects.push({ kind: "reject", file: this.file, line, column, code, reason, raw });
  }

  entry(line: number, raw: string, word: string, phones: string, phonesAt: number): void {
    // A trailing comment, as `# …` after the phones (CMU dictionary style), becomes the note.
    let note: string | undefined;
    const hash = phones.indexOf("#");
    if (hash >= 0) {
      const c = phones.slice(hash + 1).trim();
      if (c !== "") note = c;
      phones = phones.slice(0, hash);
    }
    const bad = findForbidden(raw, "arpabet");
    if (bad !== undefined) {
      this.rejectAt(line, raw, bad.column, bad.code, bad.reason);
      return;
    }
    // A word given as a value (a dictionary object) need not appear as itself in `raw`.
    const badWord = findForbidden(word, "arpabet");
    if (badWord !== undefined) {
      this.rejectAt(line, raw, 1, badWord.code, `The word: ${badWord.reason}`);
      return;
    }
    const [base, variant] = splitVariant(word);
    const c = convertArpabet(phones, this.table);
    if (!c.ok) {
      this.reject(line, raw, phonesAt + c.offset, c.code, c.reason);
      return;
    }
    this.rows.push({ word: base.normalize("NFC"), pron: c.pron, line, variant, ...(note === undefined ? {} : { note }) });
  }

  result(lines: number): ImportResult {
    return { rows: this.rows, rejects: this.rejects, lines, comments: this.comments, blanks: this.blanks };
  }
}

/**
 * Imports a dictionary object `{ word: "PH1 PH2 …" }` (such as the npm package
 * `cmu-pronouncing-dictionary`'s `dictionary`). Entries are numbered from 1 in the object's order;
 * that number is the `line` of rows and rejects, whose `raw` is the entry as a `"word": "phones"` pair.
 */
export function importArpabetDictionary(dict: Readonly<Record<string, string>>, table: ArpabetTable, opts: { readonly file: string }): ImportResult {
  const acc = new Accumulator(table, opts.file);
  let n = 0;
  for (const word in dict) {
    n++;
    const phones = dict[word]!;
    const key = JSON.stringify(word);
    acc.entry(n, `${key}: ${JSON.stringify(phones)}`, word, phones, key.length + 3);
  }
  return acc.result(n);
}
