// Importing ARPAbet-coded pronunciation dictionaries (one entry a line, stress digits on vowels,
// `WORD(2)` alternates) into Strata's lexicon rows, through a mapping table such as lexicons/en-us/arpabet.csv.

import { splitLines } from "../lines.js";
import { findForbidden } from "./fields.js";
import type { RejectedRow } from "./read.js";
import type { ArpabetPhone, ArpabetTable } from "./arpabet-table.js";

export { defaultArpabetTablePath, loadArpabetTable, parseArpabetTable } from "./arpabet-table.js";
export type { ArpabetPhone, ArpabetTable } from "./arpabet-table.js";

// ---------------------------------------------------------------------------------------------
// Conversion

/** One imported pronunciation, ready to be written as a lexicon CSV row. */
export interface ImportedRow {
  readonly word: string;
  /** IPA, segments separated by spaces, a stress mark written immediately before its vowel (`k ˈæ t`). */
  readonly pron: string;
  /** A trailing `# comment` of the entry, if any. */
  readonly note?: string;
  /**
   * Tags for the lexicon's `tags` column: the name of every stress policy that changed the entry
   * (`weak-forms`, `demote-second-primary`), so a build can count them (lexicon/hygiene.ts), and
   * `weak` from the weak-forms policy (the reader's instruction: every vowel unstressed).
   */
  readonly tags?: readonly string[];
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
  /** How many entries each mapping rule and stress policy changed, by name (every name asked for, 0 included). */
  readonly changed: Readonly<Record<string, number>>;
}

/** Stress policies for dictionaries of the CMU kind; none applies unless asked for. */
export const STRESS_POLICIES = ["weak-forms", "demote-second-primary"] as const;
export type StressPolicy = (typeof STRESS_POLICIES)[number];

/** The name under which the before-vowel rows of the table (`0V`, `1V`, `2V`) are counted. */
export const BEFORE_VOWEL = "before-vowel";

export interface ImportOptions {
  readonly file: string;
  /** The spelling's letter case: as written (default) or lower case. */
  readonly case?: "keep" | "lower";
  /**
   * Stress policies, each counted in `changed`, each tagging the entries it changed with its own
   * name (a build counts those tags in summary.json):
   * - `weak-forms`: an entry whose vowels all carry 0 is tagged `weak`, so that the lexicon reader
   *   leaves every vowel unstressed instead of letting the grammar's default stress stress one
   *   (function words such as "the" DH AH0, "of" AH0 V);
   * - `demote-second-primary`: in an entry with two or more primary stresses (compounds), every
   *   primary after the first becomes secondary.
   */
  readonly policies?: readonly StressPolicy[];
}

type Converted =
  | { readonly ok: true; readonly pron: string; readonly tags: readonly string[]; readonly changed: readonly string[] }
  | { readonly ok: false; readonly offset: number; readonly code: string; readonly reason: string };

/**
 * Converts a space-separated phone string (`K AE1 T`) to IPA. Stress digit 1 writes ˈ and 2 writes ˌ
 * immediately before the vowel (the reader puts a mark on the next nucleus, so this is exact; the
 * syllabifier places syllable boundaries later); 0 writes no mark. A vowel directly before another
 * vowel takes the table's before-vowel value when it has one (en-us: ER0 → ə ɹ, so that the ɹ can
 * start the next syllable). An entry whose vowels all lack a digit is imported without marks (stress
 * left to the grammar). `changed` names the before-vowel rule and the policies that changed the
 * entry. `offset` of a failure is the 0-based code-unit offset of the bad phone in `phones` (ARPAbet is ASCII).
 */
