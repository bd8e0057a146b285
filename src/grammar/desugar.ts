// Prosodic shorthands (`where …`) → ordinary SPE contexts, and the boundary-blindness test.
// The result is what the interpreter and the compiler both read, so it is their shared meaning.

import type { Element, Environment, FeatureSpec, Pattern, ProsodicCondition, Rule, Span } from "./ast.js";

/*
 * Each condition constrains one side of the target, inside the target's syllable (C is a
 * [-syllabic] segment, V a [+syllabic] one; neither matches a boundary):
 *
 *   syllable-initial  left  edge $        syllable-final  right edge $
 *   word-initial      left  edge #        word-final      right edge #
 *   coda              left  V C₀          onset           right C₀ V
 *   stressed / unstressed / primary: the nucleus of the target's syllable is V[+stress] /
 *     V[-stress] / V[+primary], either to the right (C₀ V[…]) or to the left (V[…] C₀):
 *     the environment splits in two.
 *   nucleus: no context; the checker requires the target to be [+syllabic].
 *
 * Conditions on one side conjoin exactly: two edges give the stronger edge (# also satisfies $);
 * two nucleus constraints name the same nucleus, so their features merge (a clash: never);
 * an edge and a nucleus on one side contradict (never). A syllable has one nucleus, so a nucleus
 * constraint on both sides also contradicts. The conjoined material sits next to the target; the
 * written context continues beyond it: `L _ R where syllable-initial` is `L $ _ R`, and
 * `_ R where onset` is `_ C₀ V R` (the checker warns when a written context meets nucleus material).
 * An environment whose every variant contradicts becomes one that never holds
 * (the contradictory bundle [+syllabic -syllabic]); it is not dropped, because an empty
 * environment list means "everywhere".
 */

type Side =
  | { readonly kind: "none" }
  | { readonly kind: "edge"; readonly which: "word" | "syllable"; readonly span: Span }
  | { readonly kind: "nucleus"; readonly specs: readonly FeatureSpec[]; readonly span: Span }
  | { readonly kind: "never" };

const NONE: Side = { kind: "none" };

const STRESS_SPEC: Partial<Record<ProsodicCondition, { feature: string; value: "+" | "-" }>> = {
  stressed: { feature: "stress", value: "+" },
  unstressed: { feature: "stress", value: "-" },
  primary: { feature: "primary", value: "+" },
};

function conjoin(a: Side, b: Side): Side {
  if (a.kind === "none") return b;
  if (b.kind === "none") return a;
  if (a.kind === "never" || b.kind === "never") return { kind: "never" };
  if (a.kind === "edge" && b.kind === "edge") return a.which === "word" ? a : b;
  if (a.kind === "nucleus" && b.kind === "nucleus") {
    const specs = [...a.specs];
    for (const s of b.specs) {
      if (s.kind !== "value") continue;
      const clash = specs.find((t) => t.kind === "value" && t.feature === s.feature && t.value !== s.value);
      if (clash !== undefined) return { kind: "never" };
      if (!specs.some((t) => t.kind === "value" && t.feature === s.feature)) specs.push(s);
    }
    return { kind: "nucleus", specs, span: a.span };
  }
  return { kind: "never" };
}

const value = (feature: string, v: "+" | "-", span: Span): FeatureSpec => ({ kind: "value", feature, value: v, span });
const el = (element: Element): Pattern => ({ kind: "element", element });
const consonants = (span: Span): Pattern => ({
  kind: "repeat",
  body: el({ kind: "bundle", specs: [value("syllabic", "-", span)], span }),
  min: 0,
  max: null,
  span,
});
const nucleus = (specs: readonly FeatureSpec[], span: Span): Pattern =>
  el({ kind: "bundle", specs: [value("syllabic", "+", span), ...specs.filter((s) => !(s.kind === "value" && s.feature === "syllabic"))], span });

const itemsOf = (p: Pattern): readonly Pattern[] => (p.kind === "sequence" ? p.items : [p]);

/** Left side: written context, then the condition's material next to the target. */
function leftPattern(written: Pattern, side: Side, span: Span): Pattern {
  const items = [...itemsOf(written)];
  if (side.kind === "edge") items.push(el({ kind: "boundary", which: side.which, span: side.span }));
  else if (side.kind === "nucleus") items.push(nucleus(side.specs, side.span), consonants(side.span));
  return { kind: "sequence", items, span: written.kind === "sequence" ? written.span : span };
}

