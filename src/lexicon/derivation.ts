// An entry's derivation from the one-step-per-block compilation of a grammar: the steps that changed
// the preferred variant with the narrow form after each, and the steps behind every other variant.

import type { Compiled } from "../compile/index.js";
import { freeze, type FrozenFst } from "../fst/index.js";
import { renderIpa, type RenderOptions, type SymbolView } from "./render.js";

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

/**
 * Runs the preferred blocks of `stepwise` (one step each) one after another on `ids`: the names of
 * the steps that changed the word, in order, and (when `view` is given) the form after each.
 */
export function preferredDerivation(
  stepwise: Compiled,
  stepNames: readonly string[],
  ids: readonly number[],
  view?: SymbolView,
  render?: RenderOptions,
): { rules: string[]; derivation: DerivationStep[] } {
  const rules: string[] = [];
  const derivation: DerivationStep[] = [];
  let cur: number[] = ids as number[];
  const blocks = stepwise.preferredBlocks;
  for (let k = 0; k < blocks.length; k++) {
    const next: number[] = [];
    if (!stepwise.preferred.runBlock(k, cur, next)) break;
    if (!sameIds(cur, next)) {
      const step = stepNames[blocks[k]!.from]!;
      rules.push(step);
      if (view !== undefined) derivation.push({ step, form: renderIpa(next, view, render) });
    }
    cur = next;
  }
  return { rules, derivation };
}

interface Path {
  readonly ids: number[];
  readonly steps: number[];
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
 * steps) is kept. At most `cap` outputs survive each step (smallest ids first, like the composed
 * variants runner). Returns output ids (joined with ',') → step names.
 */
export class VariantTracer {
  private frozen: FrozenFst[] | undefined;
  constructor(private readonly stepwise: Compiled, private readonly stepNames: readonly string[]) {}

  run(ids: readonly number[], cap = 16): Map<string, string[]> {
    this.frozen ??= this.stepwise.variantBlocks.map((b) => freeze(b.machine));
    const blocks = this.stepwise.variantBlocks;
    let live: Path[] = [{ ids: [...ids], steps: [] }];
    for (let k = 0; k < this.frozen.length; k++) {
      const next = new Map<string, Path>();
      for (const p of live) {
        const r = this.frozen[k]!.applyAll(p.ids, cap);
        for (const o of r.outputs) {
          const steps = sameIds(o, p.ids) ? p.steps : [...p.steps, blocks[k]!.from];
          const key = o.join(",");
          const prior = next.get(key);
          if (prior === undefined || fewerSteps(steps, prior.steps) < 0) next.set(key, { ids: o, steps });
        }
      }
      live = [...next.keys()].sort().slice(0, cap).map((key) => next.get(key)!);
    }
    return new Map(live.map((p) => [p.ids.join(","), p.steps.map((s) => this.stepNames[s]!)]));
  }
}