export function convertArpabet(phones: string, table: ArpabetTable, policies: readonly StressPolicy[] = []): Converted {
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
  const changed: string[] = [];
  const tags: string[] = [];
  if (policies.includes("demote-second-primary") && vowels.filter((p) => p.digit === "1").length > 1) {
    let first = true;
    for (const p of vowels) {
      if (p.digit !== "1") continue;
      if (!first) p.digit = "2";
      first = false;
    }
    changed.push("demote-second-primary");
    tags.push("demote-second-primary");
  }
  if (policies.includes("weak-forms") && vowels.length > 0 && vowels.every((p) => p.digit === "0")) {
    tags.push("weak", "weak-forms");
    changed.push("weak-forms");
  }
  let beforeVowel = false;
  const out = parsed.map((p, k) => {
    if (!p.phone.vowel) return p.phone.ipa["-"]!;
    // Unmarked entries: the quality of the stressed form (ʌ, ɝ), as a bare ARPAbet vowel is a full vowel.
    const level = p.digit ?? "1";
    const special = p.digit !== undefined && parsed[k + 1]?.phone.vowel === true ? p.phone.ipa[`${p.digit}V`] : undefined;
    if (special !== undefined) beforeVowel = true;
    const ipa = special ?? p.phone.ipa[level]!;
    return (p.digit === "1" ? "ˈ" : p.digit === "2" ? "ˌ" : "") + ipa;
  });
  if (beforeVowel) changed.unshift(BEFORE_VOWEL);
  return { ok: true, pron: out.join(" "), tags, changed };
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
export function importArpabet(lines: Iterable<string>, table: ArpabetTable, opts: ImportOptions): ImportResult {
  const acc = new Accumulator(table, opts);
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
export function importArpabetText(text: string, table: ArpabetTable, opts: ImportOptions): ImportResult {
  return importArpabet(splitLines(text), table, opts);
}

/** Collects rows and rejects; one entry is a word and its phone string, with where the phones start on the line. */
class Accumulator {
  readonly rows: ImportedRow[] = [];
  readonly rejects: RejectedRow[] = [];
  comments = 0;
  blanks = 0;
  private readonly file: string;
  private readonly changed: Record<string, number> = {};
  constructor(
    private readonly table: ArpabetTable,
    private readonly opts: ImportOptions,
  ) {
    this.file = opts.file;
    // Every rule and policy asked for is reported, with 0 when it changed nothing.
    if ([...table.phones.values()].some((p) => Object.keys(p.ipa).some((k) => k.endsWith("V")))) this.changed[BEFORE_VOWEL] = 0;
    for (const p of opts.policies ?? []) this.changed[p] = 0;
  }

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
    const c = convertArpabet(phones, this.table, this.opts.policies);
    if (!c.ok) {
      this.reject(line, raw, phonesAt + c.offset, c.code, c.reason);
      return;
    }
    for (const name of c.changed) this.changed[name] = (this.changed[name] ?? 0) + 1;
    const spelled = base.normalize("NFC");
    const w = this.opts.case === "lower" ? spelled.toLowerCase() : spelled;
    this.rows.push({ word: w, pron: c.pron, line, variant, ...(note === undefined ? {} : { note }), ...(c.tags.length > 0 ? { tags: c.tags } : {}) });
  }

  result(lines: number): ImportResult {
    return { rows: this.rows, rejects: this.rejects, lines, comments: this.comments, blanks: this.blanks, changed: this.changed };
  }
}

/**
 * Imports a dictionary object `{ word: "PH1 PH2 …" }` (such as the npm package
 * `cmu-pronouncing-dictionary`'s `dictionary`). Entries are numbered from 1 in the object's order;
 * that number is the `line` of rows and rejects, whose `raw` is the entry as a `"word": "phones"` pair.
 */
export function importArpabetDictionary(dict: Readonly<Record<string, string>>, table: ArpabetTable, opts: ImportOptions): ImportResult {
  const acc = new Accumulator(table, opts);
  let n = 0;
  for (const word in dict) {
    n++;
    const phones = dict[word]!;
    const key = JSON.stringify(word);
    acc.entry(n, `${key}: ${JSON.stringify(phones)}`, word, phones, key.length + 3);
  }
  return acc.result(n);
}
