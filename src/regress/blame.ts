// Blame: where two derivations of the same input part ways — the first step at which the old and
// the new derivation differ, and how ("flapping now applies", "step syllabic-r removed"). Needs
// only what the builds recorded: each entry's derivation and each grammar's list of steps.

import type { BuildEntry } from "./folder.js";

/** How the blamed step differs between the two derivations. */
export type BlameHow = "now applies" | "no longer applies" | "applies differently" | "new step" | "step removed" | "moved" | "variants differ";

export interface Blame {
  /** The step blamed (a rule, syllabify or stress step). */
  readonly rule: string;
  readonly how: BlameHow;
  /** A sentence for people: "flapping now applies", "new step syllabic-r". */
  readonly text: string;
}

export const blameText = (rule: string, how: BlameHow): string =>
  how === "new step" ? `new step ${rule}` : how === "step removed" ? `step ${rule} removed` : how === "moved" ? `${rule} moved (steps reordered)` : `${rule} ${how}`;

const make = (rule: string, how: BlameHow): Blame => ({ rule, how, text: blameText(rule, how) });

/** The steps of both grammars, for asking whether a step is new, removed or moved. */
export class StepOrder {
  private readonly oldAt: Map<string, number>;
  private readonly newAt: Map<string, number>;
  constructor(readonly oldSteps: readonly string[], readonly newSteps: readonly string[]) {
    this.oldAt = new Map(oldSteps.map((s, i) => [s, i]));
    this.newAt = new Map(newSteps.map((s, i) => [s, i]));
  }
  inOld = (s: string): boolean => this.oldAt.has(s);
  inNew = (s: string): boolean => this.newAt.has(s);
  /** True when a and b (both in both grammars) come in opposite orders in the two grammars. */
  swapped(a: string, b: string): boolean {
    const oa = this.oldAt.get(a), ob = this.oldAt.get(b), na = this.newAt.get(a), nb = this.newAt.get(b);
    if (oa === undefined || ob === undefined || na === undefined || nb === undefined) return false;
    return (oa < ob) !== (na < nb);
  }
  /** Index in the new grammar (old steps that are gone sort by their old place, after none). */
  newIndex = (s: string): number => this.newAt.get(s) ?? -1;
}

/** A step that applied in the old derivation at the point where the new one did something else. */
function gone(a: string, order: StepOrder): Blame {
  return order.inNew(a) ? make(a, "no longer applies") : make(a, "step removed");
}

/** A step that applied in the new derivation where the old one did not. */
function came(b: string, order: StepOrder): Blame {
  return order.inOld(b) ? make(b, "now applies") : make(b, "new step");
}

/**
 * The first divergence of two preferred derivations of the same input. Both list, in order, the
 * steps that changed the entry and the form after each; they agree up to index i, then:
 * the same step with another form → "applies differently"; a different step → the step that is
 * new, removed, or moved (reordered) if so, else the one the grammars' shared order reaches first
 * ("now applies" for the new derivation's, "no longer applies" for the old one's).
 */
export function blameDerivations(oldD: BuildEntry["derivation"], newD: BuildEntry["derivation"], order: StepOrder): Blame | undefined {
  const n = Math.max(oldD.length, newD.length);
  for (let i = 0; i < n; i++) {
    const a = oldD[i];
    const b = newD[i];
    if (a !== undefined && b !== undefined && a.step === b.step && a.form === b.form) continue;
    if (a === undefined) return came(b!.step, order);
    if (b === undefined) return gone(a.step, order);
    if (a.step === b.step) return make(a.step, "applies differently");
    if (!order.inNew(a.step)) return make(a.step, "step removed");
    if (!order.inOld(b.step)) return make(b.step, "new step");
    if (order.swapped(a.step, b.step)) return make(b.step, "moved");
    // Both steps are in both grammars, in the same relative order: whichever comes first is the
    // point of divergence (the other derivation skipped it there).
    return order.newIndex(b.step) < order.newIndex(a.step) ? came(b.step, order) : gone(a.step, order);
  }
  return undefined;
}

/**
 * For an entry whose variants changed (not its preferred form's derivation): the first step, in
 * the new grammar's order, that now gives a variant it did not give before, or no longer does.
 */
export function blameVariants(oldE: BuildEntry, newE: BuildEntry, order: StepOrder): Blame | undefined {
  const union = (e: BuildEntry): Set<string> => new Set(e.variantSteps.flat());
  const before = union(oldE);
  const after = union(newE);
  const candidates: Blame[] = [];
  for (const s of after) if (!before.has(s)) candidates.push(order.inOld(s) ? make(s, "now applies") : make(s, "new step"));
  for (const s of before) if (!after.has(s)) candidates.push(order.inNew(s) ? make(s, "no longer applies") : make(s, "step removed"));
  if (candidates.length === 0) {
    // The same steps give variants, but different ones: the first step of a variant that is new.
    const oldSet = new Set(oldE.variants);
    const k = newE.variants.findIndex((v) => !oldSet.has(v));
    const steps = k >= 0 ? newE.variantSteps[k] ?? [] : [];
    const s = steps.at(-1);
    return s === undefined ? undefined : make(s, "variants differ");
  }
  const rank = (b: Blame): number => (order.inNew(b.rule) ? order.newIndex(b.rule) : order.oldSteps.indexOf(b.rule) + 0.5);
  return candidates.sort((x, y) => rank(x) - rank(y))[0];
}
