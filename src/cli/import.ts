// `strata import --arpabet FILE`: turns an ARPAbet-coded pronunciation dictionary into a Strata
// lexicon CSV (word, pron, note) through the mapping table, with every unreadable entry reported.

import { readFile } from "node:fs/promises";
import { text as readStream } from "node:stream/consumers";
import { Option, type Command } from "commander";
import { diagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { csvLine } from "../emit/csv.js";
import { STRESS_POLICIES, importArpabetText, loadArpabetTable } from "../lexicon/arpabet.js";
import type { ImportedRow, ImportResult, StressPolicy } from "../lexicon/arpabet.js";
import { rejectDiagnostic, writeRejects } from "../lexicon/read.js";
import { JOINS_COUNT, applyJoinOverrides, readJoinOverrides } from "../lexicon/arpabet-joins.js";
import {
  checkInputFile, checkNotAnInput, checkOutputPath, commonOptions, EXIT, examples, outOption, plural, printOutcome, renderDiagnostics, useColour,
  type CommandOutcome,
} from "./common.js";

export interface ImportOptions {
  /** The ARPAbet dictionary to read; `-` for standard input. */
  readonly arpabet: string;
  /** Output CSV; standard output when absent. */
  readonly out?: string;
  /** Standard input, when the dictionary is `-` (default: process.stdin). */
  readonly input?: NodeJS.ReadableStream;
  /** No summary lines. */
  readonly quiet?: boolean;
  /** Mapping table; the shipped lexicons/en-us/arpabet.csv when absent. */
  readonly table?: string;
  /** Rejects CSV (written even when empty); `<output>.rejects.csv` when absent and an output file is given. */
  readonly rejects?: string;
  /** The import's counts as JSON (every mapping rule and stress policy with its count); `<output>.summary.json` when absent and an output file is given. */
  readonly summary?: string;
  /** Exit 0 even when some entries were rejected. */
  readonly allowRejects?: boolean;
  /** The spelling's case: keep (default) or lower. */
  readonly case?: "keep" | "lower";
  /** Stress policies (lexicon/arpabet.ts STRESS_POLICIES). */
  readonly stressPolicy?: readonly StressPolicy[];
  /** Overrides CSV (word,pron) adding joins to imported pronunciations (lexicon/arpabet-joins.ts). */
  readonly joins?: string;
}

/** Exit 0 success; 3 some entries rejected (and not allowed); 1 the import could not run. */
export type ImportOutcome = CommandOutcome;

/** How many rejects are printed one by one before the rest is only counted. */
const SHOWN_REJECTS = 20;

/** The lexicon CSV for imported rows: header `word,pron,note`, one row per pronunciation. */
export function* importedCsv(rows: readonly ImportedRow[]): Generator<string> {
  // A `tags` column only when some row has tags (the weak-forms policy).
  const tags = rows.some((r) => r.tags !== undefined);
  yield csvLine(tags ? ["word", "pron", "tags", "note"] : ["word", "pron", "note"]);
  for (const r of rows) yield csvLine(tags ? [r.word, r.pron, (r.tags ?? []).join(" "), r.note ?? ""] : [r.word, r.pron, r.note ?? ""]);
}

/**
 * The import's summary file: counts only (lines read = entries + rejects + comments + blanks), and
 * every mapping rule and stress policy that can change entries with the entries it changed; the
 * policies also tag each entry they changed (lexicon/arpabet.ts), for the build's summary.
 */
export function importSummaryJson(r: ImportResult): string {
  return JSON.stringify({ lines: r.lines, entries: r.rows.length, rejected: r.rejects.length, comments: r.comments, blanks: r.blanks, changed: r.changed }, null, 2) + "\n";
}

/** Runs the import without touching the process (the command prints the outcome and sets the exit code). */
export async function runImport(opts: ImportOptions): Promise<ImportOutcome> {
  const render = (ds: readonly Diagnostic[]): string => renderDiagnostics(ds, useColour());
  const fail = (d: Diagnostic): ImportOutcome => ({ stdout: "", stderr: render([d]), exitCode: EXIT.badInput });
  // Paths first: nothing is read or written when an output would land on an input or cannot be made.
  const inputs = [opts.arpabet, ...(opts.table !== undefined ? [opts.table] : []), ...(opts.joins !== undefined ? [opts.joins] : [])];
  const rejectsPath = opts.rejects ?? (opts.out !== undefined ? `${opts.out}.rejects.csv` : undefined);
  const summaryPath = opts.summary ?? (opts.out !== undefined ? `${opts.out}.summary.json` : undefined);
  const problem =
    checkInputFile(opts.arpabet, ["--arpabet"], "dictionary") ??
    (opts.table !== undefined ? checkInputFile(opts.table, ["--table"], "mapping table") : undefined) ??
    (opts.joins !== undefined ? checkInputFile(opts.joins, ["--joins"], "overrides file") : undefined) ??
    (opts.out !== undefined ? checkOutputPath(opts.out, ["-o", "--out"], "file") ?? checkNotAnInput({ value: opts.out, flags: ["-o", "--out"] }, inputs) : undefined) ??
    (opts.rejects !== undefined ? checkOutputPath(opts.rejects, ["--rejects"], "file") ?? checkNotAnInput({ value: opts.rejects, flags: ["--rejects"] }, [...inputs, ...(opts.out !== undefined ? [opts.out] : [])]) : undefined) ??
    (opts.summary !== undefined ? checkOutputPath(opts.summary, ["--summary"], "file") ?? checkNotAnInput({ value: opts.summary, flags: ["--summary"] }, [...inputs, ...(opts.out !== undefined ? [opts.out] : []), ...(rejectsPath !== undefined ? [rejectsPath] : [])]) : undefined);
  if (problem !== undefined) return fail(problem);
  const loaded = loadArpabetTable(opts.table);
  if (loaded.table === undefined) return { stdout: "", stderr: render(loaded.diagnostics), exitCode: EXIT.badInput };

  // Join overrides are read (and must be sound) before anything is imported or written.
  let overrides: ReturnType<typeof readJoinOverrides> | undefined;
  if (opts.joins !== undefined) {
    overrides = readJoinOverrides(await readFile(opts.joins, "utf8"), opts.joins);
    if (overrides.diagnostics.some((d) => d.severity === "error")) return { stdout: "", stderr: render(overrides.diagnostics), exitCode: EXIT.badInput };
  }

  const file = opts.arpabet === "-" ? "<stdin>" : opts.arpabet;
  let text: string;
  try {
    text = opts.arpabet === "-" ? await readStream(opts.input ?? process.stdin) : await readFile(opts.arpabet, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === "ENOENT" ? "there is no such file" : code === "EISDIR" ? "it is a folder" : (e as Error).message;
    return fail(diagnostic("error", "import/unreadable", `Cannot read the dictionary: ${why}.`, { file, line: 1, column: 1 }));
  }
  const imported = importArpabetText(text, loaded.table, { file, ...(opts.case !== undefined ? { case: opts.case } : {}), policies: opts.stressPolicy ?? [] });
  const joined = overrides !== undefined ? applyJoinOverrides(imported.rows, overrides.overrides, opts.joins!) : undefined;
  const result = joined === undefined ? imported : { ...imported, rows: joined.rows, changed: { ...imported.changed, [JOINS_COUNT]: joined.applied } };

  let stdout = "";
  if (opts.out !== undefined && opts.out !== "-") {
    await writeFileAtomic(opts.out, importedCsv(result.rows));
  } else {
    stdout = [...importedCsv(result.rows)].join("");
  }
  // Written even when empty, so a rejects file from an earlier run never outlives its import.
  if (rejectsPath !== undefined) await writeRejects(rejectsPath, result.rejects);
  if (summaryPath !== undefined) await writeFileAtomic(summaryPath, importSummaryJson(result));

  // Rejects are errors about rows: printed even with --quiet; unused overrides are warnings.
  let stderr = opts.quiet === true || joined === undefined ? "" : render(joined.diagnostics);
  stderr += render(result.rejects.slice(0, SHOWN_REJECTS).map(rejectDiagnostic));
  if (result.rejects.length > SHOWN_REJECTS) {
    stderr += `… and ${plural(result.rejects.length - SHOWN_REJECTS, "more reject")}${rejectsPath !== undefined ? ` (all in ${rejectsPath})` : ""}.\n`;
  } else if (result.rejects.length > 0 && rejectsPath !== undefined && opts.quiet !== true) {
    stderr += `Rejects written to ${rejectsPath}.\n`;
  }
  // Reconciliation: every line is an entry written, a reject, a comment or a blank line.
  if (opts.quiet !== true) {
    stderr +=
      `import: ${plural(result.lines, "line")} read = ${plural(result.rows.length, "entry", "entries")} written + ${result.rejects.length} rejected` +
      ` + ${result.comments} comment + ${result.blanks} blank\n`;
    // Every mapping rule and stress policy that can change entries, with its count (never silent).
    for (const [name, n] of Object.entries(result.changed)) stderr += `import: ${name}: ${plural(n, "entry", "entries")} changed\n`;
  }
  const exitCode = result.rejects.length > 0 && opts.allowRejects !== true ? EXIT.rejects : EXIT.ok;
  if (exitCode === EXIT.rejects) stderr += `import: ${plural(result.rejects.length, "entry was", "entries were")} rejected; pass --allow-rejects to accept the rest anyway.\n`;
  return { stdout, stderr, exitCode };
}

/** Adds `strata import` to the program. */
export function registerImport(program: Command): void {
  const cmd = program
    .command("import")
    .description("turn an ARPAbet-coded dictionary (WORD  PH1 PH2 …, stress digits on vowels, WORD(2) alternates) into a lexicon CSV")
    .requiredOption("--arpabet <file>", "the ARPAbet dictionary to read ('-' for standard input)");
  outOption(cmd, "file", "the lexicon CSV to write, whole (default: standard output)");
  cmd
    .option("--table <file>", "ARPAbet → IPA mapping table (default: the shipped lexicons/en-us/arpabet.csv)")
    .option("--rejects <file>", "where to write rejected entries as CSV (default: <out>.rejects.csv)")
    .option("--summary <file>", "where to write the counts as JSON, each mapping rule and stress policy with the entries it changed (default: <out>.summary.json)")
    .option("--allow-rejects", "exit 0 even if some entries were rejected")
    .addOption(new Option("--case <case>", "the spelling's letter case").choices(["keep", "lower"]).default("keep"))
    .addOption(new Option("--stress-policy <names...>", "stress policies for CMU-style dictionaries (see lexicons/en-us/README.md)").choices([...STRESS_POLICIES]))
    .option("--joins <file>", "CSV (word,pron) of pronunciations with their joins ('+', '#'): each replaces the imported pronunciation it equals without them");
  commonOptions(cmd);
  examples(cmd, [
    ["strata import --arpabet cmudict.dict -o lexicon.csv", "lexicon.csv, lexicon.csv.rejects.csv and lexicon.csv.summary.json"],
    ["strata import --arpabet cmudict.dict -o lexicon.csv --stress-policy weak-forms demote-second-primary", "each policy tags the entries it changed"],
    ["zcat dict.gz | strata import --arpabet - --case lower > lexicon.csv", "from standard input to standard output"],
    ["strata import --arpabet cmudict.dict --joins lexicons/en-us/joins.csv -o lexicon.csv", "compounds and prefixes with their joins marked"],
  ]);
  cmd.action(async (o: { arpabet: string; out?: string; table?: string; rejects?: string; summary?: string; allowRejects?: boolean; quiet?: boolean; case?: "keep" | "lower"; stressPolicy?: StressPolicy[]; joins?: string }) => {
    await printOutcome(await runImport(o));
  });
}
