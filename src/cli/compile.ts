// `strata compile -g DIR`: compile a grammar's steps into transducers, compose the cascade, and
// print per-step and total sizes (states, arcs), the blocks, the cache state and the time taken.

import { existsSync, readFileSync, statSync } from "node:fs";
import { resolve } from "node:path";
import type { Command } from "commander";
import { diagnostic, hasErrors, renderDiagnostic, type Diagnostic } from "../diagnostics.js";
import { loadGrammar } from "../grammar/index.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { compileGrammar, type Compiled } from "../compile/index.js";

/** What a command run produced (the CLI writes it; tests read it). */
export interface CommandOutcome {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
}

const COMMAND_LINE = "<command line>";

/** Diagnostics rendered with their source line and a caret (one block each). */
export function renderAll(ds: readonly Diagnostic[]): string {
  const texts = new Map<string, string | undefined>();
  const source = (file: string): string | undefined => {
    if (!texts.has(file)) {
      let t: string | undefined;
      try {
        t = file !== COMMAND_LINE && existsSync(file) && statSync(file).isFile() ? readFileSync(file, "utf8") : undefined;
      } catch {
        t = undefined;
      }
      texts.set(file, t);
    }
    return texts.get(file);
  };
  return ds.map((d) => renderDiagnostic(d, source(d.file)) + "\n").join("");
}

/** `-g PATH`: a folder holding grammar.strata, or a .strata file. */
export function resolveGrammarPath(g: string): string | Diagnostic {
  const p = resolve(g);
  const where = { file: COMMAND_LINE, line: 1, column: 1 };
  if (!existsSync(p)) return diagnostic("error", "cli/no-such-path", `'${g}' does not exist: give a grammar folder (holding grammar.strata) or a .strata file.`, where);
  if (statSync(p).isDirectory()) {
    const main = resolve(p, "grammar.strata");
    if (!existsSync(main)) return diagnostic("error", "cli/no-grammar", `'${g}' holds no grammar.strata.`, where);
    return main;
  }
  if (!p.endsWith(".strata")) return diagnostic("error", "cli/bad-grammar-path", `'${g}' is neither a grammar folder nor a .strata file.`, where);
  return p;
}

/** Loads and checks the grammar at `-g`; errors come back as diagnostics. */
export function loadForCompile(g: string): { grammar: Grammar; inventory: Inventory; diagnostics: Diagnostic[] } | { diagnostics: Diagnostic[] } {
  const path = resolveGrammarPath(g);
  if (typeof path !== "string") return { diagnostics: [path] };
  const loaded = loadGrammar(path);
  if (loaded.grammar === undefined || loaded.inventory === undefined || hasErrors(loaded.diagnostics)) return { diagnostics: loaded.diagnostics };
  return { grammar: loaded.grammar, inventory: loaded.inventory, diagnostics: loaded.diagnostics };
}

export interface CompileCommandOptions {
  /** false: neither read nor write the cache. */
  readonly cache?: boolean;
  readonly cacheDir?: string;
  readonly maxStates?: number;
  readonly json?: boolean;
}

function table(rows: readonly (readonly string[])[], right: readonly boolean[]): string {
  const widths = rows[0]!.map((_, i) => Math.max(...rows.map((r) => [...r[i]!].length)));
  return rows.map((r) => r.map((c, i) => (right[i] ? c.padStart(widths[i]!) : c.padEnd(widths[i]!))).join("  ").trimEnd()).join("\n") + "\n";
}

const n = (x: number): string => x.toLocaleString("en-US");

