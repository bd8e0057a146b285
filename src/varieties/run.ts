// `strata varieties` as a library call: compare the varieties of a build, render the summary, the
// TSV table or JSON, write the files of `-o DIR` (comparison.tsv, comparison.json, report.html)
// when asked, and pick the exit code.

import { join } from "node:path";
import type { Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { compareVarieties, type VarietiesComparison } from "./compare.js";
import { formatTerminal, formatTsv, varietiesJson } from "./format.js";
import { formatVarietiesHtml } from "./html.js";

export type VarietiesFormat = "table" | "tsv" | "json";

export interface RunVarietiesOptions {
  readonly varieties?: readonly string[];
  readonly format: VarietiesFormat;
  /** Examples printed per rule and sets printed per pair in the table (the files hold every one). */
  readonly examples: number;
  /** Folder for comparison.tsv, comparison.json and report.html. */
  readonly out?: string;
  readonly quiet: boolean;
  readonly color: boolean;
}

export interface VarietiesOutcome {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
  readonly diagnostics: readonly Diagnostic[];
  readonly comparison?: VarietiesComparison;
  /** Names given that the build does not have (the command line shows them at their argument). */
  readonly unknown?: readonly string[];
  /** Files written (with -o). */
  readonly files: readonly string[];
}

/** The files `-o DIR` writes. */
export const VARIETIES_FILES = { tsv: "comparison.tsv", json: "comparison.json", html: "report.html" } as const;

export async function runVarieties(dir: string, o: RunVarietiesOptions): Promise<VarietiesOutcome> {
  const res = await compareVarieties(dir, { ...(o.varieties !== undefined ? { varieties: o.varieties } : {}), examples: o.examples });
  if (res.comparison === undefined) return { stdout: "", stderr: "", exitCode: 1, diagnostics: res.diagnostics, files: [], ...(res.unknown !== undefined ? { unknown: res.unknown } : {}) };
  const c = res.comparison;
  const files: string[] = [];
  if (o.out !== undefined) {
    for (const [name, text] of [[VARIETIES_FILES.tsv, formatTsv(c)], [VARIETIES_FILES.json, varietiesJson(c)], [VARIETIES_FILES.html, formatVarietiesHtml(c)]] as const) {
      const path = join(o.out, name);
      await writeFileAtomic(path, text);
      files.push(path);
    }
  }
  const stdout = o.format === "json" ? varietiesJson(c) : o.format === "tsv" ? formatTsv(c) : o.quiet ? "" : formatTerminal(c, { color: o.color, examples: o.examples });
  return { stdout, stderr: "", exitCode: 0, diagnostics: [], comparison: c, files };
}
