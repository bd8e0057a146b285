// `strata compare` as a library call: compare two builds, render the terminal summary or JSON, write
// the machine-readable files (compare.json, junit.xml, report.html) when asked, pick the exit code.

import { join } from "node:path";
import { formatDiagnostic, type Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { compareBuilds, type Comparison } from "./compare.js";
import { formatHtml } from "./html.js";
import { formatTerminal } from "./terminal.js";

export interface RunCompareOptions {
  readonly variety?: string;
  readonly expect?: readonly string[];
  /** Examples printed per rule (the machine-readable outputs hold every change). */
  readonly examples: number;
  readonly json: boolean;
  /** Folder for compare.json, junit.xml and report.html. */
  readonly out?: string;
  /** Exit 0 even with unexpected changes or failed expectations. */
  readonly reportOnly: boolean;
  readonly quiet: boolean;
  readonly color: boolean;
}

export interface Outcome {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
  readonly diagnostics: readonly Diagnostic[];
  readonly comparison?: Comparison;
  /** Files written (with -o). */
  readonly files: readonly string[];
}

/** The files `-o DIR` writes. */
export const REPORT_FILES = { json: "compare.json", junit: "junit.xml", html: "report.html" } as const;

/** The comparison as JSON (what --json prints and compare.json holds). */
export const comparisonJson = (c: Comparison): string => JSON.stringify(c, null, 1) + "\n";

export async function runCompare(oldDir: string, newDir: string, o: RunCompareOptions): Promise<Outcome> {
  const res = await compareBuilds(oldDir, newDir, { ...(o.variety !== undefined ? { variety: o.variety } : {}), ...(o.expect !== undefined ? { expect: o.expect } : {}), examples: o.examples });
  if (res.comparison === undefined) {
    return { stdout: "", stderr: res.diagnostics.map((d) => formatDiagnostic(d) + "\n").join(""), exitCode: 1, diagnostics: res.diagnostics, files: [] };
  }
  const c = res.comparison;
  const files: string[] = [];
  if (o.out !== undefined) {
    const write = async (name: string, text: string): Promise<void> => {
      const path = join(o.out!, name);
      await writeFileAtomic(path, text);
      files.push(path);
    };
    await write(REPORT_FILES.json, comparisonJson(c));
    // Loaded here: junit.ts brings in xmlbuilder2, which every other command would load for nothing.
    const { formatJunit } = await import("./junit.js");
    await write(REPORT_FILES.junit, formatJunit(c));
    await write(REPORT_FILES.html, formatHtml(c));
  }
  const failing = c.unexpected > 0 || c.failedExpectations > 0;
  const stdout = o.json ? comparisonJson(c) : o.quiet ? "" : formatTerminal(c, { color: o.color, examples: o.examples });
  return { stdout, stderr: "", exitCode: failing && !o.reportOnly ? 4 : 0, diagnostics: [], comparison: c, files };
}
