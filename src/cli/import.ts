// `strata import --arpabet FILE`: turns an ARPAbet-coded pronunciation dictionary into a Strata
// lexicon CSV (word, pron, note) through the mapping table, with every unreadable entry reported.

import { readFile } from "node:fs/promises";
import { Option, type Command } from "commander";
import { diagnostic, formatDiagnostic } from "../diagnostics.js";
import type { Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { csvLine } from "../emit/csv.js";
import { STRESS_POLICIES, importArpabetText, loadArpabetTable } from "../lexicon/arpabet.js";
import type { ImportedRow, StressPolicy } from "../lexicon/arpabet.js";
import { rejectDiagnostic, writeRejects } from "../lexicon/read.js";

export interface ImportOptions {
  /** The ARPAbet dictionary to read. */
  readonly arpabet: string;
  /** Output CSV; standard output when absent. */
  readonly output?: string;
  /** Mapping table; the shipped lexicons/en-us/arpabet.csv when absent. */
  readonly table?: string;
  /** Rejects CSV (written even when empty); `<output>.rejects.csv` when absent and an output file is given. */
  readonly rejects?: string;
  /** Exit 0 even when some entries were rejected. */
  readonly allowRejects?: boolean;
  /** The spelling's case: keep (default) or lower. */
  readonly case?: "keep" | "lower";
  /** Stress policies (lexicon/arpabet.ts STRESS_POLICIES). */
  readonly stressPolicy?: readonly StressPolicy[];
}

export interface ImportOutcome {
  readonly stdout: string;
  readonly stderr: string;
  /** 0 success; 1 some entries rejected (and not allowed); 2 the import could not run. */
  readonly exitCode: number;
}

/** How many rejects are printed one by one before the rest is only counted. */
const SHOWN_REJECTS = 20;

/** The lexicon CSV for imported rows: header `word,pron,note`, one row per pronunciation. */
export function* importedCsv(rows: readonly ImportedRow[]): Generator<string> {
  // A `tags` column only when some row has tags (the weak-forms policy).
  const tags = rows.some((r) => r.tags !== undefined);
  yield csvLine(tags ? ["word", "pron", "tags", "note"] : ["word", "pron", "note"]);
  for (const r of rows) yield csvLine(tags ? [r.word, r.pron, (r.tags ?? []).join(" "), r.note ?? ""] : [r.word, r.pron, r.note ?? ""]);
}

/** Runs the import without touching the process (the command prints the outcome and sets the exit code). */
export async function runImport(opts: ImportOptions): Promise<ImportOutcome> {
  const fail = (d: Diagnostic): ImportOutcome => ({ stdout: "", stderr: formatDiagnostic(d) + "\n", exitCode: 2 });
  const loaded = loadArpabetTable(opts.table);
  if (loaded.table === undefined) return { stdout: "", stderr: loaded.diagnostics.map((d) => formatDiagnostic(d) + "\n").join(""), exitCode: 2 };

  let text: string;
  try {
    text = await readFile(opts.arpabet, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === "ENOENT" ? "there is no such file" : code === "EISDIR" ? "it is a folder" : (e as Error).message;
    return fail(diagnostic("error", "import/unreadable", `Cannot read the dictionary: ${why}.`, { file: opts.arpabet, line: 1, column: 1 }));
  }
  const result = importArpabetText(text, loaded.table, { file: opts.arpabet, ...(opts.case !== undefined ? { case: opts.case } : {}), policies: opts.stressPolicy ?? [] });

  let stdout = "";
  if (opts.output !== undefined) {
    await writeFileAtomic(opts.output, importedCsv(result.rows));
  } else {
    stdout = [...importedCsv(result.rows)].join("");
  }
  const rejectsPath = opts.rejects ?? (opts.output !== undefined ? `${opts.output}.rejects.csv` : undefined);
  // Written even when empty, so a rejects file from an earlier run never outlives its import.
  if (rejectsPath !== undefined) await writeRejects(rejectsPath, result.rejects);

  let stderr = "";
  for (const r of result.rejects.slice(0, SHOWN_REJECTS)) stderr += formatDiagnostic(rejectDiagnostic(r)) + "\n";
  if (result.rejects.length > SHOWN_REJECTS) {
    stderr += `… and ${result.rejects.length - SHOWN_REJECTS} more rejects${rejectsPath !== undefined ? ` (all in ${rejectsPath})` : ""}\n`;
  } else if (result.rejects.length > 0 && rejectsPath !== undefined) {
    stderr += `rejects written to ${rejectsPath}\n`;
  }
  // Reconciliation: every line is an entry written, a reject, a comment or a blank line.
  stderr +=
    `import: ${result.lines} lines read = ${result.rows.length} entries written + ${result.rejects.length} rejected` +
    ` + ${result.comments} comment + ${result.blanks} blank\n`;
  // Every mapping rule and stress policy that can change entries, with its count (never silent).
  for (const [name, n] of Object.entries(result.changed)) stderr += `import: ${name}: ${n} ${n === 1 ? "entry" : "entries"} changed\n`;
  const exitCode = result.rejects.length > 0 && opts.allowRejects !== true ? 1 : 0;
  if (exitCode === 1) stderr += "import: some entries were rejected; pass --allow-rejects to accept the rest anyway\n";
  return { stdout, stderr, exitCode };
}

/** Adds `strata import` to the program. */
export function registerImport(program: Command): void {
  program
    .command("import")
    .description("turn an ARPAbet-coded dictionary (WORD  PH1 PH2 …, stress digits on vowels, WORD(2) alternates) into a lexicon CSV")
    .requiredOption("--arpabet <file>", "the ARPAbet dictionary to read")
    .option("-o, --output <file>", "the lexicon CSV to write (default: standard output)")
    .option("--table <file>", "ARPAbet → IPA mapping table (default: the shipped lexicons/en-us/arpabet.csv)")
    .option("--rejects <file>", "where to write rejected entries as CSV (default: <output>.rejects.csv)")
    .option("--allow-rejects", "exit 0 even if some entries were rejected")
    .addOption(new Option("--case <case>", "the spelling's letter case").choices(["keep", "lower"]).default("keep"))
    .addOption(new Option("--stress-policy <names...>", "stress policies for CMU-style dictionaries (see lexicons/en-us/README.md)").choices([...STRESS_POLICIES]))
    .action(async (o: { arpabet: string; output?: string; table?: string; rejects?: string; allowRejects?: boolean; case?: "keep" | "lower"; stressPolicy?: StressPolicy[] }) => {
      const outcome = await runImport(o);
      if (outcome.stdout !== "") process.stdout.write(outcome.stdout);
      if (outcome.stderr !== "") process.stderr.write(outcome.stderr);
      process.exitCode = outcome.exitCode;
    });
}
