// Which steps differ between two varieties' resolved grammars, from build.json alone: each variety's
// step names in order with their fingerprints (regress/step-hash.ts). Steps on a longest common
// subsequence of (name, fingerprint) pairs are shared; every other step differs, and says how.

import type { VarietyRecord } from "../regress/record.js";

/** How a step of one variety differs from the other variety's grammar. */
export type StepChange =
  /** No step of that name in the other grammar. */
  | "only-here"
  /** A step of that name in the other grammar does something else (another body, options or class). */
  | "edited"
  /** The same step (name and fingerprint) stands elsewhere in the other grammar's order. */
  | "moved";

export interface DifferingStep {
  readonly step: string;
  /** 0-based position in its variety's steps. */
  readonly index: number;
  readonly change: StepChange;
}

export interface StepDifference {
  /** Steps of the first variety that are not shared, in its order. */
  readonly a: readonly DifferingStep[];
  /** Steps of the second variety that are not shared, in its order. */
  readonly b: readonly DifferingStep[];
  /** Whether fingerprints were compared (false: a build without them; steps compared by name only). */
  readonly fingerprints: boolean;
  /** The two inventories differ: any step may behave differently on the same input. */
  readonly inventoryDiffers: boolean;
}

/** Indices of a longest common subsequence of two sequences of strings (classic dynamic programme; step lists are short). */
function lcs(x: readonly string[], y: readonly string[]): { inX: Set<number>; inY: Set<number> } {
  const n = x.length, m = y.length;
  const t: number[][] = Array.from({ length: n + 1 }, () => new Array<number>(m + 1).fill(0));
  for (let i = n - 1; i >= 0; i--) for (let j = m - 1; j >= 0; j--) t[i]![j] = x[i] === y[j] ? t[i + 1]![j + 1]! + 1 : Math.max(t[i + 1]![j]!, t[i]![j + 1]!);
  const inX = new Set<number>(), inY = new Set<number>();
  for (let i = 0, j = 0; i < n && j < m;) {
    if (x[i] === y[j]) (inX.add(i++), inY.add(j++));
    else if (t[i + 1]![j]! >= t[i]![j + 1]!) i++;
    else j++;
  }
  return { inX, inY };
}

/** The steps of `a` and `b` that are not shared. */
export function stepDifference(a: VarietyRecord, b: VarietyRecord): StepDifference {
  const fingerprints = a.stepHashes !== undefined && b.stepHashes !== undefined;
  const ids = (v: VarietyRecord): string[] => v.steps.map((s, i) => (fingerprints ? `${s}\u0000${v.stepHashes![i]}` : s));
  const x = ids(a), y = ids(b);
  const { inX, inY } = lcs(x, y);
  const side = (steps: readonly string[], mine: readonly string[], shared: Set<number>, other: readonly string[], otherSteps: readonly string[]): DifferingStep[] =>
    steps.flatMap((step, index) => {
      if (shared.has(index)) return [];
      const change: StepChange = other.includes(mine[index]!) ? "moved" : otherSteps.includes(step) ? "edited" : "only-here";
      return [{ step, index, change }];
    });
  return {
    a: side(a.steps, x, inX, y, b.steps),
    b: side(b.steps, y, inY, x, a.steps),
    fingerprints,
    inventoryDiffers: a.inventory.sha256 !== b.inventory.sha256,
  };
}