/** The report `strata compile` prints. */
export function compileReport(path: string, c: Compiled, cacheDir: string | undefined): string {
  const rows: string[][] = [["step", "kind", "states", "arcs", "preferred states", "preferred arcs"]];
  for (const s of c.steps) {
    const same = s.preferredStates === s.states && s.preferredArcs === s.arcs;
    const pref = s.kind === "rule" && s.optional && s.preferredStates === 0 ? ["(skipped)", ""] : same ? ["=", ""] : [n(s.preferredStates), n(s.preferredArcs)];
    rows.push([s.name, s.kind + (s.optional ? " (optional)" : ""), n(s.states), n(s.arcs), ...pref]);
  }
  const totalStates = c.steps.reduce((a, s) => a + s.states, 0);
  const totalArcs = c.steps.reduce((a, s) => a + s.arcs, 0);
  rows.push(["all steps", "", n(totalStates), n(totalArcs), "", ""]);
  const stepName = (i: number): string => c.steps[i]?.name ?? "end";
  const blocks = (label: string, size: Compiled["preferredSize"]): string => {
    const parts = size.blocks.map((b, i) => `  block ${i + 1}: steps ${stepName(b.from)} … ${stepName(b.to - 1)}, ${n(b.states)} states, ${n(b.arcs)} arcs`);
    return `${label}: ${size.blocks.length} block${size.blocks.length === 1 ? "" : "s"}, ${n(size.states)} states, ${n(size.arcs)} arcs\n${parts.join("\n")}\n`;
  };
  const segs = c.alphabet.segments.length;
  const cacheLine = cacheDir === undefined ? "cache: off" : `cache: ${c.cache} (${resolve(cacheDir, `${c.cacheKey}.bin`)})`;
  const t = c.timings;
  return [
    `grammar: ${path}\n`,
    `alphabet: ${segs} segments (+ '#' and '.')\n`,
    table(rows, [false, false, true, true, true, true]),
    blocks("preferred cascade", c.preferredSize),
    c.hasVariants ? blocks("variants cascade", c.variantsSize) : "variants cascade: same as preferred (no optional rules or alpha ambiguity)\n",
    `${cacheLine}\n`,
    `time: ${Math.round(t.total)} ms (steps ${Math.round(t.steps)}, compose ${Math.round(t.compose)}, freeze ${Math.round(t.freeze)})\n`,
  ].join("");
}

/** Runs `strata compile`; pure apart from reading the grammar and the cache folder. */
export function runCompile(g: string, opts: CompileCommandOptions = {}): CommandOutcome {
  const loaded = loadForCompile(g);
  const warnings = loaded.diagnostics.filter((d) => d.severity === "warning");
  if (!("grammar" in loaded)) return { stdout: "", stderr: renderAll(loaded.diagnostics), exitCode: 1 };
  const cacheDir = opts.cache === false ? undefined : opts.cacheDir ?? "build/cache";
  const r = compileGrammar(loaded.grammar, loaded.inventory, {
    ...(cacheDir !== undefined ? { cacheDir } : {}),
    ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}),
  });
  const stderr = renderAll([...warnings, ...r.diagnostics]);
  if (r.compiled === null) return { stdout: "", stderr, exitCode: 1 };
  const c = r.compiled;
  if (opts.json === true) {
    const out = {
      grammar: resolveGrammarPath(g),
      alphabet: c.alphabet.segments.length,
      steps: c.steps,
      preferred: c.preferredSize,
      variants: c.hasVariants ? c.variantsSize : null,
      cache: cacheDir === undefined ? "off" : c.cache,
      timings: c.timings,
    };
    return { stdout: JSON.stringify(out, null, 2) + "\n", stderr, exitCode: 0 };
  }
  return { stdout: compileReport(String(resolveGrammarPath(g)), c, cacheDir), stderr, exitCode: 0 };
}

function positiveInt(name: string): (v: string) => number {
  return (v: string) => {
    const x = Number(v);
    if (!Number.isInteger(x) || x <= 0) throw new Error(`${name} needs a positive whole number, got '${v}'`);
    return x;
  };
}

export function registerCompile(program: Command): void {
  program
    .command("compile")
    .description("compile a grammar into transducers; print each step's and the cascade's states and arcs, and the cache state")
    .requiredOption("-g, --grammar <path>", "grammar folder (holding grammar.strata) or a .strata file")
    .option("--cache-dir <dir>", "where compiled machines are cached", "build/cache")
    .option("--no-cache", "neither read nor write the cache")
    .option("--max-states <n>", "largest composed block before the cascade splits", positiveInt("--max-states"))
    .option("--json", "print the figures as JSON", false)
    .action((opts: { grammar: string; cacheDir: string; cache: boolean; maxStates?: number; json: boolean }) => {
      const r = runCompile(opts.grammar, {
        cache: opts.cache, cacheDir: opts.cacheDir, json: opts.json,
        ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}),
      });
      process.stdout.write(r.stdout);
      process.stderr.write(r.stderr);
      process.exitCode = r.exitCode;
    });
}
