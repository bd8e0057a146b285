// `strata classes`: is a set of segments a natural class of the inventory, and by which minimal
// feature bundles; or, if not, the smallest natural class containing it and what else that lets in.

import { existsSync, readFileSync, statSync } from "node:fs";
import { FILE_LIMITS, readTextFile } from "../files.js";
import { dirname, join, resolve } from "node:path";
import type { Command } from "commander";
import { diagnostic, hasErrors, type Diagnostic } from "../diagnostics.js";
import { COMMAND_LINE, commandLineError, runColumns, commonOptions, EXIT, examples, grammarOptions, jsonOption, printOutcome, renderDiagnostics, resolveGrammar, useColour, type CommandOutcome } from "./common.js";
import {
  describeBundle,
  loadInventory,
  naturalClasses,
  tokenise,
  type Inventory,
  type PartialBundle,
} from "../inventory/index.js";

export type ClassesOutcome = CommandOutcome;

/**
 * Where the inventory lives for `-g PATH`: a folder holding segments.csv (and diacritics.csv),
 * an inventory .csv file, or a .strata grammar whose `inventory "…"` / `diacritics "…"` lines name
 * the files relative to the grammar's folder (segments.csv beside it when it names none).
 */
function locate(given: string | undefined, variety: string | undefined): { csv: string; diacritics?: string } | Diagnostic {
  const flags = ["-g", "--grammar"];
  if (given !== undefined && !existsSync(given)) return commandLineError("cli/no-such-path", `'${given}' does not exist: give a folder holding segments.csv, or a grammar file.`, given, flags);
  if (given !== undefined && variety === undefined && statSync(given).isDirectory() && existsSync(join(given, "segments.csv"))) return { csv: join(given, "segments.csv") };
  if (given !== undefined && given.endsWith(".csv")) return { csv: given };
  const r = resolveGrammar(given, variety);
  if ("diagnostics" in r) return r.diagnostics[0]!;
  const path = r.path;
  if (path.endsWith(".strata")) {
    const read = readTextFile(path, { what: "grammar file", limit: FILE_LIMITS.grammar, code: "cli/unreadable" });
    if (!read.ok) return read.diagnostic;
    const text = read.text;
    const dir = dirname(resolve(path));
    const named = (key: string): string | undefined => new RegExp(`^\\s*${key}\\s+"([^"]+)"`, "m").exec(text)?.[1];
    const inv = named("inventory");
    const dia = named("diacritics");
    const found: { csv: string; diacritics?: string } = { csv: join(dir, inv ?? "segments.csv") };
    if (dia !== undefined) found.diacritics = join(dir, dia);
    return found;
  }
  return commandLineError("cli/bad-grammar-path", `'${given}' is neither a folder, an inventory .csv nor a .strata grammar.`, given, flags);
}

const render = (ds: readonly Diagnostic[]): string => renderDiagnostics(ds, useColour());

const asObject = (inv: Inventory, b: PartialBundle): Record<string, string> =>
  Object.fromEntries([...b.entries()].sort((x, y) => x[0] - y[0]).map(([f, v]) => [inv.features[f]!, v]));

/** Runs the command without touching the process (the CLI prints the outcome and sets the exit code). */
export function runClasses(grammarPath: string | undefined, symbols: readonly string[], json: boolean, variety?: string): ClassesOutcome {
  const located = locate(grammarPath, variety);
  if ("severity" in located) return { stdout: "", stderr: render([located]), exitCode: EXIT.badInput };
  const loaded = loadInventory(located.csv, located.diacritics);
  let stderr = render(loaded.diagnostics);
  const inv = loaded.inventory;
  if (!inv || hasErrors(loaded.diagnostics)) return { stdout: "", stderr, exitCode: EXIT.badInput };

  // Each argument must be exactly one segment; its column is its place on the command line.
  const problems: Diagnostic[] = [];
  const columns = runColumns(symbols);
  symbols.forEach((sym, i) => {
    const column = columns[i]!;
    const r = tokenise(inv, sym, { file: COMMAND_LINE, line: 1, column });
    if (!r.ok) problems.push(r.error);
    else {
      const segs = r.tokens.filter((t) => t.kind === "segment");
      if (segs.length !== 1 || r.tokens.length !== 1) {
        problems.push(diagnostic("error", "cli/not-one-segment", `'${sym}' is not one segment: give each segment as its own argument.`, { file: COMMAND_LINE, line: 1, column, length: Array.from(sym).length }));
      }
    }
  });
  if (problems.length > 0) {
    stderr += render(problems);
    return { stdout: "", stderr, exitCode: EXIT.badInput };
  }

  const result = naturalClasses(inv, symbols);
  const set = symbols.join(" ");
  if (json) {
    const out = {
      symbols: [...symbols],
      natural: result.exact.length > 0,
      exact: result.exact.map((b) => ({ text: describeBundle(inv, b), features: asObject(inv, b) })),
      smallest: result.smallest
        ? { text: describeBundle(inv, result.smallest.bundle), features: asObject(inv, result.smallest.bundle), extra: result.smallest.extra }
        : null,
    };
    return { stdout: JSON.stringify(out, null, 2) + "\n", stderr, exitCode: 0 };
  }
  let stdout: string;
  if (result.exact.length > 0) {
    const n = result.exact.length;
    stdout = `${set} is a natural class; ${n === 1 ? "the minimal bundle is" : `the ${n} minimal bundles are`}:\n` + result.exact.map((b) => `  ${describeBundle(inv, b)}\n`).join("");
  } else {
    const s = result.smallest!;
    stdout =
      `${set} is not a natural class.\n` +
      `The smallest natural class containing it is ${describeBundle(inv, s.bundle)},\n` +
      `which also lets in: ${s.extra.join(" ")}\n`;
  }
  return { stdout, stderr, exitCode: 0 };
}

export function registerClasses(program: Command): void {
  const cmd = program
    .command("classes")
    .description("say whether the given segments form a natural class, with every minimal feature bundle that picks them out")
    .argument("<symbols...>", "the segments, in IPA, one per argument");
  grammarOptions(cmd, "a folder holding segments.csv, an inventory .csv, a .strata grammar, or a lexicon folder (default: the current folder)");
  jsonOption(cmd, "print the answer as JSON");
  commonOptions(cmd);
  examples(cmd, [
    ["strata classes -g lexicons/en-us p t k", "is {p t k} a natural class, and by which bundles"],
    ["strata classes -g lexicons/demo -d careful m n ŋ --json", "the same for a variety, as JSON"],
  ]);
  cmd.action(async (symbols: string[], o: { grammar?: string; variety?: string; json?: boolean }) => {
    await printOutcome(runClasses(o.grammar, symbols, o.json === true, o.variety));
  });
}
