// `strata compile -g DIR`: compile a grammar's steps into transducers, compose the cascade, and
// print per-step and total sizes (states, arcs), the blocks, the cache state and the time taken.

import type { Command } from "commander";
import { hasErrors, type Diagnostic } from "../diagnostics.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { compileGrammar, type Compiled } from "../compile/index.js";
import { resolve } from "node:path";
import stringWidth from "string-width";
import {
  openCache, cacheOptions, commonOptions, EXIT, examples, grammarOptions, jsonOption, loadChecked, printOutcome, renderDiagnostics,
  resolveGrammar, useColour, type CommandOutcome,
} from "./common.js";
import { runExplainVariety } from "./explain-variety.js";

export type { CommandOutcome } from "./common.js";

/** Diagnostics rendered with their source line and a caret (one block each). */
export const renderAll = (ds: readonly Diagnostic[]): string => renderDiagnostics(ds, useColour());

/** Loads and checks the grammar `-g`/`-d` name; errors come back as diagnostics. */
export function loadForCompile(
  g: string | undefined,
  variety?: string,
  cacheDir?: string,
  root?: string,
): { grammar: Grammar; inventory: Inventory; path: string; diagnostics: readonly Diagnostic[] } | { diagnostics: readonly Diagnostic[] } {
  const r = resolveGrammar(g, variety);
  if ("diagnostics" in r) return { diagnostics: r.diagnostics };
  const loaded = loadChecked(r.path, cacheDir, root);
  if (loaded.grammar === undefined || loaded.inventory === undefined || hasErrors(loaded.diagnostics)) return { diagnostics: loaded.diagnostics };
  return { grammar: loaded.grammar, inventory: loaded.inventory, path: r.path, diagnostics: loaded.diagnostics };
}

export interface CompileCommandOptions {
  readonly variety?: string;
  /** Warnings left out. */
  readonly quiet?: boolean;
  /** false: neither read nor write the cache. */
  readonly cache?: boolean;
  readonly cacheDir?: string;
  readonly maxStates?: number;
  readonly json?: boolean;
  /** The project root (`--root`). */
  readonly root?: string;
}

function table(rows: readonly (readonly string[])[], right: readonly boolean[]): string {
  // Widths in terminal columns (string-width), so names with IPA combining marks line up.
  const widths = rows[0]!.map((_, i) => Math.max(...rows.map((r) => stringWidth(r[i]!))));
  const pad = (c: string, w: number, right: boolean): string => (right ? " ".repeat(w - stringWidth(c)) + c : c + " ".repeat(w - stringWidth(c)));
  return rows.map((r) => r.map((c, i) => pad(c, widths[i]!, right[i] === true)).join("  ").trimEnd()).join("\n") + "\n";
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
export function runCompile(g: string | undefined, opts: CompileCommandOptions = {}): CommandOutcome {
  const cache = openCache(opts);
  const cacheDir = cache.dir;
  const loaded = loadForCompile(g, opts.variety, cacheDir, opts.root);
  const warnings = opts.quiet === true ? [] : [...cache.diagnostics, ...loaded.diagnostics.filter((d) => d.severity === "warning")];
  if (!("grammar" in loaded)) return { stdout: "", stderr: renderAll(loaded.diagnostics.filter((d) => d.severity === "error" || opts.quiet !== true)), exitCode: EXIT.badInput };
  const r = compileGrammar(loaded.grammar, loaded.inventory, {
    ...(cacheDir !== undefined ? { cacheDir } : {}),
    ...(opts.maxStates !== undefined ? { maxStates: opts.maxStates } : {}),
  });
  const stderr = renderAll([...warnings, ...r.diagnostics.filter((d) => d.severity === "error" || opts.quiet !== true)]);
  if (r.compiled === null) return { stdout: "", stderr, exitCode: EXIT.badInput };
  const c = r.compiled;
  if (opts.json === true) {
    const out = {
      grammar: loaded.path,
      alphabet: c.alphabet.segments.length,
      steps: c.steps,
      preferred: c.preferredSize,
      variants: c.hasVariants ? c.variantsSize : null,
      cache: cacheDir === undefined ? "off" : c.cache,
      timings: c.timings,
    };
    return { stdout: JSON.stringify(out, null, 2) + "\n", stderr, exitCode: EXIT.ok };
  }
  return { stdout: compileReport(loaded.path, c, cacheDir), stderr, exitCode: EXIT.ok };
}

interface CompileCliOptions {
  grammar?: string;
  variety?: string;
  cacheDir?: string;
  cache: boolean;
  maxStates?: number;
  json?: boolean;
  quiet?: boolean;
  root?: string;
  explainVariety?: boolean;
}

export function registerCompile(program: Command): void {
  const cmd = program
    .command("compile")
    .description("compile a grammar into transducers; print each step's and the cascade's states and arcs, and the cache state");
  grammarOptions(cmd);
  cacheOptions(cmd);
  jsonOption(cmd, "print the figures as JSON");
  cmd.option("--explain-variety", "print the resolved steps of the grammar (a variety and its bases) with where each came from; compiles nothing");
  commonOptions(cmd);
  examples(cmd, [
    ["strata compile -g lexicons/en-us", "the default variety (grammar.strata)"],
    ["strata compile -g lexicons/demo -d careful", "a variety by its name in varieties.json"],
    ["strata compile -g lexicons/en-us --no-cache --json", "cold compile, figures as JSON"],
    ["strata compile -g lexicons/en-us/careful.strata --explain-variety", "each step and where it came from"],
  ]);
  cmd.action(async (o: CompileCliOptions) => {
    if (o.explainVariety === true) {
      const e = { json: o.json === true, quiet: o.quiet === true, ...(o.variety !== undefined ? { variety: o.variety } : {}), ...(o.root !== undefined ? { root: o.root } : {}) };
      return printOutcome(runExplainVariety(o.grammar, e));
    }
    await printOutcome(runCompile(o.grammar, {
      cache: o.cache, json: o.json === true, quiet: o.quiet === true,
      ...(o.variety !== undefined ? { variety: o.variety } : {}),
      ...(o.cacheDir !== undefined ? { cacheDir: o.cacheDir } : {}),
      ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}),
      ...(o.root !== undefined ? { root: o.root } : {}),
    }));
  });
}
