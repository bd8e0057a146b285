// Shared pieces of the commands: the package's own folders, loading a grammar and building an engine
// for it. The conventions every command follows live beside this file and are re-exported here, so a
// new command imports everything from "./common.js":
//   options.ts  shared option declarations (-g/-d, cache, -q/--color, --json, -o) and help examples
//   variety.ts  `-g PATH -d NAME` → one grammar file
//   cmdline.ts  diagnostics positioned on the command line
//   paths.ts    input/output path checks, output ≠ input, file-system errors as one line
//   output.ts   printing diagnostics, colour, standard output that survives `| head`, `-o FILE`
//   exit.ts     the exit-code table, CommandOutcome, plural()

import { existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import type { Diagnostic } from "../diagnostics.js";
import { loadGrammar, loadGrammarCached } from "../grammar/index.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import type { Engine } from "../lexicon/engine.js";
import { InterpreterEngine } from "../lexicon/engine-interp.js";
import { machineEngine } from "../lexicon/engine-machine.js";

export * from "./exit.js";
export * from "./cmdline.js";
export * from "./options.js";
export * from "./output.js";
export * from "./paths.js";
export * from "./variety.js";

/** The package's root folder (holding lexicons/), from this file's place in src/cli or dist/src/cli. */
export function packageRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 5; i++) {
    if (existsSync(join(dir, "package.json")) && existsSync(join(dir, "lexicons"))) return dir;
    dir = dirname(dir);
  }
  return process.cwd();
}

/** The shipped General American grammar folder. */
export const shippedGrammar = (): string => join(packageRoot(), "lexicons", "en-us");

export type EngineKind = "machine" | "interpreter";
export const ENGINE_KINDS: readonly EngineKind[] = ["machine", "interpreter"];

export interface LoadedEngine {
  readonly grammar: Grammar;
  readonly inventory: Inventory;
  readonly engine: Engine;
  readonly diagnostics: readonly Diagnostic[];
}

/** Loads and checks a grammar (through the checked-grammar cache when there is a cache folder). */
export function loadChecked(path: string, cacheDir: string | undefined, root?: string): ReturnType<typeof loadGrammar> {
  const o = root !== undefined ? { root } : {};
  return cacheDir !== undefined ? loadGrammarCached(path, cacheDir, o) : loadGrammar(path, o);
}

/** Loads, checks and compiles (or interprets) a grammar; diagnostics are returned, never thrown. */
export function loadEngine(
  path: string,
  opts: { kind?: EngineKind; cacheDir?: string; maxStates?: number; blame?: boolean; syllables?: boolean; derivations?: boolean; ties?: boolean } = {},
): LoadedEngine | { readonly diagnostics: readonly Diagnostic[] } {
  const g = loadChecked(path, opts.cacheDir);
  if (g.grammar === undefined || g.inventory === undefined || g.diagnostics.some((d) => d.severity === "error")) {
    return { diagnostics: g.diagnostics };
  }
  if (opts.kind === "interpreter") {
    return { grammar: g.grammar, inventory: g.inventory, engine: new InterpreterEngine(g.grammar, g.inventory, 16, opts.syllables ?? true, opts.ties ?? false), diagnostics: g.diagnostics };
  }
  const m = machineEngine(g.grammar, g.inventory, {
    ...(opts.cacheDir !== undefined ? { cacheDir: opts.cacheDir } : {}),
    ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}),
    ...(opts.blame !== undefined ? { blame: opts.blame } : {}),
    ...(opts.syllables !== undefined ? { syllables: opts.syllables } : {}),
    ...(opts.derivations !== undefined ? { derivations: opts.derivations } : {}),
    ...(opts.ties === true ? { ties: true } : {}),
  });
  if (m.engine === undefined) return { diagnostics: [...g.diagnostics, ...m.diagnostics] };
  return { grammar: g.grammar, inventory: g.inventory, engine: m.engine, diagnostics: [...g.diagnostics, ...m.diagnostics] };
}
