// An entry's variants traced through the one-step-per-block compilation of a grammar: every output
// with the steps that changed it on its way (the JSON Lines `variantSteps`). The preferred variant's
// derivation (each step that changed it and the form after it) comes from the engine's walk
// through the preferred blocks (engine-machine.ts, `blame`).

import type { Compiled } from "../compile/index.js";
import { freeze, type FrozenFst } from "../fst/index.js";
import { functionSteps, type VariantScreen } from "./variants.js";

/** One step that changed the entry, and the narrow IPA right after it. */
export interface DerivationStep {
  readonly step: string;
  readonly form: string;
}

function sameIds(a: readonly number[], b: readonly number[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

interface Path {
  readonly ids: number[];
  readonly steps: number[];
}

/** Every output of a trace, in the order of their keys (ids joined with ','), with the names of the steps behind each. */
export interface TracedOutputs {
  readonly paths: readonly { readonly ids: readonly number[]; readonly steps: readonly string[] }[];
  /** More than the cap were alive after some step (or a step's search was cut): some outputs are missing. */
  readonly capped: boolean;
}

/** Lexicographic order of step-index lists, shorter first: which of two paths to one output is kept. */
function fewerSteps(a: readonly number[], b: readonly number[]): number {
  if (a.length !== b.length) return a.length - b.length;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i]! - b[i]!;
  return 0;
}

/**
 * Every output of the variants blocks of `stepwise` (one step each), with the steps that changed
 * it on its way. When two paths reach the same output, the one with fewer steps (then the earlier
 * steps) is kept. At most `cap` outputs survive each step (smallest keys first, like the composed
 * variants runner). A block that is one step which cannot branch (its variants machine is its
 * preferred machine: a function) runs through the preferred runner, one output per path; only the
 * steps that can branch search for every output.
 */
export class VariantTracer {
  private frozen: FrozenFst[] | undefined;
  /** Per variants block: the preferred block that runs the same single step as a function, or -1. */
  private readonly asFunction: Int32Array;

  /**
   * `screen`: the stepwise compilation's variant screen (variants.ts), when it has one: a branching
   * step it proves identity-only on every live path leaves the paths as they are, with no search.
   */
  constructor(private readonly stepwise: Compiled, private readonly stepNames: readonly string[], private readonly screen: VariantScreen | null = null) {
    const preferredOf = new Map<number, number>();
    stepwise.preferredBlocks.forEach((b, k) => {
      if (b.to === b.from + 1) preferredOf.set(b.from, k);
    });
    const fn = functionSteps(stepwise);
    this.asFunction = Int32Array.from(stepwise.variantBlocks, (b) => {
      const k = preferredOf.get(b.from);
      return b.to === b.from + 1 && k !== undefined && fn[b.from] === true ? k : -1;
    });
  }

  /** Steps that leave every path as it was skip the merging and sorting of paths; false: never (for checks). */
  shortcuts = true;

  /**
   * `from`: where the caller's walk through the preferred blocks stood when the screen first could
   * not prove the entry single (engine-machine.ts, `blame`): the word entering step `from.step` and
   * the steps (indices) that had changed it. Every step before is a function or one the screen
   * proved identity-only on that one path, so the trace from the start reaches the same one path
   * there; it starts from it instead.
   */
  trace(input: ArrayLike<number>, cap = 16, from?: TraceStart): TracedOutputs {
    this.frozen ??= this.stepwise.variantBlocks.map((b, k) => (this.asFunction[k]! >= 0 ? (undefined as unknown as FrozenFst) : freeze(b.machine)));
    const blocks = this.stepwise.variantBlocks;
    const preferred = this.stepwise.preferred;
    let live: Path[] = [from !== undefined ? { ids: from.ids, steps: from.steps } : { ids: Array.from(input), steps: [] }];
    let capped = false;
    let k = 0;
    if (from !== undefined) while (k < blocks.length && blocks[k]!.from < from.step) k++;
    for (; k < blocks.length; k++) {
      const step = blocks[k]!.from;
      const fn = this.asFunction[k]!;
      if (fn >= 0) {
        if (live.length === 1) {
          // One path through a function: its one output (or none), no meeting to settle.
          const p = live[0]!;
          const o: number[] = [];
          live = preferred.runBlock(fn, p.ids, o) ? [{ ids: o, steps: sameIds(o, p.ids) ? p.steps : [...p.steps, step] }] : [];
          continue;
        }
        // A function: each path has one output (or none); distinct inputs may meet in one output.
        const outs: (number[] | null)[] = new Array<number[] | null>(live.length);
        let same = true;
        for (let i = 0; i < live.length; i++) {
          const o: number[] = [];
          outs[i] = preferred.runBlock(fn, live[i]!.ids, o) ? o : null;
          if (same && (outs[i] === null || !sameIds(o, live[i]!.ids))) same = false;
        }
        // Every path written back as it was: the same distinct paths, in the same key order.
        if (same && this.shortcuts) continue;
        const next: Path[] = [];
        for (let i = 0; i < live.length; i++) {
          const o = outs[i];
          if (o === null || o === undefined) continue;
          const p = live[i]!;
          next.push({ ids: o, steps: sameIds(o, p.ids) ? p.steps : [...p.steps, step] });
        }
        live = merged(next);
        continue;
      }
      // A branching step that writes every live path back unchanged: the paths (distinct, in key order) stay as they are.
      const screen = this.screen;
      if (screen !== null && blocks[k]!.to === step + 1 && live.every((p) => screen.identityAt(step, p.ids))) continue;
      const results = live.map((p) => this.frozen![k]!.applyAll(p.ids, cap));
      // Each path's one output is the path itself: the paths stay as they are (distinct, in key order, within the cap).
      if (this.shortcuts && results.every((r, i) => !r.capped && r.outputs.length === 1 && sameIds(r.outputs[0]!, live[i]!.ids)) && live.length <= cap) continue;
      const next: Path[] = [];
      for (let i = 0; i < live.length; i++) {
        const r = results[i]!;
        const p = live[i]!;
        if (r.capped) capped = true;
        for (const o of r.outputs) next.push({ ids: o, steps: sameIds(o, p.ids) ? p.steps : [...p.steps, step] });
      }
      const distinct = merged(next);
      if (distinct.length > cap) capped = true;
      live = distinct.slice(0, cap);
    }
    return { paths: live.map((p) => ({ ids: p.ids, steps: p.steps.map((s) => this.stepNames[s]!) })), capped };
  }
}

/** Where a trace may start (`VariantTracer.trace`): the word entering step `step` and the steps that changed it before. */
export interface TraceStart {
  readonly step: number;
  readonly ids: number[];
  readonly steps: number[];
}

/**
 * The order of two outputs' keys (their ids joined with ','), found without building the keys: at
 * the first id that differs the key with the smaller decimal text comes first, where a text that
 * begins the other (1 and 12) comes first, as ',' and the key's end sort before every digit; when
 * one list begins the other, the shorter comes first.
 */
export function keyOrder(a: readonly number[], b: readonly number[]): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    const x = a[i]!;
    const y = b[i]!;
    if (x !== y) return decimalOrder(x, y);
  }
  return a.length - b.length;
}

/** The order of two different non-negative whole numbers' decimal texts (a text that begins the other first). */
function decimalOrder(x: number, y: number): number {
  let dx = 1;
  for (let t = x; t >= 10; t = Math.floor(t / 10)) dx *= 10;
  let dy = 1;
  for (let t = y; t >= 10; t = Math.floor(t / 10)) dy *= 10;
  // Both scaled to the same number of digits: equal when one text begins the other.
  const sx = dx < dy ? x * (dy / dx) : x;
  const sy = dy < dx ? y * (dx / dy) : y;
  return sx !== sy ? sx - sy : dx - dy;
}

/**
 * The distinct outputs of `paths` in the order of their keys; where paths meet in one output the
 * one with fewer (then earlier) steps is kept, the first of equals.
 */
function merged(paths: Path[]): Path[] {
  if (paths.length < 2) return paths;
  paths.sort((p, q) => keyOrder(p.ids, q.ids) || fewerSteps(p.steps, q.steps));
  const out: Path[] = [paths[0]!];
  for (let i = 1; i < paths.length; i++) if (!sameIds(paths[i]!.ids, out[out.length - 1]!.ids)) out.push(paths[i]!);
  return out;
}
