// The bench's data: the whole CMU Pronouncing Dictionary (npm `cmu-pronouncing-dictionary`, a dev
// dependency) converted once into a Strata lexicon folder, and read back into symbol arrays.

import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join, relative } from "node:path";
import { dictionary } from "cmu-pronouncing-dictionary";
import { formatDiagnostic } from "../src/diagnostics.js";
import { csvLine } from "../src/emit/csv.js";
import { importArpabetDictionary, loadArpabetTable } from "../src/lexicon/arpabet.js";
import { readLexicon } from "../src/lexicon/read.js";
import type { Inventory } from "../src/inventory/types.js";
import { WORD_EDGE, type Sym } from "../src/interp/index.js";

export interface CmuFolder {
  /** The lexicon folder (holds lexicon.csv and varieties.json). */
  readonly dir: string;
  readonly csv: string;
  /** Entries in the dictionary object (headwords with "(2)" etc. are alternative pronunciations). */
  readonly entries: number;
  /** Rows written to the CSV (entries the ARPAbet import accepted). */
  readonly rows: number;
  readonly rejects: number;
}

/**
 * Writes `<root>/build/bench/cmu/lexicon.csv` (word, pron, note: the `strata import` CSV form) and a
 * `varieties.json` with one variety, "general", running lexicons/en-us/grammar.strata. Rewritten on
 * every run (a few seconds), so a stale file never feeds the figures.
 */
export function writeCmuFolder(root: string): CmuFolder {
  const dir = join(root, "build", "bench", "cmu");
  mkdirSync(dir, { recursive: true });
  const table = loadArpabetTable(join(root, "lexicons", "en-us", "arpabet.csv"));
  if (table.table === undefined) throw new Error(table.diagnostics.map(formatDiagnostic).join("\n"));
  const dict = dictionary as Readonly<Record<string, string>>;
  const imported = importArpabetDictionary(dict, table.table, { file: "cmu-pronouncing-dictionary" });
  const lines: string[] = [csvLine(["word", "pron", "note"])];
  for (const r of imported.rows) lines.push(csvLine([r.word, r.pron, r.note ?? ""]));
  const csv = join(dir, "lexicon.csv");
  writeFileSync(csv, lines.join(""));
  const grammar = relative(dir, join(root, "lexicons", "en-us", "grammar.strata")).split("\\").join("/");
  const manifest = { lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar }] };
  writeFileSync(join(dir, "varieties.json"), JSON.stringify(manifest, null, 2) + "\n");
  return { dir, csv, entries: Object.keys(dict).length, rows: imported.rows.length, rejects: imported.rejects.length };
}

export interface CmuWord {
  readonly word: string;
  /** 1-based line in lexicon.csv. */
  readonly line: number;
  /** The pronunciation as the reader gives it, bracketed `#` … `#` as the runner does. */
  readonly syms: Sym[];
}

/** Reads lexicon.csv with the lexicon reader (the same reader `strata build` uses). */
export async function readCmuWords(csv: string, inventory: Inventory): Promise<{ words: CmuWord[]; rejects: number }> {
  if (!existsSync(csv)) throw new Error(`no ${csv}`);
  const words: CmuWord[] = [];
  let rejects = 0;
  const reader = readLexicon(csv, { inventory });
  for await (const item of reader) {
    if (item.kind === "reject") {
      rejects++;
      continue;
    }
    words.push({ word: item.word, line: item.line, syms: [WORD_EDGE, ...item.symbols, WORD_EDGE] });
  }
  const errors = reader.diagnostics.filter((d) => d.severity === "error");
  if (errors.length > 0) throw new Error(errors.map(formatDiagnostic).join("\n"));
  return { words, rejects };
}

/** Every entry's symbol ids concatenated into one array, with offsets (entry k is ids[at[k] … at[k+1])). */
export interface SymbolArrays {
  readonly ids: Int32Array;
  readonly at: Int32Array;
  /** One view per entry into `ids` (no copies). */
  readonly views: readonly Int32Array[];
}

/** Encodes every word with `encode` (null: outside the alphabet, which is an error here). */
export function packSymbols(words: readonly CmuWord[], encode: (w: readonly Sym[]) => number[] | null): SymbolArrays {
  return packArrays(words.map((w) => {
    const ids = encode(w.syms);
    if (ids === null) throw new Error(`${w.word} (line ${w.line}): a segment outside the compiled alphabet`);
    return ids;
  }));
}

/** Concatenates symbol arrays into one Int32Array with entry offsets and a view per entry. */
export function packArrays(parts: readonly ArrayLike<number>[]): SymbolArrays {
  const at = new Int32Array(parts.length + 1);
  parts.forEach((p, i) => (at[i + 1] = at[i]! + p.length));
  const ids = new Int32Array(at[parts.length]!);
  parts.forEach((p, i) => ids.set(p, at[i]!));
  const views = parts.map((_, i) => ids.subarray(at[i]!, at[i + 1]!));
  return { ids, at, views };
}

/** The package root (the folder holding package.json), from this file's place in dist/bench/. */
export function packageRootFrom(metaUrl: string): string {
  let dir = new URL(".", metaUrl).pathname;
  for (let k = 0; k < 4; k++) {
    if (existsSync(join(dir, "package.json")) && readFileSync(join(dir, "package.json"), "utf8").includes('"name": "strata"')) return dir;
    dir = join(dir, "..");
  }
  throw new Error("cannot find the package root");
}
