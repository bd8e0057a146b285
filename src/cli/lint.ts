// `strata lint -g DIR [FILE]`: checks a lexicon CSV against a grammar's syllable constraints and the
// stress conventions, one positioned finding per problem, a count per code, optionally as JSON.

import type { Command } from "commander";
import { formatDiagnostic } from "../diagnostics.js";
import { lintContext, lintLexicon, type LintFinding, type LintReport } from "../lexicon/lint.js";
import {
  openCache, cacheOptions, checkInputFile, commonOptions, EXIT, examples, grammarOptions, jsonOption, loadChecked, plural, printOutcome, renderDiagnostics,
  resolveGrammar, useColour,
} from "./common.js";

export interface LintOptions {
  /** Grammar folder, .strata file or lexicon folder (default: the current folder). */
  readonly grammar?: string;
  /** The variety, by its name in varieties.json. */
  readonly variety?: string;
  /** Warnings left out of the findings. */
  readonly quiet?: boolean;
  readonly cache?: boolean;
  readonly cacheDir?: string;
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
  /** 0 no error-level finding (warnings allowed unless strict); 4 some error (or warning when strict); 1 lint could not run. */
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
  /** Suggestions (lint/unmarked-join): never fail the run. */
  readonly hints: number;
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
  s += `lint: ${plural(r.rows, "row")} read (${r.rejects} rejected), ${r.rowsWithFindings} with findings: ${plural(r.errors, "error")}, ${plural(r.warnings, "warning")}${r.hints > 0 ? `, ${plural(r.hints, "hint")}` : ""}\n`;
  return s;
}

/** Runs the lint without touching the process (the command prints the outcome and sets the exit code). */
export async function runLint(file: string | undefined, opts: LintOptions): Promise<LintOutcome> {
  const render = (ds: Parameters<typeof renderDiagnostics>[0]): string => renderDiagnostics(ds, useColour());
  const resolved = resolveGrammar(opts.grammar, opts.variety);
  if ("diagnostics" in resolved) return { stdout: "", stderr: render(resolved.diagnostics), exitCode: EXIT.badInput };
  const gpath = resolved.path;
  const cache = openCache(opts);
  const g = loadChecked(gpath, cache.dir);
  const gErrors = g.diagnostics.filter((d) => d.severity === "error");
  if (g.grammar === undefined || g.inventory === undefined || gErrors.length > 0) {
    return { stdout: "", stderr: render(g.diagnostics) + "lint: the grammar does not load; nothing was linted.\n", exitCode: EXIT.badInput };
  }
  const fromStdin = file === undefined || file === "-";
  if (!fromStdin) {
    const bad = checkInputFile(file, [], "lexicon");
    if (bad !== undefined) return { stdout: "", stderr: render([bad]), exitCode: EXIT.badInput };
  }
  const ctx = lintContext(g.grammar, g.inventory);
  const report = fromStdin
    ? await lintLexicon(opts.input ?? process.stdin, ctx, { file: "<stdin>" })
    : await lintLexicon(file, ctx);
  if (report.fatal) {
    return { stdout: "", stderr: render(report.findings) + "lint: the lexicon could not be read.\n", exitCode: EXIT.badInput };
  }
  const failed = report.errors > 0 || (opts.strict === true && report.warnings > 0);
  const exitCode = failed ? EXIT.checksFailed : EXIT.ok;
  if (opts.json === true) {
    const doc: LintJson = {
      file: report.file,
      grammar: gpath,
      rows: report.rows,
      rejects: report.rejects,
      rowsWithFindings: report.rowsWithFindings,
      errors: report.errors,
      warnings: report.warnings,
      hints: report.hints,
      counts: report.counts,
      findings: report.findings.map(jsonFinding),
    };
    return { stdout: JSON.stringify(doc, null, 2) + "\n", stderr: opts.quiet === true ? "" : render(cache.diagnostics), exitCode };
  }
  const shown = opts.quiet === true ? report.findings.filter((f) => f.severity === "error") : report.findings;
  const stdout = shown.map((f) => formatDiagnostic(f) + "\n").join("") + (opts.quiet === true ? "" : lintSummary(report));
  return { stdout, stderr: opts.quiet === true ? "" : render(cache.diagnostics), exitCode };
}

/** Adds `strata lint` to the program. */
export function registerLint(program: Command): void {
  const cmd = program
    .command("lint")
    .description("check a lexicon CSV: syllabification under the grammar's onsets and codas, stress marks, unreadable rows")
    .argument("[file]", "lexicon CSV (word,pron,...); '-' or nothing for standard input");
  grammarOptions(cmd);
  jsonOption(cmd, "print one JSON document (findings, counts per code, totals)");
  cmd.option("--strict", "fail (exit 4) on warnings as well as errors");
  cacheOptions(cmd, false);
  commonOptions(cmd);
  examples(cmd, [
    ["strata lint -g lexicons/en-us lexicons/demo/lexicon.csv", "findings with positions, then counts"],
    ["strata lint -g lexicons/demo -d careful --strict --json my.csv", "a variety's grammar; warnings fail too"],
    ["cat my.csv | strata lint -g lexicons/en-us -", "the lexicon from standard input"],
  ]);
  cmd.action(async (file: string | undefined, o: { grammar?: string; variety?: string; json?: boolean; strict?: boolean; quiet?: boolean; cache: boolean; cacheDir?: string }) => {
    await printOutcome(await runLint(file, {
      json: o.json === true, strict: o.strict === true, quiet: o.quiet === true, cache: o.cache,
      ...(o.grammar !== undefined ? { grammar: o.grammar } : {}),
      ...(o.variety !== undefined ? { variety: o.variety } : {}),
      ...(o.cacheDir !== undefined ? { cacheDir: o.cacheDir } : {}),
    }));
  });
}
