// `strata classes`: is a set of segments a natural class of the inventory, and by which minimal
// feature bundles; or, if not, the smallest natural class containing it and what else that lets in.

import { existsSync, readFileSync, statSync } from "node:fs";
import { FILE_LIMITS, readTextFile } from "../files.js";
import { dirname, join, resolve } from "node:path";
import type { Command } from "commander";
import { diagnostic, hasErrors, renderDiagnostic, type Diagnostic } from "../diagnostics.js";
import {
  describeBundle,
  loadInventory,
  naturalClasses,
  tokenise,
  type Inventory,
  type PartialBundle,
} from "../inventory/index.js";

export interface ClassesOutcome {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
}

const COMMAND_LINE = "<command line>";

/**
 * Where the inventory lives for `-g PATH`: a folder holding segments.csv (and diacritics.csv),
 * an inventory .csv file, or a .strata grammar whose `inventory "…"` / `diacritics "…"` lines name
 * the files relative to the grammar's folder (segments.csv beside it when it names none).
 */
function locate(path: string): { csv: string; diacritics?: string } | Diagnostic {
  const where = { file: COMMAND_LINE, line: 1, column: 1 };
  if (!existsSync(path)) return diagnostic("error", "cli/no-such-path", `'${path}' does not exist: give a folder holding segments.csv, or a grammar file.`, where);
  if (statSync(path).isDirectory()) return { csv: join(path, "segments.csv") };
  if (path.endsWith(".csv")) return { csv: path };
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
  return diagnostic("error", "cli/bad-grammar-path", `'${path}' is neither a folder, an inventory .csv nor a .strata grammar.`, where);
}

function render(ds: readonly Diagnostic[], sources: ReadonlyMap<string, string>): string {
  return ds
    .map((d) => {
      let text = sources.get(d.file);
      if (text === undefined && d.file !== COMMAND_LINE && existsSync(d.file)) {
        try {
          text = readFileSync(d.file, "utf8");
        } catch {
          text = undefined;
        }
      }
      return renderDiagnostic(d, text) + "\n";
    })
    .join("");
}

const asObject = (inv: Inventory, b: PartialBundle): Record<string, string> =>
  Object.fromEntries([...b.entries()].sort((x, y) => x[0] - y[0]).map(([f, v]) => [inv.features[f]!, v]));

/** Runs the command without touching the process (the CLI prints the outcome and sets the exit code). */
export function runClasses(grammarPath: string, symbols: readonly string[], json: boolean): ClassesOutcome {
  const located = locate(grammarPath);
  if ("severity" in located) return { stdout: "", stderr: render([located], new Map()), exitCode: 1 };
  const loaded = loadInventory(located.csv, located.diacritics);
  let stderr = render(loaded.diagnostics, new Map());
  const inv = loaded.inventory;
  if (!inv || hasErrors(loaded.diagnostics)) return { stdout: "", stderr, exitCode: 1 };

  // Each argument must be exactly one segment; its column is its place in the joined argument list.
  const problems: Diagnostic[] = [];
  const line = symbols.join(" ");
  let column = 1;
  for (const sym of symbols) {
    const r = tokenise(inv, sym, { file: COMMAND_LINE, line: 1, column });
    if (!r.ok) problems.push(r.error);
    else {
      const segs = r.tokens.filter((t) => t.kind === "segment");
      if (segs.length !== 1 || r.tokens.length !== 1) {
        problems.push(diagnostic("error", "cli/not-one-segment", `'${sym}' is not one segment: give each segment as its own argument.`, { file: COMMAND_LINE, line: 1, column, length: Array.from(sym).length }));
      }
    }
    column += Array.from(sym).length + 1;
  }
  if (problems.length > 0) {
    stderr += render(problems, new Map([[COMMAND_LINE, line]]));
    return { stdout: "", stderr, exitCode: 1 };
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
  program
    .command("classes")
    .description("Say whether the given segments form a natural class, with every minimal feature bundle that picks them out.")
    .requiredOption("-g, --grammar <path>", "folder holding segments.csv and diacritics.csv, or a .strata grammar file")
    .option("--json", "print the answer as JSON")
    .argument("<symbols...>", "the segments, in IPA, one per argument")
    .action((symbols: string[], opts: { grammar: string; json?: boolean }) => {
      const out = runClasses(opts.grammar, symbols, opts.json === true);
      process.stdout.write(out.stdout);
      process.stderr.write(out.stderr);
      if (out.exitCode !== 0) process.exitCode = out.exitCode;
    });
}
