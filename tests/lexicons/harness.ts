// Shared helpers for the shipped-grammar tests: load a General American variety, turn CMU
// Pronouncing Dictionary entries into broad IPA, and run words through the reference interpreter.

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { parse } from "csv-parse/sync";
import { dictionary } from "cmu-pronouncing-dictionary";
import { formatDiagnostic, type Diagnostic } from "../../src/diagnostics.js";
import { loadGrammar, type Grammar } from "../../src/grammar/index.js";
import { tokenise, type Inventory } from "../../src/inventory/index.js";
import { applyGrammar, prepareGrammar, symsToIpa, wordFromTokens, type GrammarRun, type PreparedGrammar, type Sym } from "../../src/interp/index.js";

export const EN_US = fileURLToPath(new URL("../../lexicons/en-us/", import.meta.url));
export const DEMO = fileURLToPath(new URL("../../lexicons/demo/", import.meta.url));

export interface Variety {
  readonly grammar: Grammar;
  readonly inventory: Inventory;
  readonly prepared: PreparedGrammar;
  /** Everything loadGrammar and prepareGrammar reported (warnings included). */
  readonly diagnostics: readonly Diagnostic[];
}

const loaded = new Map<string, Variety>();

/** Loads `lexicons/en-us/<file>` once per test file; throws with every diagnostic if it has errors. */
export function variety(file: "grammar.strata" | "careful.strata"): Variety {
  return grammarAt(EN_US + file);
}

/** Loads the grammar at an absolute path once per test file (the other shipped varieties). */
export function grammarAt(file: string): Variety {
  const hit = loaded.get(file);
  if (hit !== undefined) return hit;
  const r = loadGrammar(file);
  const errors = r.diagnostics.filter((d) => d.severity === "error");
  if (r.grammar === undefined || r.inventory === undefined || errors.length > 0) {
    throw new Error(`${file} does not load:\n${r.diagnostics.map(formatDiagnostic).join("\n")}`);
  }
  const prepared = prepareGrammar(r.grammar, r.inventory);
  const v: Variety = { grammar: r.grammar, inventory: r.inventory, prepared, diagnostics: [...r.diagnostics, ...prepared.diagnostics] };
  loaded.set(file, v);
  return v;
}

/** The `#`-bracketed symbol string of a broad IPA pronunciation (stress marks optional). */
export function wordOf(v: Variety, ipa: string): Sym[] {
  const t = tokenise(v.inventory, ipa);
  if (!t.ok) throw new Error(`cannot read /${ipa}/: ${t.error.message} (column ${t.error.column})`);
  return wordFromTokens(t.tokens, v.inventory);
}

/** Narrow IPA as the tests compare it: stress marks, and `.` between unstressed syllables. */
export const ipaOf = (v: Variety, w: readonly Sym[]): string => symsToIpa(w, v.inventory, { syllables: true });

export interface Result {
  /** The preferred output. */
  readonly preferred: string;
  /** Every output (sorted, distinct). */
  readonly all: readonly string[];
  readonly run: GrammarRun;
}

/** Runs broad IPA through a variety with the reference interpreter. */
export function derive(v: Variety, ipa: string): Result {
  const run = applyGrammar(v.prepared, v.inventory, wordOf(v, ipa));
  return { preferred: ipaOf(v, run.preferred), all: [...new Set(run.outputs.map((o) => ipaOf(v, o)))].sort(), run };
}

// ---------------------------------------------------------------------------------------------
// The CMU Pronouncing Dictionary (npm `cmu-pronouncing-dictionary`, ISC), read through the shipped
// ARPAbet table lexicons/en-us/arpabet.csv.

interface ArpabetRow {
  readonly arpabet: string;
  readonly stress: string;
  readonly ipa: string;
}

let arpabet: Map<string, string> | null = null;

function arpabetTable(): Map<string, string> {
  if (arpabet !== null) return arpabet;
  const rows = parse(readFileSync(EN_US + "arpabet.csv", "utf8"), { columns: true, comment: "#", skip_empty_lines: true }) as ArpabetRow[];
  arpabet = new Map();
  for (const r of rows) {
    if (r.stress === "-" || r.stress === "*") arpabet.set(r.arpabet, r.ipa);
    else arpabet.set(r.arpabet + r.stress, r.ipa);
  }
  return arpabet;
}

/** Broad IPA of a CMU ARPAbet string: `ˈ`/`ˌ` before vowels marked 1/2 (the reader puts them on that nucleus). */
export function arpabetToIpa(arpa: string): string {
  const table = arpabetTable();
  let out = "";
  for (const phone of arpa.split("#")[0]!.trim().split(/\s+/)) {
    const m = /^([A-Z]+)([012])?$/.exec(phone);
    if (m === null) throw new Error(`not an ARPAbet phone: ${phone}`);
    const [, base, digit] = m as unknown as [string, string, string | undefined];
    const ipa = table.get(base + (digit ?? "")) ?? table.get(base);
    if (ipa === undefined) throw new Error(`ARPAbet phone not in arpabet.csv: ${phone}`);
    out += (digit === "1" ? "ˈ" : digit === "2" ? "ˌ" : "") + ipa;
  }
  return out;
}

/** The broad IPA of a CMU headword (its first pronunciation). */
export function cmu(word: string): string {
  const arpa = (dictionary as Record<string, string>)[word];
  if (arpa === undefined) throw new Error(`"${word}" is not in the CMU Pronouncing Dictionary`);
  return arpabetToIpa(arpa);
}

/** Every CMU entry, in the package's order (headwords with "(2)" etc. are alternative pronunciations). */
export const cmuEntries = (): [string, string][] => Object.entries(dictionary as Record<string, string>);
