// `strata explain -g DIR [-d VARIETY] WORD-OR-PRON… [--from FILE] [--json]`: derivation tables, the
// compiled machine run one step at a time (src/analyze/explain.ts).

import { Option, type Command } from "commander";
import { runExplainCommand, type Arg } from "../analyze/commands.js";
import { commonOptions, emit, EXIT, examples, grammarOptions, outOption, positiveInt, printDiagnostics, resolveGrammar, useColour } from "./common.js";

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

interface ExplainOpts { grammar?: string; variety?: string; from?: string; json?: boolean; format: "table" | "json"; out?: string; color?: boolean; maxVariants: number; quiet?: boolean }

export function registerExplain(program: Command): void {
  const cmd = program
    .command("explain")
    .description("derivation tables: each word through the compiled grammar one step at a time")
    .argument("[words...]", "broad IPA pronunciations (stress marks allowed), or spellings found in --from");
  grammarOptions(cmd);
  cmd
    .option("--from <file>", "lexicon CSV: explain the spellings named, or every entry when none is named ('-' for standard input)")
    .addOption(new Option("--format <format>", "what to print").choices(["table", "json"]).default("table"))
    .option("--json", "the same as --format json")
    .option("--max-variants <n>", "most derivations shown per word", positiveInt, 16);
  outOption(cmd, "file");
  commonOptions(cmd);
  examples(cmd, [
    ['strata explain -g lexicons/en-us "ˈbʌtən" "ˈwɔtɚ"', "two pronunciations, step by step"],
    ['strata explain -g lexicons/demo -d careful "ˈbɑtəl"', "through a variety's grammar"],
    ["strata explain -g lexicons/en-us --from lexicons/demo/lexicon.csv Tasperton", "a spelling looked up in a lexicon"],
    ['strata explain -g lexicons/en-us --json "ˈkæn"', "as JSON"],
  ]);
  cmd.action(async (words: string[], o: ExplainOpts) => {
    // --color here underlines changed segments (without it, carets mark them).
    const color = o.color ?? (o.out === undefined && useColour(process.stdout));
    const resolved = resolveGrammar(o.grammar, o.variety);
    if ("diagnostics" in resolved) {
      printDiagnostics(resolved.diagnostics);
      process.exitCode = EXIT.badInput;
      return;
    }
    const r = await runExplainCommand({
      grammar: resolved.path, words: argColumns(process.argv.slice(2), words),
      ...(o.from !== undefined ? { from: o.from } : {}), json: o.json === true || o.format === "json", color, maxVariants: o.maxVariants,
    });
    printDiagnostics(r.diagnostics, { quiet: o.quiet === true });
    if (r.stdout !== "") await emit(r.stdout, o.out);
    process.exitCode = r.exitCode;
  });
}
