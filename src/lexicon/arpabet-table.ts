// The ARPAbet → IPA mapping table (lexicons/en-us/arpabet.csv by default): one row per phone, or
// per stress level of a vowel whose quality depends on stress, or for a vowel directly before a vowel.

import { existsSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { diagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { checkQuoting, findForbidden } from "./fields.js";
import { splitRecords } from "./records.js";

/** One ARPAbet phone of the mapping table. */
export interface ArpabetPhone {
  readonly arpabet: string;
  /** Vowels carry a stress digit (0, 1, 2); consonants carry none. */
  readonly vowel: boolean;
  /**
   * IPA by stress digit for vowels ("0", "1", "2"), and optionally for a vowel directly before
   * another vowel ("0V", "1V", "2V"); the single value under "-" for consonants. A value may be
   * several segments separated by spaces.
   */
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
 * is the same at every stress level, or `0`/`1`/`2` for one level (then all three must be given);
 * `0V`/`1V`/`2V` give an optional value for that level when the next phone is a vowel.
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
    const stress = (record[cs] ?? "").trim().toUpperCase();
    const ipa = (record[ci] ?? "").trim().normalize("NFC");
    if (!/^[A-Z]+$/.test(arpabet)) {
      out.push(diagnostic("error", "arpabet/bad-phone", `'${arpabet}' is not an ARPAbet phone name (capital letters only).`, pos));
      continue;
    }
    if (!["-", "*", "0", "1", "2", "0V", "1V", "2V"].includes(stress)) {
      out.push(diagnostic("error", "arpabet/bad-stress", `The stress column must be -, *, 0, 1, 2, 0V, 1V or 2V, not '${stress}'.`, pos));
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
