// Shared pieces of the commands: printing diagnostics with their source line, resolving `-g`,
// loading a grammar and building an engine for it, the package's own folders.

import { existsSync, readFileSync, statSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import pc from "picocolors";
import { renderDiagnostic, type Diagnostic } from "../diagnostics.js";
import { loadGrammar, loadGrammarCached } from "../grammar/index.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import type { Engine } from "../lexicon/engine.js";
import { InterpreterEngine } from "../lexicon/engine-interp.js";
import { machineEngine } from "../lexicon/engine-machine.js";

/** The package's root folder (holding lexicons/), from this file's place in src/cli or dist/src/cli. */
export function packageRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 5; i++) {
    if (existsSync(join(dir, "package.json")) && existsSync(join(dir, "lexicons"))) return dir;
    dir = dirname(dir);
  }
  return process.cwd();
}

/** Renders diagnostics with the offending line and a caret, errors in red, warnings in yellow (on a terminal). */
export function printDiagnostics(ds: readonly Diagnostic[], stream: NodeJS.WriteStream = process.stderr): void {
  const cache = new Map<string, string | undefined>();
  const source = (file: string): string | undefined => {
    if (!cache.has(file)) {
      let text: string | undefined;
      try {
        text = existsSync(file) && statSync(file).isFile() ? readFileSync(file, "utf8") : undefined;
      } catch {
        text = undefined;
      }
      cache.set(file, text);
    }
    return cache.get(file);
  };
  const colour = stream.isTTY === true;
  for (const d of ds) {
    const text = renderDiagnostic(d, source(d.file));
    const paint = !colour ? (s: string) => s : d.severity === "error" ? pc.red : pc.yellow;
    stream.write(paint(text) + "\n");
  }
}

/**
 * `-g DIR [-d VARIETY]`: DIR/grammar.strata, or DIR/VARIETY.strata with -d, or a .strata file itself.
 */
export function grammarPath(g: string, variety?: string): string {
  const p = resolve(g);
  if (existsSync(p) && statSync(p).isDirectory()) return join(p, `${variety ?? "grammar"}.strata`);
  return p;
}

export type EngineKind = "machine" | "interpreter";

export interface LoadedEngine {
  readonly grammar: Grammar;
  readonly inventory: Inventory;
  readonly engine: Engine;
  readonly diagnostics: readonly Diagnostic[];
}

/** Loads, checks and compiles (or interprets) a grammar; diagnostics are returned, never thrown. */
export function loadEngine(
  path: string,
  opts: { kind?: EngineKind; cacheDir?: string; maxStates?: number; blame?: boolean; syllables?: boolean; derivations?: boolean } = {},
): LoadedEngine | { readonly diagnostics: readonly Diagnostic[] } {
  const g = opts.cacheDir !== undefined ? loadGrammarCached(path, opts.cacheDir) : loadGrammar(path);
  if (g.grammar === undefined || g.inventory === undefined || g.diagnostics.some((d) => d.severity === "error")) {
    return { diagnostics: g.diagnostics };
  }
  if (opts.kind === "interpreter") {
    return { grammar: g.grammar, inventory: g.inventory, engine: new InterpreterEngine(g.grammar, g.inventory, 16, opts.syllables ?? true), diagnostics: g.diagnostics };
  }
  const m = machineEngine(g.grammar, g.inventory, {
    ...(opts.cacheDir !== undefined ? { cacheDir: opts.cacheDir } : {}),
    ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}),
    ...(opts.blame !== undefined ? { blame: opts.blame } : {}),
    ...(opts.syllables !== undefined ? { syllables: opts.syllables } : {}),
    ...(opts.derivations !== undefined ? { derivations: opts.derivations } : {}),
  });
  if (m.engine === undefined) return { diagnostics: [...g.diagnostics, ...m.diagnostics] };
  return { grammar: g.grammar, inventory: g.inventory, engine: m.engine, diagnostics: [...g.diagnostics, ...m.diagnostics] };
}

/** Parses a positive integer option or exits with a clear message. */
export function positiveInt(name: string) {
  return (value: string): number => {
    const n = Number(value);
    if (!Number.isInteger(n) || n <= 0) {
      process.stderr.write(`strata: option ${name} needs a positive whole number, got '${value}'\n`);
      process.exit(2);
    }
    return n;
  };
}
