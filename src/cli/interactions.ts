// `strata interactions -g DIR [-d VARIETY] [--lexicon FILE]`: exact feeding, bleeding and their
// counter-orders between every pair of steps, swaps, dead steps, shadowed environments
// (src/analyze/interactions.ts); a table, JSON or Graphviz DOT.

import type { Command } from "commander";
import { runInteractionsCommand } from "../analyze/commands.js";
import { grammarPath, printDiagnostics } from "./common.js";
import { emit, internal } from "./explain.js";

interface InteractionsOpts { grammar: string; variety?: string; lexicon?: string; examples: number; format: string; json: boolean; out?: string; maxStates: number; quiet: boolean }

const whole = (name: string) => (v: string): number => {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 1) {
    process.stderr.write(`command line:1:1: error: ${name} needs a positive whole number, not '${v}'. [cli/bad-option]\n`);
    process.exit(1);
  }
  return n;
};

export function registerInteractions(program: Command): void {
  program
    .command("interactions")
    .description("exact rule interactions: feeding, bleeding, counterfeeding, counterbleeding, swaps, dead rules")
    .requiredOption("-g, --grammar <path>", "grammar folder (holding grammar.strata) or a .strata file")
    .option("-d, --variety <name>", "use <folder>/<name>.strata instead of grammar.strata")
    .option("--lexicon <file>", "lexicon CSV: real entries that show each relation, and steps no entry triggers ('-' for standard input)")
    .option("--examples <n>", "most lexicon entries shown per relation", whole("--examples"), 3)
    .option("--format <format>", "table, json or dot (Graphviz)", "table")
    .option("--json", "the same as --format json", false)
    .option("--max-states <n>", "largest machine or search one analysis may build before it is reported as not decided", whole("--max-states"), 200_000)
    .option("-o, --out <file>", "write to this file (whole) instead of standard output")
    .option("-q, --quiet", "errors only on standard error", false)
    .addHelpText("after", `
Examples:
  strata interactions -g lexicons/en-us
  strata interactions -g lexicons/en-us -d careful --json
  strata interactions -g lexicons/en-us --lexicon lexicons/demo/lexicon.csv --examples 5
  strata interactions -g lexicons/en-us --format dot -o interactions.dot && dot -Tsvg interactions.dot > interactions.svg
`)
    .action(async (o: InteractionsOpts) => {
      const format = o.json ? "json" : o.format;
      if (format !== "table" && format !== "json" && format !== "dot") {
        process.stderr.write(`command line:1:1: error: --format must be table, json or dot, not '${o.format}'. [cli/bad-option]\n`);
        process.exitCode = 1;
        return;
      }
      const r = await internal(() => runInteractionsCommand({
        grammar: grammarPath(o.grammar, o.variety), grammarName: o.variety !== undefined ? `${o.grammar} (${o.variety})` : o.grammar,
        ...(o.lexicon !== undefined ? { lexicon: o.lexicon } : {}), examples: o.examples, format, maxStates: o.maxStates,
      }));
      printDiagnostics(o.quiet ? r.diagnostics.filter((d) => d.severity === "error") : r.diagnostics);
      if (r.stdout !== "") emit(r.stdout, o.out);
      if (!o.quiet && r.seconds !== undefined) process.stderr.write(`strata: interactions analysed in ${r.seconds.toFixed(1)} s\n`);
      process.exitCode = r.exitCode;
    });
}