/** Right side: the condition's material next to the target, then the written context. */
function rightPattern(written: Pattern, side: Side, span: Span): Pattern {
  const items: Pattern[] = [];
  if (side.kind === "edge") items.push(el({ kind: "boundary", which: side.which, span: side.span }));
  else if (side.kind === "nucleus") items.push(consonants(side.span), nucleus(side.specs, side.span));
  items.push(...itemsOf(written));
  return { kind: "sequence", items, span: written.kind === "sequence" ? written.span : span };
}

/** The variants (left constraint, right constraint) an environment's conditions allow. */
function sides(env: Environment): { left: Side; right: Side }[] {
  let left: Side = NONE;
  let right: Side = NONE;
  let stress: Side = NONE;
  for (const { condition, span } of env.conditions) {
    switch (condition) {
      case "syllable-initial":
        left = conjoin(left, { kind: "edge", which: "syllable", span });
        break;
      case "syllable-final":
        right = conjoin(right, { kind: "edge", which: "syllable", span });
        break;
      case "word-initial":
        left = conjoin(left, { kind: "edge", which: "word", span });
        break;
      case "word-final":
        right = conjoin(right, { kind: "edge", which: "word", span });
        break;
      case "coda":
        left = conjoin(left, { kind: "nucleus", specs: [], span });
        break;
      case "onset":
        right = conjoin(right, { kind: "nucleus", specs: [], span });
        break;
      case "nucleus":
        break;
      case "stressed":
      case "unstressed":
      case "primary": {
        const s = STRESS_SPEC[condition]!;
        stress = conjoin(stress, { kind: "nucleus", specs: [value(s.feature, s.value, span)], span });
        break;
      }
      default: {
        const never: never = condition;
        return never;
      }
    }
  }
  const variants = stress.kind === "none" ? [{ left, right }] : [
    { left, right: conjoin(right, stress) },
    { left: conjoin(left, stress), right },
  ];
  // One nucleus per syllable: nucleus material on both sides contradicts.
  return variants.filter(
    (v) => v.left.kind !== "never" && v.right.kind !== "never" && !(v.left.kind === "nucleus" && v.right.kind === "nucleus"),
  );
}

/** An environment that never holds: the contradictory bundle [+syllabic -syllabic] on the left. */
function neverEnvironment(env: Environment): Environment {
  const span = env.span;
  const impossible = el({ kind: "bundle", specs: [value("syllabic", "+", span), value("syllabic", "-", span)], span });
  return { left: { kind: "sequence", items: [impossible], span }, right: env.right, conditions: [], span };
}

/** Whether an environment's conditions can hold together (used by the checker). */
export function conditionsSatisfiable(env: Environment): boolean {
  return env.conditions.length === 0 || sides(env).length > 0;
}

/**
 * Expands `where` conditions into ordinary patterns (see the table above and DEVELOPERS.md).
 * The result has no conditions and records `boundaryBlind` as computed on the rule as written.
 * Idempotent: desugaring a desugared rule returns an equal rule.
 */
export function desugar(rule: Rule): Rule {
  const boundaryBlind = isBoundaryBlind(rule);
  const environments: Environment[] = [];
  for (const env of rule.environments) {
    if (env.conditions.length === 0) {
      environments.push(env);
      continue;
    }
    const vs = sides(env);
    if (vs.length === 0) environments.push(neverEnvironment(env));
    for (const v of vs)
      environments.push({
        left: leftPattern(env.left, v.left, env.span),
        right: rightPattern(env.right, v.right, env.span),
        conditions: [],
        span: env.span,
      });
  }
  return { ...rule, environments, boundaryBlind };
}

/**
 * DEVELOPERS.md, "Boundary transparency": a rule is boundary-blind when its target, change and
 * environments never mention a syllable boundary (`$`, `.`) and it uses no `where` shorthand.
 * For a desugared rule this returns the value recorded before desugaring.
 */
export function isBoundaryBlind(rule: Rule): boolean {
  if (rule.boundaryBlind !== undefined) return rule.boundaryBlind;
  if (rule.target.some(isSyllableBoundary)) return false;
  for (const env of rule.environments) {
    if (env.conditions.length > 0) return false;
    if (mentionsSyllableBoundary(env.left) || mentionsSyllableBoundary(env.right)) return false;
  }
  return true;
}

const isSyllableBoundary = (e: Element): boolean => e.kind === "boundary" && e.which === "syllable";

function mentionsSyllableBoundary(p: Pattern): boolean {
  switch (p.kind) {
    case "element":
      return isSyllableBoundary(p.element);
    case "sequence":
      return p.items.some(mentionsSyllableBoundary);
    case "optional":
    case "repeat":
      return mentionsSyllableBoundary(p.body);
    case "choice":
      return p.options.some(mentionsSyllableBoundary);
  }
}
