// `strata interactions -g DIR [-d VARIETY] [--lexicon FILE]`: exact feeding, bleeding and their
// counter-orders between every pair of steps, swaps, dead steps, shadowed environments
// (src/analyze/interactions.ts); a table, JSON or Graphviz DOT.

import { Option, type Command } from "commander";
import { runInteractionsCommand } from "../analyze/commands.js";
import { commonOptions, emit, EXIT, examples, grammarOptions, outOption, positiveInt, printDiagnostics, resolveGrammar } from "./common.js";

interface InteractionsOpts { grammar?: string; variety?: string; lexicon?: string; examples: number; format: "table" | "json" | "dot"; json?: boolean; out?: string; maxStates: number; quiet?: boolean }

export function registerInteractions(program: Command): void {
  const cmd = program
    .command("interactions")
    .description("exact rule interactions: feeding, bleeding, counterfeeding, counterbleeding, swaps, dead rules");
  grammarOptions(cmd);
  cmd
    .option("--lexicon <file>", "lexicon CSV: real entries that show each relation, and steps no entry triggers ('-' for standard input)")
    .option("--examples <n>", "most lexicon entries shown per relation", positiveInt, 3)
    .addOption(new Option("--format <format>", "a table, JSON or Graphviz DOT").choices(["table", "json", "dot"]).default("table"))
    .option("--json", "the same as --format json")
    .option("--max-states <n>", "largest machine or search one analysis may build before it is reported as not decided", positiveInt, 200_000);
  outOption(cmd, "file");
  commonOptions(cmd);
  examples(cmd, [
    ["strata interactions -g lexicons/en-us", "every pair of steps"],
    ["strata interactions -g lexicons/demo -d careful --json", "a variety's grammar, as JSON"],
    ["strata interactions -g lexicons/en-us --lexicon lexicons/demo/lexicon.csv --examples 5", "with real entries showing each relation"],
    ["strata interactions -g lexicons/en-us --format dot -o interactions.dot", "a Graphviz graph, written whole"],
  ]);
  cmd.action(async (o: InteractionsOpts) => {
    const format = o.json === true ? "json" : o.format;
    const resolved = resolveGrammar(o.grammar, o.variety);
    if ("diagnostics" in resolved) {
      printDiagnostics(resolved.diagnostics);
      process.exitCode = EXIT.badInput;
      return;
    }
    const r = await runInteractionsCommand({
      grammar: resolved.path, grammarName: o.grammar === undefined ? resolved.variety : o.variety !== undefined ? `${o.grammar} (${o.variety})` : o.grammar,
      ...(o.lexicon !== undefined ? { lexicon: o.lexicon } : {}), examples: o.examples, format, maxStates: o.maxStates,
    });
    printDiagnostics(r.diagnostics, { quiet: o.quiet === true });
    if (r.stdout !== "") await emit(r.stdout, o.out);
    if (o.quiet !== true && r.seconds !== undefined) process.stderr.write(`strata: interactions analysed in ${r.seconds.toFixed(1)} s\n`);
    process.exitCode = r.exitCode;
  });
}
