// `strata graph -g DIR STEP`: Graphviz DOT of one step's machine (a rule, syllabify or stress), or
// of the whole composed cascade with --all when it is small enough to draw.

import { writeFileSync, renameSync } from "node:fs";
import type { Command } from "commander";
import { diagnostic } from "../diagnostics.js";
import { compileSteps } from "../compile/index.js";
import { composeCascade } from "../compile/cascade.js";
import { machineToDot, type DotOptions } from "../compile/dot.js";
import type { Inventory } from "../inventory/types.js";
import { loadForCompile, renderAll, type CommandOutcome } from "./compile.js";

export interface GraphCommandOptions {
  /** The whole cascade instead of one step. */
  readonly all?: boolean;
  /** The preferred machine (optional rules at their preferred setting) instead of every variant. */
  readonly preferred?: boolean;
  /** Largest machine (states) --all will draw (default 400). */
  readonly limit?: number;
}

const COMMAND_LINE = { file: "<command line>", line: 1, column: 1 };

function prosodyOf(inv: Inventory): DotOptions["prosody"] {
  const stress = inv.featureIndex.get("stress");
  const primary = inv.featureIndex.get("primary");
  const syl = inv.featureIndex.get("syllabic");
  if (stress === undefined || primary === undefined || syl === undefined) return undefined;
  return { stress, primary, nucleus: (b) => b[syl] === "+" };
}

/** Runs `strata graph`; the DOT text is the outcome's stdout. */
export function runGraph(g: string, step: string | undefined, opts: GraphCommandOptions = {}): CommandOutcome {
  const loaded = loadForCompile(g);
  if (!("grammar" in loaded)) return { stdout: "", stderr: renderAll(loaded.diagnostics), exitCode: 1 };
  const { grammar, inventory } = loaded;
  const which = opts.preferred === true ? "preferred" : "variants";
  if (opts.all === true) {
    if (step !== undefined) {
      return { stdout: "", stderr: renderAll([diagnostic("error", "cli/graph-args", "Give either a step name or --all, not both.", COMMAND_LINE)]), exitCode: 1 };
    }
    const limit = opts.limit ?? 400;
    // Compose only (no runners): the machines are drawn, not run.
    const r = compileSteps(grammar, inventory);
    if (r.result === null) return { stdout: "", stderr: renderAll(r.diagnostics), exitCode: 1 };
    const blocks = composeCascade(r.result.steps.map((x) => (opts.preferred === true ? x.preferred : x.variants)), Math.max(limit, 1));
    if (blocks.length !== 1 || blocks[0]!.states > limit) {
      const size = blocks.reduce((n, b) => n + b.states, 0);
      const msg = `The whole cascade does not fit in one machine of at most ${limit} states (${blocks.length} blocks, ${size} states); draw one step instead, or raise --limit.`;
      return { stdout: "", stderr: renderAll([diagnostic("error", "cli/graph-too-large", msg, COMMAND_LINE)]), exitCode: 1 };
    }
    const dot = machineToDot(blocks[0]!.machine, r.result.alphabet, { title: `${grammar.file}: whole cascade (${which})`, prosody: prosodyOf(inventory) });
    return { stdout: dot, stderr: "", exitCode: 0 };
  }
  if (step === undefined) {
    return { stdout: "", stderr: renderAll([diagnostic("error", "cli/graph-args", "Name the step to draw (a rule name, or the name of a syllabify or stress step), or give --all.", COMMAND_LINE)]), exitCode: 1 };
  }
  const names = grammar.steps.map((s) => s.name);
  if (!names.includes(step)) {
    return { stdout: "", stderr: renderAll([diagnostic("error", "cli/unknown-step", `There is no step '${step}'. Steps: ${names.join(", ")}.`, COMMAND_LINE)]), exitCode: 1 };
  }
  const r = compileSteps(grammar, inventory);
  if (r.result === null) return { stdout: "", stderr: renderAll(r.diagnostics), exitCode: 1 };
  const k = names.indexOf(step);
  const s = r.result.steps[k]!;
  const m = opts.preferred === true ? s.preferred : s.variants;
  if (m === null) {
    return { stdout: "", stderr: renderAll([diagnostic("error", "cli/graph-skipped", `Step '${step}' is optional and prefers not to apply: its preferred machine is the identity; draw it without --preferred.`, COMMAND_LINE)]), exitCode: 1 };
  }
  const dot = machineToDot(m, r.result.alphabet, { title: `${step} (${which}): ${m.numStates} states, ${m.numArcs()} arcs`, prosody: prosodyOf(inventory) });
  return { stdout: dot, stderr: "", exitCode: 0 };
}

function positiveInt(name: string): (v: string) => number {
  return (v: string) => {
    const x = Number(v);
    if (!Number.isInteger(x) || x <= 0) throw new Error(`${name} needs a positive whole number, got '${v}'`);
    return x;
  };
}

export function registerGraph(program: Command): void {
  program
    .command("graph")
    .description("Graphviz DOT of one step's transducer, or of the whole cascade with --all")
    .argument("[step]", "the rule (or syllabify / stress step) to draw")
    .requiredOption("-g, --grammar <path>", "grammar folder (holding grammar.strata) or a .strata file")
    .option("--all", "draw the whole composed cascade (when it is small enough)", false)
    .option("--preferred", "draw the preferred machine (optional rules at their preferred setting)", false)
    .option("--limit <n>", "largest cascade --all will draw, in states", positiveInt("--limit"), 400)
    .option("-o, --out <file>", "write the DOT to this file (whole: temp file, then rename) instead of stdout")
    .action((step: string | undefined, opts: { grammar: string; all: boolean; preferred: boolean; limit: number; out?: string }) => {
      const r = runGraph(opts.grammar, step, { all: opts.all, preferred: opts.preferred, limit: opts.limit });
      if (r.exitCode === 0 && opts.out !== undefined) {
        const tmp = `${opts.out}.${process.pid}.tmp`;
        writeFileSync(tmp, r.stdout);
        renameSync(tmp, opts.out);
      } else process.stdout.write(r.stdout);
      process.stderr.write(r.stderr);
      process.exitCode = r.exitCode;
    });
}
