// Pinned expectations: a lexicon folder's pinned.csv says what some entries' narrow forms must be
// (exactly, or that they contain, lack or match a pattern), why and from where. Every build checks
// them against its JSON Lines output and records the results in <variety>/pinned.json.

import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { parse } from "csv-parse/sync";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { BuildFolderError, readEntries, type BuildEntry, type BuildFolder } from "./folder.js";

export const PINNED_FILE = "pinned.csv";
export const PIN_RESULTS = "pinned.json";
export const PIN_COLUMNS = ["entry", "variety", "check", "value", "why", "source"] as const;
export const PIN_CHECKS = ["is", "has", "lacks", "matches"] as const;
export type PinCheck = (typeof PIN_CHECKS)[number];

export interface Pin {
  /** 1-based line in pinned.csv. */
  readonly line: number;
  /** An entry key (`ct0022`, `tram#2`) or a word (every entry of that word is checked). */
  readonly entry: string;
  /** Empty: every variety. */
  readonly variety: string;
  readonly check: PinCheck;
  readonly value: string;
  readonly why: string;
  readonly source: string;
}

export interface PinResult extends Pin {
  readonly passed: boolean;
  /** What was found: the entries checked, with their narrow form and derivation. */
  readonly found: readonly { readonly key: string; readonly narrow: string; readonly derivation: BuildEntry["derivation"] }[];
  /** Why it failed (empty when it passed). */
  readonly message: string;
}

/** Start columns (1-based, code points) of the comma-separated fields of a line (quotes respected). */
function fieldColumns(text: string): number[] {
  const cols = [1];
  let quoted = false;
  [...text].forEach((c, k) => {
    if (c === '"') quoted = !quoted;
    else if (c === "," && !quoted) cols.push(k + 2);
  });
  return cols;
}

/**
 * Reads `<lexiconDir>/pinned.csv` (absent: no pins). `varieties`: the names a pin may name.
 * Columns: entry, variety, check (is | has | lacks | matches), value, why, source; a header row;
 * `#` at the start of a line comments it out.
 */
export function readPins(lexiconDir: string, varieties: readonly string[]): { pins: Pin[]; diagnostics: Diagnostic[] } {
  const file = join(lexiconDir, PINNED_FILE);
  if (!existsSync(file)) return { pins: [], diagnostics: [] };
  const text = readFileSync(file, "utf8");
  const lines = text.split(/\r?\n/);
  const at = (line: number, column = 1, length = 1) => ({ file, line, column, length });
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, { bom: true, comment: "#", comment_no_infix: true, relax_column_count: true, skip_empty_lines: true, trim: true, info: true }) as unknown as typeof records;
  } catch (e) {
    const err = e as { message?: string; lines?: number };
    return { pins: [], diagnostics: [diagnostic("error", "pinned/csv-syntax", `This is not valid CSV: ${(err.message ?? "unreadable").replace(/\s*at line \d+.*$/, "")}.`, at(err.lines ?? 1))] };
  }
  const ds: Diagnostic[] = [];
  const [head, ...rows] = records;
  if (head === undefined || head.record.join(",") !== PIN_COLUMNS.join(",")) {
    return { pins: [], diagnostics: [diagnostic("error", "pinned/header", `The header must be exactly ${PIN_COLUMNS.join(",")}.`, at(head?.info.lines ?? 1))] };
  }
  const pins: Pin[] = [];
  for (const r of rows) {
    const line = r.info.lines;
    const cols = fieldColumns(lines[line - 1] ?? "");
    const cell = (k: number): string => r.record[k] ?? "";
    const where = (k: number) => at(line, cols[k] ?? 1, Math.max(1, [...cell(k)].length));
    if (r.record.length !== PIN_COLUMNS.length) {
      ds.push(diagnostic("error", "pinned/columns", `This row has ${r.record.length} field${r.record.length === 1 ? "" : "s"}; a pin has ${PIN_COLUMNS.length} (${PIN_COLUMNS.join(", ")}).`, at(line)));
      continue;
    }
    const [entry, variety, check, value, why, source] = r.record as [string, string, string, string, string, string];
    if (entry === "") ds.push(diagnostic("error", "pinned/entry", `The entry is empty: give an entry key or a word.`, where(0)));
    if (variety !== "" && !varieties.includes(variety)) ds.push(diagnostic("error", "pinned/variety", `No variety '${variety}' in varieties.json (there are ${varieties.join(", ")}).`, where(1)));
    if (!(PIN_CHECKS as readonly string[]).includes(check)) {
      ds.push(diagnostic("error", "pinned/check", `Unknown check '${check}': use one of ${PIN_CHECKS.join(", ")}.`, where(2)));
      continue;
    }
    if (value === "") ds.push(diagnostic("error", "pinned/value", `The value is empty.`, where(3)));
    if (check === "matches") {
      try {
        new RegExp(value, "u");
      } catch (e) {
        ds.push(diagnostic("error", "pinned/pattern", `Not a valid pattern: ${(e as Error).message}.`, where(3)));
      }
    }
    if (why === "" || source === "") ds.push(diagnostic("error", "pinned/why", `Say why this is pinned and where it comes from (the why and source fields).`, where(why === "" ? 4 : 5)));
    pins.push({ line, entry, variety, check: check as PinCheck, value, why, source });
  }
  return { pins, diagnostics: ds };
}

