// `strata graph -g DIR STEP`: Graphviz DOT of one step's machine (a rule, syllabify or stress), or
// of the whole composed cascade with --all when it is small enough to draw.

import type { Command } from "commander";
import { compileSteps } from "../compile/index.js";
import { composeCascade } from "../compile/cascade.js";
import { machineToDot, type DotOptions } from "../compile/dot.js";
import type { Inventory } from "../inventory/types.js";
import { loadForCompile, renderAll } from "./compile.js";
import {
  openCache, checkOutputPath, commandLineError, commonOptions, examples, EXIT, grammarOptions, outOption, positiveInt, printOutcome, cacheOptions,
  type CommandOutcome,
} from "./common.js";

export interface GraphCommandOptions {
  /** The whole cascade instead of one step. */
  readonly all?: boolean;
  /** The preferred machine (optional rules at their preferred setting) instead of every variant. */
  readonly preferred?: boolean;
  /** Largest machine (states) --all will draw (default 400). */
  readonly limit?: number;
  readonly variety?: string;
  readonly cache?: boolean;
  readonly cacheDir?: string;
}

function prosodyOf(inv: Inventory): DotOptions["prosody"] {
  const stress = inv.featureIndex.get("stress");
  const primary = inv.featureIndex.get("primary");
  const syl = inv.featureIndex.get("syllabic");
  if (stress === undefined || primary === undefined || syl === undefined) return undefined;
  return { stress, primary, nucleus: (b) => b[syl] === "+" };
}

/** Runs `strata graph`; the DOT text is the outcome's stdout. */
export function runGraph(g: string | undefined, step: string | undefined, opts: GraphCommandOptions = {}): CommandOutcome {
  const loaded = loadForCompile(g, opts.variety, openCache(opts).dir);
  if (!("grammar" in loaded)) return { stdout: "", stderr: renderAll(loaded.diagnostics), exitCode: EXIT.badInput };
  const { grammar, inventory } = loaded;
  const which = opts.preferred === true ? "preferred" : "variants";
  if (opts.all === true) {
    if (step !== undefined) {
      return { stdout: "", stderr: renderAll([commandLineError("cli/graph-args", "Give either a step name or --all, not both.", step)]), exitCode: EXIT.badInput };
    }
    const limit = opts.limit ?? 400;
    // Compose only (no runners): the machines are drawn, not run.
    const r = compileSteps(grammar, inventory);
    if (r.result === null) return { stdout: "", stderr: renderAll(r.diagnostics), exitCode: EXIT.badInput };
    const blocks = composeCascade(r.result.steps.map((x) => (opts.preferred === true ? x.preferred : x.variants)), Math.max(limit, 1));
    if (blocks.length !== 1 || blocks[0]!.states > limit) {
      const size = blocks.reduce((n, b) => n + b.states, 0);
      const msg = `The whole cascade does not fit in one machine of at most ${limit} states (${blocks.length} blocks, ${size} states); draw one step instead, or raise --limit.`;
      return { stdout: "", stderr: renderAll([commandLineError("cli/graph-too-large", msg, undefined, ["--all"])]), exitCode: EXIT.badInput };
    }
    const dot = machineToDot(blocks[0]!.machine, r.result.alphabet, { title: `${grammar.file}: whole cascade (${which})`, prosody: prosodyOf(inventory) });
    return { stdout: dot, stderr: "", exitCode: 0 };
  }
  if (step === undefined) {
    return { stdout: "", stderr: renderAll([commandLineError("cli/graph-args", "Name the step to draw (a rule name, or the name of a syllabify or stress step), or give --all.")]), exitCode: EXIT.badInput };
  }
  const names = grammar.steps.map((s) => s.name);
  if (!names.includes(step)) {
    return { stdout: "", stderr: renderAll([commandLineError("cli/unknown-step", `There is no step '${step}'. Steps: ${names.join(", ")}.`, step)]), exitCode: EXIT.badInput };
  }
  const r = compileSteps(grammar, inventory);
  if (r.result === null) return { stdout: "", stderr: renderAll(r.diagnostics), exitCode: EXIT.badInput };
  const k = names.indexOf(step);
  const s = r.result.steps[k]!;
  const m = opts.preferred === true ? s.preferred : s.variants;
  if (m === null) {
    return { stdout: "", stderr: renderAll([commandLineError("cli/graph-skipped", `Step '${step}' is optional and prefers not to apply: its preferred machine is the identity; draw it without --preferred.`, undefined, ["--preferred"])]), exitCode: EXIT.badInput };
  }
  const dot = machineToDot(m, r.result.alphabet, { title: `${step} (${which}): ${m.numStates} states, ${m.numArcs()} arcs`, prosody: prosodyOf(inventory) });
  return { stdout: dot, stderr: "", exitCode: 0 };
}

interface GraphCliOptions {
  grammar?: string;
  variety?: string;
  all?: boolean;
  preferred?: boolean;
  limit: number;
  out?: string;
  cache: boolean;
  cacheDir?: string;
}

export function registerGraph(program: Command): void {
  const cmd = program
    .command("graph")
    .description("Graphviz DOT of one step's transducer, or of the whole cascade with --all")
    .argument("[step]", "the rule (or syllabify / stress step) to draw");
  grammarOptions(cmd);
  cmd
    .option("--all", "draw the whole composed cascade (when it is small enough)")
    .option("--preferred", "draw the preferred machine (optional rules at their preferred setting)")
    .option("--limit <n>", "largest cascade --all will draw, in states", positiveInt, 400);
  outOption(cmd, "file", "write the DOT to this file (whole: temporary file, then rename) instead of standard output");
  cacheOptions(cmd, false);
  commonOptions(cmd);
  examples(cmd, [
    ["strata graph -g lexicons/en-us flapping | dot -Tsvg > flapping.svg", "one rule's machine"],
    ["strata graph -g lexicons/demo -d careful aspiration -o asp.dot", "a rule of a variety, to a file"],
    ["strata graph -g my-grammar --all --preferred", "the whole cascade of a small grammar"],
  ]);
  cmd.action(async (step: string | undefined, o: GraphCliOptions) => {
    if (o.out !== undefined) {
      const bad = checkOutputPath(o.out, ["-o", "--out"], "file");
      if (bad !== undefined) return printOutcome({ stdout: "", stderr: renderAll([bad]), exitCode: EXIT.badInput });
    }
    const r = runGraph(o.grammar, step, {
      all: o.all === true, preferred: o.preferred === true, limit: o.limit, cache: o.cache,
      ...(o.variety !== undefined ? { variety: o.variety } : {}),
      ...(o.cacheDir !== undefined ? { cacheDir: o.cacheDir } : {}),
    });
    await printOutcome(r, o.out);
  });
}
