// The machines the analyses read: every step of a grammar compiled over the whole alphabet (so a
// step is exact on any string, also on strings another order of the steps would give it), once
// with every variant and once as a function (an optional rule applying at every site).

import type { Grammar, Rule, Step } from "../grammar/ast.js";
import { desugar } from "../grammar/index.js";
import type { Inventory } from "../inventory/types.js";
import type { Diagnostic } from "../diagnostics.js";
import { diagnostic } from "../diagnostics.js";
import type { Fst } from "../fst/index.js";
import { compileStep, type Alphabet } from "../compile/index.js";
import { computeAlphabet } from "../compile/alphabet.js";
import { Lowering, LowerError } from "../compile/lower.js";

/** One step as the analyses see it. */
export interface StepMachines {
  readonly index: number;
  readonly name: string;
  readonly kind: Step["kind"];
  readonly optional: boolean;
  /** The step as written (before desugaring), for environments and spans. */
  readonly step: Step;
  /** Every output (optional rules both applying and not, every alpha choice). */
  readonly variants: Fst;
  /** One output per input: the step applying at every site it can (the preferred change where alpha choices differ). */
  readonly functional: Fst;
}

export interface AnalysisMachines {
  readonly alphabet: Alphabet;
  readonly steps: readonly StepMachines[];
  /** What the shadowed-environment check needs to compile a rule with some environments left out. */
  readonly compileRule: (rule: Rule) => Fst;
}

/** The rule as an obligatory one: what "applies at every site" means for an optional rule. */
const obligatory = (r: Rule): Rule => (r.optional ? { ...r, optional: false, prefer: "applied" } : r);

/**
 * Compiles every step of `grammar` over the full alphabet: every symbol any order of the steps can
 * make, in every step's domain (the compiler's alphabet of the grammar as written is a prefix of it).
 * Errors come back as diagnostics at the step's position.
 */
export function analysisMachines(grammar: Grammar, inv: Inventory): { machines: AnalysisMachines | null; diagnostics: Diagnostic[] } {
  const sugar = (r: Rule): Rule => desugar(r, { inventory: inv, classes: grammar.classes });
  const desugared: Step[] = grammar.steps.map((s) => (s.kind === "rule" ? sugar(s) : s));
  const low = new Lowering(grammar, inv);
  let alphabet: Alphabet;
  try {
    // Closed under the steps in any order: a counter relation runs a later step first, and a
    // machine maps a symbol whose image the alphabet lacks to nothing (the step would look blind).
    alphabet = computeAlphabet(inv, low, desugared, [], { everyOrder: true });
  } catch (e) {
    if (e instanceof LowerError) return { machines: null, diagnostics: [e.diagnostic] };
    throw e;
  }
  const full = new Uint8Array(alphabet.size).fill(1);
  full[0] = 0;
  const diagnostics: Diagnostic[] = [];
  const steps: StepMachines[] = [];
  const compileRule = (rule: Rule): Fst => {
    const c = compileStep(grammar, low, alphabet, obligatory(sugar(rule)), full);
    return c.preferred ?? c.variants;
  };
  grammar.steps.forEach((written, index) => {
    const step = desugared[index]!;
    try {
      const v = compileStep(grammar, low, alphabet, step, full);
      let functional: Fst;
      if (step.kind === "rule" && step.optional) {
        const f = compileStep(grammar, low, alphabet, obligatory(step), full);
        functional = f.preferred ?? f.variants;
      } else functional = v.preferred ?? v.variants;
      steps.push({ index, name: step.name, kind: step.kind, optional: step.kind === "rule" && step.optional, step: written, variants: v.variants, functional });
    } catch (e) {
      if (e instanceof LowerError) diagnostics.push(e.diagnostic);
      else if (e instanceof Error && /too large|limit/i.test(e.message)) {
        diagnostics.push(diagnostic("error", "analyze/too-large", `Step '${step.name}' is too large to compile for analysis: ${e.message}.`, step.span));
      } else throw e;
    }
  });
  if (diagnostics.length > 0) return { machines: null, diagnostics };
  return { machines: { alphabet, steps, compileRule }, diagnostics };
}