/** Whether one narrow form satisfies a pin. */
export function satisfies(pin: Pick<Pin, "check" | "value">, narrow: string): boolean {
  switch (pin.check) {
    case "is": return narrow === pin.value;
    case "has": return narrow.includes(pin.value);
    case "lacks": return !narrow.includes(pin.value);
    case "matches": return new RegExp(pin.value, "u").test(narrow);
  }
}

const describeCheck = (p: Pin): string => (p.check === "is" ? `to be ${p.value}` : p.check === "has" ? `to contain ${p.value}` : p.check === "lacks" ? `to lack ${p.value}` : `to match /${p.value}/`);

/**
 * Checks the pins that apply to `variety` against the build's entries (streamed once; only the
 * entries a pin names are kept). A pin naming a key checks that entry; one naming a word checks
 * every entry of the word; a pin that finds no entry fails.
 */
export async function checkPins(build: BuildFolder, variety: string, pins: readonly Pin[]): Promise<PinResult[]> {
  const mine = pins.filter((p) => p.variety === "" || p.variety === variety);
  const wanted = new Set(mine.map((p) => p.entry));
  const byKey = new Map<string, BuildEntry>();
  const byWord = new Map<string, BuildEntry[]>();
  for await (const e of readEntries(build, variety)) {
    if (wanted.has(e.key)) byKey.set(e.key, e);
    if (wanted.has(e.word)) byWord.set(e.word, [...(byWord.get(e.word) ?? []), e]);
  }
  return mine.map((p) => {
    const hit = byKey.get(p.entry);
    const entries = hit !== undefined ? [hit] : byWord.get(p.entry) ?? [];
    const found = entries.map((e) => ({ key: e.key, narrow: e.narrow, derivation: e.derivation }));
    if (entries.length === 0) return { ...p, passed: false, found, message: `No entry '${p.entry}' in variety ${variety}.` };
    const bad = entries.filter((e) => !satisfies(p, e.narrow));
    const message = bad.length === 0 ? "" : `Expected ${p.entry} ${describeCheck(p)}; ${bad.map((e) => `${e.key} is ${e.narrow}`).join(", ")}.`;
    return { ...p, passed: bad.length === 0, found, message };
  });
}

/** Writes a variety's results to `<varietyDir>/pinned.json` (always, possibly an empty list). */
export async function writePinResults(varietyDir: string, results: readonly PinResult[]): Promise<void> {
  await writeFileAtomic(join(varietyDir, PIN_RESULTS), JSON.stringify(results, null, 1) + "\n");
}

/** The results a build recorded for a variety (none when it checked no pins). */
export function readPinResults(varietyDir: string): PinResult[] {
  const file = join(varietyDir, PIN_RESULTS);
  if (!existsSync(file)) return [];
  try {
    return JSON.parse(readFileSync(file, "utf8")) as PinResult[];
  } catch (e) {
    throw new BuildFolderError(diagnostic("error", "regress/bad-pins", `Not valid JSON (${(e as Error).message}); the file may be truncated; rebuild.`, { file, line: 1, column: 1 }));
  }
}

/** A failed pin for the terminal: the message, the pin's reason and source, each entry's derivation. */
export function formatPinFailure(r: PinResult, variety: string): string {
  const out = [`${PINNED_FILE}:${r.line}: ${variety}: ${r.message}`, `  why: ${r.why} (source: ${r.source})`];
  for (const f of r.found) {
    out.push(`  derivation of ${f.key}:`);
    if (f.derivation.length === 0) out.push(`    (no step changed it) ${f.narrow}`);
    for (const d of f.derivation) out.push(`    ${d.step.padEnd(24)} ${d.form}`);
  }
  return out.join("\n");
}

/**
 * After a build: checks the pins in every variety of the build folder and writes each variety's
 * pinned.json. Returns the failures, each rendered with its entries' derivations.
 */
export async function checkBuildPins(build: BuildFolder, varieties: readonly string[], pins: readonly Pin[]): Promise<{ checked: number; failures: string[] }> {
  let checked = 0;
  const failures: string[] = [];
  for (const v of varieties) {
    const results = await checkPins(build, v, pins);
    await writePinResults(join(build.dir, v), results);
    checked += results.length;
    for (const r of results) if (!r.passed) failures.push(formatPinFailure(r, v));
  }
  return { checked, failures };
}
