// `strata compare OLD NEW`: what changed between two builds, why, and whether it was intended
// (the logic is in src/regress/; this file parses options and prints).

import { InvalidArgumentError, Option, type Command } from "commander";
import { runCompare } from "../regress/run.js";
import { printDiagnostics } from "./common.js";

interface CompareCliOptions {
  variety?: string;
  expect?: string[];
  examples: number;
  json: boolean;
  out?: string;
  reportOnly: boolean;
  quiet: boolean;
  color?: boolean;
}

/** Colour: --color / --no-color, else only on a terminal and when NO_COLOR is unset. */
export const useColor = (flag: boolean | undefined, stream: NodeJS.WriteStream = process.stdout): boolean =>
  flag ?? (stream.isTTY === true && (process.env["NO_COLOR"] ?? "") === "");

const count = (name: string) => (v: string): number => {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 0) throw new InvalidArgumentError(`${name} needs a whole number, got '${v}'.`);
  return n;
};

export function registerCompare(program: Command): void {
  program
    .command("compare")
    .description("compare two builds: entries added, removed, changed (by cause), the rule blamed for each change, pinned expectations")
    .argument("<old>", "the old build folder (build/<lexicon>/, e.g. the accepted baseline)")
    .argument("<new>", "the new build folder")
    .option("-d, --variety <name>", "compare only this variety")
    .option("--expect <names...>", "changes that are intended: rule names, or 'input' for edited, added and removed rows")
    .addOption(new Option("--examples <n>", "examples printed per rule").default(5).argParser(count("--examples")))
    .option("--json", "print the whole comparison as JSON", false)
    .option("-o, --out <dir>", "also write compare.json, junit.xml and report.html into this folder")
    .option("--report-only", "exit 0 even when there are unexpected changes or failed expectations", false)
    .option("-q, --quiet", "print nothing but errors", false)
    .option("--color", "colour the summary")
    .option("--no-color", "never colour")
    .addHelpText("after", `
Exit codes: 0 no unexpected change and every pinned expectation holds; 1 bad input (not a build,
another lexicon, other varieties, a missing or truncated file); 4 unexpected changes or failed
expectations (0 with --report-only).

Examples:
  strata compare lexicons/demo/baseline build/demo
  strata compare lexicons/demo/baseline build/demo --expect flapping -o build/report
  strata compare old/demo build/demo -d general --json`)
    .action(async (oldDir: string, newDir: string, o: CompareCliOptions) => {
      const outcome = await runCompare(oldDir, newDir, {
        ...(o.variety !== undefined ? { variety: o.variety } : {}),
        ...(o.expect !== undefined ? { expect: o.expect } : {}),
        examples: o.examples, json: o.json, ...(o.out !== undefined ? { out: o.out } : {}),
        reportOnly: o.reportOnly, quiet: o.quiet, color: useColor(o.color),
      });
      printDiagnostics(outcome.diagnostics);
      process.stdout.write(outcome.stdout);
      process.exitCode = outcome.exitCode;
    });
}
