// `strata lint -g DIR [FILE]`: checks a lexicon CSV against a grammar's syllable constraints and the
// stress conventions, one positioned finding per problem, a count per code, optionally as JSON.

import type { Command } from "commander";
import { formatDiagnostic } from "../diagnostics.js";
import { loadGrammar } from "../grammar/index.js";
import { lintContext, lintLexicon, type LintFinding, type LintReport } from "../lexicon/lint.js";
import { grammarPath } from "./common.js";

export interface LintOptions {
  /** Grammar folder (grammar.strata inside) or a .strata file. */
  readonly grammar: string;
  /** Use <grammar>/<dialect>.strata. */
  readonly dialect?: string;
  /** One JSON document on stdout instead of lines. */
  readonly json?: boolean;
  /** Exit 1 on warnings too. */
  readonly strict?: boolean;
  /** Lexicon source when no file is given (default: standard input). */
  readonly input?: NodeJS.ReadableStream;
}

export interface LintOutcome {
  readonly stdout: string;
  readonly stderr: string;
  /** 0 no error-level finding (warnings allowed unless strict); 1 some error (or warning when strict); 2 lint could not run. */
  readonly exitCode: number;
}

/** The JSON document `--json` prints. */
export interface LintJson {
  readonly file: string;
  readonly grammar: string;
  readonly rows: number;
  readonly rejects: number;
  readonly rowsWithFindings: number;
  readonly errors: number;
  readonly warnings: number;
  readonly counts: Readonly<Record<string, number>>;
  readonly findings: readonly {
    readonly line: number;
    readonly column: number;
    readonly length: number;
    readonly severity: string;
    readonly code: string;
    readonly message: string;
    readonly word?: string;
    readonly cluster?: string;
  }[];
}

const jsonFinding = (f: LintFinding): LintJson["findings"][number] => ({
  line: f.line,
  column: f.column,
  length: f.length ?? 1,
  severity: f.severity,
  code: f.code,
  message: f.message,
  ...(f.word !== undefined ? { word: f.word } : {}),
  ...(f.cluster !== undefined ? { cluster: f.cluster } : {}),
});

/** The summary lines: one count per code, then the totals. */
export function lintSummary(r: LintReport): string {
  let s = "";
  for (const [code, n] of Object.entries(r.counts)) s += `  ${String(n).padStart(7)}  ${code}\n`;
  s += `lint: ${r.rows} rows read (${r.rejects} rejected), ${r.rowsWithFindings} with findings: ${r.errors} errors, ${r.warnings} warnings\n`;
  return s;
}

/** Runs the lint without touching the process (the command prints the outcome and sets the exit code). */
export async function runLint(file: string | undefined, opts: LintOptions): Promise<LintOutcome> {
  const gpath = grammarPath(opts.grammar, opts.dialect);
  const g = loadGrammar(gpath);
  const gErrors = g.diagnostics.filter((d) => d.severity === "error");
  if (g.grammar === undefined || g.inventory === undefined || gErrors.length > 0) {
    return { stdout: "", stderr: g.diagnostics.map((d) => formatDiagnostic(d) + "\n").join("") + "lint: the grammar does not load; nothing was linted\n", exitCode: 2 };
  }
  const ctx = lintContext(g.grammar, g.inventory);
  const fromStdin = file === undefined || file === "-";
  const report = fromStdin
    ? await lintLexicon(opts.input ?? process.stdin, ctx, { file: "<stdin>" })
    : await lintLexicon(file, ctx);
  if (report.fatal) {
    return { stdout: "", stderr: report.findings.map((d) => formatDiagnostic(d) + "\n").join("") + "lint: the lexicon could not be read\n", exitCode: 2 };
  }
  const failed = report.errors > 0 || (opts.strict === true && report.warnings > 0);
  const exitCode = failed ? 1 : 0;
  if (opts.json === true) {
    const doc: LintJson = {
      file: report.file,
      grammar: gpath,
      rows: report.rows,
      rejects: report.rejects,
      rowsWithFindings: report.rowsWithFindings,
      errors: report.errors,
      warnings: report.warnings,
      counts: report.counts,
      findings: report.findings.map(jsonFinding),
    };
    return { stdout: JSON.stringify(doc, null, 2) + "\n", stderr: "", exitCode };
  }
  const stdout = report.findings.map((f) => formatDiagnostic(f) + "\n").join("") + lintSummary(report);
  return { stdout, stderr: "", exitCode };
}

/** Adds `strata lint` to the program. */
export function registerLint(program: Command): void {
  program
    .command("lint")
    .description("check a lexicon CSV: syllabification under the grammar's onsets and codas, stress marks, unreadable rows")
    .argument("[file]", "lexicon CSV (word,pron,...); '-' or nothing for standard input")
    .requiredOption("-g, --grammar <dir>", "grammar folder (grammar.strata inside) or a .strata file")
    .option("-d, --dialect <variety>", "use <dir>/<variety>.strata instead of grammar.strata")
    .option("--json", "print one JSON document (findings, counts per code, totals)", false)
    .option("--strict", "exit 1 on warnings as well as errors", false)
    .action(async (file: string | undefined, o: { grammar: string; dialect?: string; json: boolean; strict: boolean }) => {
      const outcome = await runLint(file, o);
      if (outcome.stdout !== "") process.stdout.write(outcome.stdout);
      if (outcome.stderr !== "") process.stderr.write(outcome.stderr);
      process.exitCode = outcome.exitCode;
    });
}
