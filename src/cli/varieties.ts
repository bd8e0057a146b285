// `strata varieties BUILD`: how the varieties of one build differ — entries, the rules responsible,
// mergers and splits (the logic is in src/varieties/; this file parses options and prints).

import { Option, type Command } from "commander";
import { runVarieties, type VarietiesFormat } from "../varieties/run.js";
import { checkInputFolder, commandLineError, checkOutputPath, commonOptions, examples, outOption, positiveInt, printDiagnostics, useColour, writeOut } from "./common.js";

interface VarietiesCliOptions { variety?: string[]; format: VarietiesFormat; json?: boolean; examples: number; out?: string; quiet?: boolean }

/** `-d NAME`, repeated or comma-separated: the varieties to compare. */
const names = (value: string, previous: string[] | undefined): string[] => [...(previous ?? []), ...value.split(",").map((s) => s.trim()).filter((s) => s !== "")];

export function registerVarieties(program: Command): void {
  const cmd = program
    .command("varieties")
    .description("compare the varieties of a build: entries that differ and the rules responsible, mergers and splits")
    .argument("<build>", "a build folder (build/<lexicon>/, as strata build writes it)")
    .option("-d, --variety <names>", "the varieties to compare, repeated or comma-separated (one: it against each other; default: every pair)", names)
    .addOption(new Option("--format <format>", "a summary table, one TSV table of every finding, or JSON").choices(["table", "tsv", "json"]).default("table"))
    .option("--json", "the same as --format json")
    .option("--examples <n>", "examples per rule and sets per pair in the table", positiveInt, 5);
  outOption(cmd, "folder", "also write comparison.tsv, comparison.json and report.html into this folder");
  commonOptions(cmd);
  examples(cmd, [
    ["strata varieties build/demo", "every pair of the demo's varieties"],
    ["strata varieties build/demo -d general,careful --format tsv", "one pair, every finding as TSV"],
    ["strata varieties build/demo -d general --json", "general against each other variety, as JSON"],
    ["strata varieties build/demo -o build/reports/varieties", "also the TSV, JSON and HTML report files"],
  ]);
  cmd.action(async (build: string, o: VarietiesCliOptions) => {
    const problem = checkInputFolder(build, [], "build folder") ?? (o.out !== undefined ? checkOutputPath(o.out, ["-o", "--out"], "folder") : undefined);
    if (problem !== undefined) {
      printDiagnostics([problem]);
      process.exitCode = 1;
      return;
    }
    const r = await runVarieties(build, {
      ...(o.variety !== undefined ? { varieties: o.variety } : {}),
      format: o.json === true ? "json" : o.format, examples: o.examples,
      ...(o.out !== undefined ? { out: o.out } : {}), quiet: o.quiet === true, color: useColour(process.stdout),
    });
    // A variety the build lacks is shown at its -d argument.
    printDiagnostics(r.unknown === undefined ? r.diagnostics : r.unknown.map((n, i) => commandLineError(r.diagnostics[i]!.code, r.diagnostics[i]!.message, n, ["-d", "--variety"])));
    await writeOut(r.stdout);
    process.exitCode = r.exitCode;
  });
}
