// The options every command shares, declared once (names, parsers, help), and the help examples.
// Values are checked by the argument parser (choices, number parsers), so a bad value is reported
// at its place on the command line before the command runs.

import { statSync } from "node:fs";
import { resolve } from "node:path";
import { InvalidArgumentError, Option, type Command } from "commander";
import type { Diagnostic } from "../diagnostics.js";
import { probeCacheDir } from "../compile/cache.js";

/** A whole number ≥ 1 (`--max-states`, `--check`, `--limit`, `--min-count`). */
export function positiveInt(value: string): number {
  const n = Number(value);
  if (!/^\s*\d+\s*$/.test(value) || !Number.isSafeInteger(n) || n < 1) throw new InvalidArgumentError("It must be a whole number of 1 or more.");
  return n;
}

/** A whole number ≥ 0 (`--samples`). */
export function wholeNumber(value: string): number {
  const n = Number(value);
  if (!/^\s*\d+\s*$/.test(value) || !Number.isSafeInteger(n)) throw new InvalidArgumentError("It must be a whole number of 0 or more.");
  return n;
}

/** A list of choices, comma-separated and/or repeated (`--format tsv,pls` or `--format tsv --format pls`). */
export function listOf<T extends string>(choices: readonly T[]): (value: string, previous: T[] | undefined) => T[] {
  return (value, previous) => {
    const items = value.split(",").map((s) => s.trim()).filter((s) => s !== "");
    if (items.length === 0) throw new InvalidArgumentError(`Give one or more of ${choices.join(", ")}.`);
    for (const it of items) if (!(choices as readonly string[]).includes(it)) throw new InvalidArgumentError(`'${it}' is not one of ${choices.join(", ")}.`);
    const all = [...(previous ?? []), ...(items as T[])];
    return all.filter((x, i) => all.indexOf(x) === i);
  };
}

/** `-g, --grammar`, `-d, --variety` (resolved by `resolveGrammar` in variety.ts) and `--root` (the project root, grammar/source.ts). */
export function grammarOptions(cmd: Command, grammarHelp = "a grammar folder, a .strata file, or a lexicon folder holding varieties.json (default: the current folder)"): Command {
  return cmd
    .option("-g, --grammar <path>", grammarHelp)
    .option("-d, --variety <name>", "the variety, by its name in varieties.json (in a grammar folder: NAME.strata; 'general' is grammar.strata)")
    .addOption(rootOption());
}

/** `--root DIR`: the project root every file a grammar names must lie in (grammar/source.ts); set for the command by program.ts. */
export function rootOption(): Option {
  return new Option("--root <dir>", "the project root: files a grammar names (includes, bases, inventory) must lie inside it (default: the nearest folder holding .strata-root, else the grammar's folder)")
    .argParser((value: string) => {
      let ok = false;
      try {
        ok = statSync(value).isDirectory();
      } catch {
        ok = false;
      }
      if (!ok) throw new InvalidArgumentError(`There is no folder '${value}'.`);
      return value;
    });
}

/** `--cache-dir`, `--no-cache` and `--max-states` for commands that compile. */
export function cacheOptions(cmd: Command, compiles = true): Command {
  cmd.option("--cache-dir <dir>", "where compiled grammars are cached (default: $STRATA_CACHE_DIR, else build/cache)").option("--no-cache", "neither read nor write the cache");
  if (compiles) cmd.option("--max-states <n>", "largest composed block before the cascade splits", positiveInt);
  return cmd;
}

/** The cache folder the options ask for: undefined with --no-cache. */
export function cacheDirOf(o: { cache?: boolean; cacheDir?: string }, fallback = "build/cache"): string | undefined {
  if (o.cache === false) return undefined;
  const env = process.env["STRATA_CACHE_DIR"];
  return resolve(o.cacheDir ?? (env !== undefined && env !== "" ? env : fallback));
}

/**
 * The cache folder, checked: one that cannot be created or written is a warning and the command
 * runs without a cache (a cache problem is never fatal).
 */
export function openCache(o: { cache?: boolean; cacheDir?: string }, fallback = "build/cache"): { readonly dir?: string; readonly diagnostics: readonly Diagnostic[] } {
  const dir = cacheDirOf(o, fallback);
  return dir === undefined ? { diagnostics: [] } : probeCacheDir(dir);
}

/** `-q, --quiet`, `--color` and `--no-color` (every command). */
export function commonOptions(cmd: Command): Command {
  return cmd
    .option("-q, --quiet", "errors only: no warnings, progress or summaries")
    .addOption(new Option("--color", "colour the messages (default: on a terminal, unless NO_COLOR is set)"))
    .addOption(new Option("--no-color", "never colour the messages"));
}

/** `--json` for commands whose output is data. */
export function jsonOption(cmd: Command, what = "print the result as JSON"): Command {
  return cmd.option("--json", what);
}

/** `-o, --out`: a file (stdout when absent) or a folder, by what the command writes. */
export function outOption(cmd: Command, kind: "file" | "folder", help?: string): Command {
  return cmd.option("-o, --out <" + (kind === "file" ? "file" : "dir") + ">", help ?? (kind === "file" ? "write to this file (whole: temporary file, then rename) instead of standard output" : "the output folder"));
}

/** The examples every `--help` ends with: `[command line, what it does]`. */
export function examples(cmd: Command, lines: readonly (readonly [string, string])[]): Command {
  const w = Math.max(...lines.map(([c]) => c.length));
  return cmd.addHelpText("after", `\nExamples:\n${lines.map(([c, what]) => `  $ ${c.padEnd(w)}   # ${what}`).join("\n")}\n`);
}
