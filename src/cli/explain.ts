// `strata explain -g DIR [-d VARIETY] WORD-OR-PRON… [--from FILE] [--json]`: derivation tables, the
// compiled machine run one step at a time (src/analyze/explain.ts).

import { writeFileSync, renameSync } from "node:fs";
import type { Command } from "commander";
import { runExplainCommand, type Arg } from "../analyze/commands.js";
import { grammarPath, printDiagnostics } from "./common.js";

/** Each argument with the column where it starts on the command line (for positioned messages). */
export function argColumns(argv: readonly string[], words: readonly string[]): Arg[] {
  const line = argv.join(" ");
  let from = 0;
  return words.map((w) => {
    const at = line.indexOf(w, from);
    from = at >= 0 ? at + w.length : from;
    return { text: w, column: at >= 0 ? Array.from(line.slice(0, at)).length + 1 : 1 };
  });
}

/**
 * Runs a command's library side; an internal error (a bug in Strata) prints one line asking for a
 * report (the stack only with STRATA_DEBUG=1) and exits 70 (DEVELOPERS.md, exit codes).
 */
export async function internal<T>(f: () => Promise<T>): Promise<T> {
  try {
    return await f();
  } catch (e) {
    process.stderr.write(`strata: internal error: ${e instanceof Error ? e.message : String(e)}. Please report it with the command you ran.\n`);
    if (process.env["STRATA_DEBUG"] === "1" && e instanceof Error && e.stack !== undefined) process.stderr.write(e.stack + "\n");
    process.exit(70);
  }
}

/** Writes a whole file (temp file, then rename) or standard output. */
export function emit(text: string, out: string | undefined): void {
  if (out === undefined) { process.stdout.write(text); return; }
  const tmp = `${out}.${process.pid}.tmp`;
  writeFileSync(tmp, text);
  renameSync(tmp, out);
}

interface ExplainOpts { grammar: string; variety?: string; from?: string; json: boolean; format: string; out?: string; color?: boolean; maxVariants: number }

export function registerExplain(program: Command): void {
  program
    .command("explain")
    .description("derivation tables: each word through the compiled grammar one step at a time")
    .argument("[words...]", "broad IPA pronunciations (stress marks allowed), or spellings found in --from")
    .requiredOption("-g, --grammar <path>", "grammar folder (holding grammar.strata) or a .strata file")
    .option("-d, --variety <name>", "use <folder>/<name>.strata instead of grammar.strata")
    .option("--from <file>", "lexicon CSV: explain the spellings named, or every entry when none is named ('-' for standard input)")
    .option("--format <format>", "table or json", "table")
    .option("--json", "the same as --format json", false)
    .option("--max-variants <n>", "most derivations shown per word", (v: string) => Number(v), 16)
    .option("-o, --out <file>", "write to this file (whole) instead of standard output")
    .option("--color", "underline changed segments (default: on a terminal when NO_COLOR is unset)")
    .option("--no-color", "mark changed segments with carets")
    .addHelpText("after", `
Examples:
  strata explain -g lexicons/en-us "ˈbʌtən" "ˈwɔtɚ"
  strata explain -g lexicons/en-us -d careful "ˈbɑtəl"
  strata explain -g lexicons/en-us --from lexicons/demo/lexicon.csv Tasperton
  strata explain -g lexicons/en-us --json "ˈkæn"
`)
    .action(async (words: string[], o: ExplainOpts) => {
      const color = o.color ?? (o.out === undefined && process.stdout.isTTY === true && process.env["NO_COLOR"] === undefined);
      if (!["table", "json"].includes(o.format) || !Number.isInteger(o.maxVariants) || o.maxVariants < 1) {
        const bad = !["table", "json"].includes(o.format) ? `--format must be table or json, not '${o.format}'.` : "--max-variants needs a positive whole number.";
        process.stderr.write(`command line:1:1: error: ${bad} [cli/bad-option]\n`);
        process.exitCode = 1;
        return;
      }
      const r = await internal(() => runExplainCommand({
        grammar: grammarPath(o.grammar, o.variety), words: argColumns(process.argv.slice(2), words),
        ...(o.from !== undefined ? { from: o.from } : {}), json: o.json || o.format === "json", color, maxVariants: o.maxVariants,
      }));
      printDiagnostics(r.diagnostics);
      if (r.stdout !== "") emit(r.stdout, o.out);
      process.exitCode = r.exitCode;
    });
}
