// Prosodic shorthands (`where …`) → ordinary SPE contexts, and the boundary-blindness test.
// The result is what the interpreter and the compiler both read, so it is their shared meaning.

import { bundleOf, PROSODIC_FEATURES, type Inventory } from "../inventory/index.js";
import { expandEnvironments } from "./expand.js";
import { insertedSegment } from "./check-notation.js";
import type { ChangeElement, NodeDef, ClassDef, Element, Environment, FeatureSpec, Pattern, ProsodicCondition, Rule, Span } from "./ast.js";

/*
 * Each condition constrains one side of the target, inside the target's syllable (C is a
 * [-syllabic] segment, V a [+syllabic] one; neither matches a boundary):
 *
 *   syllable-initial  left  edge $        syllable-final  right edge $
 *   word-initial      left  edge #        word-final      right edge #
 *   coda              left  V C₀          onset           right C₀ V
 *   stressed / unstressed / primary: the nucleus of the target's syllable is V[+stress] /
 *     V[-stress] / V[+primary], either to the right (C₀ V[…]) or to the left (V[…] C₀):
 *     the environment splits in two. (When the target itself can be a nucleus the checker
 *     asks for the stress feature in the target instead, so no third case is needed.)
 *   nucleus: no context; the checker requires every target segment to be [+syllabic].
 *
 * Conditions on one side conjoin: two edges give the stronger edge (# also satisfies $); two
 * nucleus constraints on one side name the same nucleus (the first V outward), so their features
 * merge (a clash: never); an edge and a nucleus on one side contradict. Each condition is read on
 * its own, as the interpreter reads it: nothing assumes one nucleus per syllable, so `onset, coda`
 * holds between two vowels of an unsyllabified string, and two stress conditions choose their
 * sides independently (up to 2ⁿ variants).
 *
 * The side's material then conjoins *exactly* with the written context (DEVELOPERS.md: "both
 * must match"): the left side must end with a string of L and also with a string of M, which is
 * the product of L with M's two-state automaton, read outward from the target (Brzozowski-style
 * unrolling of L; an unbounded repetition in the consonant-reading state is solved with Arden's
 * lemma, X = A·X ∪ B ⇒ X = A*·B). Elements are intersected: bundles merge their specs; a literal
 * segment or a class is checked against the inventory (a segment that must carry stress becomes
 * the bundle of all its features plus the stress value). So `C ə _ where coda` is `C ə _` with ə
 * as the nucleus, and `V _ where syllable-initial` never holds (V is not a boundary).
 * Without a DesugarContext, segments and classes are assumed compatible (kept as written).
 * An environment whose every variant contradicts becomes one that never holds (the
 * contradictory bundle [+syllabic -syllabic]); it is not dropped, because an empty environment
 * list means "everywhere".
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


/** What desugaring needs to intersect literal segments and classes with condition material. */
export interface DesugarContext {
  readonly inventory: Inventory;
  readonly classes: readonly ClassDef[];
  /** The grammar's nodes (a value on a node in an inserted bundle). */
  readonly nodes?: readonly NodeDef[];
}

/** A pattern or ⊥ (matches nothing). */
type P = Pattern | null;
/** Stands for "the rest of an unbounded repetition and what follows" while solving Arden's loop. */
type Mark = { readonly kind: "mark"; readonly items: readonly Pattern[] };
type Item = Pattern | Mark;

/** Budget of product steps per side; beyond it the material is simply placed next to the target. */
const BUDGET = 4_000;

class Product {
  steps = 0;
  constructor(
    readonly side: Exclude<Side, { kind: "none" } | { kind: "never" }>,
    readonly ctx: DesugarContext | undefined,
    readonly span: Span,
  ) {}

  /** M's remaining material in reading order (outward from the target), from its start state. */
  material(): Pattern[] {
    return this.side.kind === "edge"
      ? [el({ kind: "boundary", which: this.side.which, span: this.side.span })]
      : [consonants(this.side.span), nucleus(this.side.specs, this.side.span)];
  }

  /**
   * Strings x (read outward) such that some prefix of x is in `items` and x is accepted by M
   * from its start state (or anything, once `accepted`). Reading order; null = ⊥.
   */
  run(items: readonly Item[], accepted: boolean): P {
    if (++this.steps > BUDGET) throw new Budget();
    if (accepted) return seq(expand(items), this.span);
    if (items.length === 0) return seq(this.material(), this.span);
    const [first, ...rest] = items as [Item, ...Item[]];
    switch (first.kind) {
      case "mark":
        return null; // the loop's own continuation: accounted for by Arden's solution
      case "element": {
        const alts: P[] = [];
        const e = first.element;
        if (this.side.kind === "edge") {
          const x = intersect(e, { kind: "boundary", which: this.side.which, span: this.side.span }, this.ctx);
          if (x !== null) alts.push(seq([x, ...expand(rest)], this.span));
        } else {
          const v = intersect(e, { kind: "bundle", specs: nucleusSpecs(this.side.specs, this.side.span), span: e.span }, this.ctx);
          if (v !== null) alts.push(seq([v, ...expand(rest)], this.span));
          const c = intersect(e, { kind: "bundle", specs: [value("syllabic", "-", e.span)], span: e.span }, this.ctx);
          if (c !== null) {
            const after = this.run(rest, false);
            if (after !== null) alts.push(seq([c, after], this.span));
          }
        }
        return choice(alts, this.span);
      }
      case "sequence":
        return this.run([...first.items, ...rest], false);
      case "optional":
        return choice([this.run(rest, false), this.run([first.body, ...rest], false)], this.span);
      case "choice":
        return choice(first.options.map((o) => this.run([o, ...rest], false)), this.span);
      case "repeat": {
        const { body, min, max } = first;
        if (max !== null) {
          if (max <= 0) return this.run(rest, false);
          const again: Pattern = { ...first, min: Math.max(0, min - 1), max: max - 1 };
          const once = this.run([body, again, ...rest], false);
          return min >= 1 ? once : choice([this.run(rest, false), once], this.span);
        }
        if (min >= 1) return this.run([body, { ...first, min: min - 1 }, ...rest], false);
        if (this.side.kind === "edge") {
          // The first symbol read decides (edge or ⊥), so the loop never comes back to this state.
          return choice([this.run(rest, false), this.run([body, first, ...rest], false)], this.span);
        }
        // Nucleus material, consonant-reading state: G = (body∧C)* · (F(rest) ∪ paths that reach
        // the nucleus inside one iteration of body), by Arden's lemma.
        const mark: Mark = { kind: "mark", items: [first, ...patternsOf(rest)] };
        const exits = choice([this.run(rest, false), this.run([body, mark], false)], this.span);
        if (exits === null) return null;
        const loop = allConsonants(body, this.ctx, this.span);
        if (loop === null) return exits;
        return seq([{ kind: "repeat", body: loop, min: 0, max: null, span: first.span }, exits], this.span);
      }
    }
  }
}

class Budget {}

const patternsOf = (items: readonly Item[]): Pattern[] => items.flatMap((i) => (i.kind === "mark" ? [...i.items] : [i]));
const expand = patternsOf;

function seq(items: readonly Pattern[], span: Span): Pattern {
  const flat = items.flatMap((i) => (i.kind === "sequence" ? i.items : [i]));
  return flat.length === 1 ? flat[0]! : { kind: "sequence", items: flat, span };
}

function choice(alts: readonly P[], span: Span): P {
  const ok = alts.filter((a): a is Pattern => a !== null);
  if (ok.length === 0) return null;
  if (ok.length === 1) return ok[0]!;
  return { kind: "choice", options: ok.flatMap((o) => (o.kind === "choice" ? o.options : [o])), span };
}

const nucleusSpecs = (specs: readonly FeatureSpec[], span: Span): FeatureSpec[] => [
  value("syllabic", "+", span),
  ...specs.filter((s) => !(s.kind === "value" && s.feature === "syllabic")),
];

/** The body with every element intersected with C ([-syllabic]); ⊥ when some path cannot be. */
function allConsonants(p: Pattern, ctx: DesugarContext | undefined, span: Span): P {
  switch (p.kind) {
    case "element":
      return intersect(p.element, { kind: "bundle", specs: [value("syllabic", "-", p.element.span)], span: p.element.span }, ctx);
    case "sequence": {
      const items: Pattern[] = [];
      for (const i of p.items) {
        const x = allConsonants(i, ctx, span);
        if (x === null) return null;
        items.push(x);
      }
      return { ...p, items };
    }
    case "optional": {
      const b = allConsonants(p.body, ctx, span);
      return b === null ? { kind: "sequence", items: [], span: p.span } : { ...p, body: b };
    }
    case "choice":
      return choice(p.options.map((o) => allConsonants(o, ctx, span)), p.span);
    case "repeat": {
      const b = allConsonants(p.body, ctx, span);
      if (b === null) return p.min === 0 ? { kind: "sequence", items: [], span: p.span } : null;
      return { ...p, body: b };
    }
  }
}

type Requirement = { kind: "boundary"; which: "word" | "syllable"; span: Span } | { kind: "bundle"; specs: readonly FeatureSpec[]; span: Span };

/**
 * e ∧ r for one symbol. Boundaries: # ∧ $ = # ($ also matches #). Bundles merge (a value clash
 * is ⊥). A literal segment is kept when it satisfies r's non-prosodic values, ⊥ when it does not;
 * when r names a prosodic feature it becomes the bundle of every non-prosodic feature of the
 * segment plus r. A class is the choice of its members, each intersected.
 */
function intersect(e: Element, r: Requirement, ctx: DesugarContext | undefined, depth = 0): P {
  if (r.kind === "boundary") {
    if (e.kind !== "boundary") return null;
    // A join is no syllable or word boundary: a condition's edge never meets it.
    if (e.which === "join") return null;
    return el({ kind: "boundary", which: e.which === "word" || r.which === "word" ? "word" : "syllable", span: e.span });
  }
  switch (e.kind) {
    case "boundary":
      return null;
    case "bundle": {
      const specs = [...e.specs];
      for (const s of r.specs) {
        if (s.kind !== "value") continue;
        if (specs.some((t) => t.kind === "value" && t.feature === s.feature && t.value !== s.value)) return null;
        if (!specs.some((t) => t.kind === "value" && t.feature === s.feature)) specs.push({ ...s, span: e.span });
      }
      return el({ kind: "bundle", specs, span: e.span });
    }
    case "segment": {
      if (ctx === undefined) return el(e);
      const b = bundleOf(ctx.inventory, e.symbol);
      if (b === undefined) return el(e);
      const prosodic = new Set<string>(PROSODIC_FEATURES);
      let needsProsody = false;
      for (const s of r.specs) {
        if (s.kind !== "value") continue;
        if (prosodic.has(s.feature)) {
          needsProsody = true;
          continue;
        }
        const i = ctx.inventory.featureIndex.get(s.feature);
        if (i !== undefined && b[i] !== s.value) return null;
      }
      if (!needsProsody) return el(e);
      const nBase = ctx.inventory.features.length - PROSODIC_FEATURES.length;
      const specs: FeatureSpec[] = [];
      for (let i = 0; i < nBase; i++) specs.push({ kind: "value", feature: ctx.inventory.features[i]!, value: b[i]!, span: e.span });
      for (const s of r.specs) if (s.kind === "value" && prosodic.has(s.feature)) specs.push({ ...s, span: e.span });
      return el({ kind: "bundle", specs, span: e.span });
    }
    case "class": {
      if (ctx === undefined || depth > 20) return el(e);
      const def = ctx.classes.find((c) => c.name === e.name);
      if (def === undefined) return el(e);
      return choice(def.members.map((m) => intersect(m, r, ctx, depth + 1)), e.span);
    }
  }
}

/** A pattern read in the other direction (sequences reversed, recursively). */
function reverse(p: Pattern): Pattern {
  switch (p.kind) {
    case "element":
      return p;
    case "sequence":
      return { ...p, items: [...p.items].reverse().map(reverse) };
    case "optional":
    case "repeat":
      return { ...p, body: reverse(p.body) };
    case "choice":
      return { ...p, options: p.options.map(reverse) };
  }
}

/**
 * One side of a desugared environment: the written context conjoined with the side's material.
 * `outward` reverses the left side so both are read from the target outward. Null = never holds.
 */
function conjoinSide(written: Pattern, side: Side, ctx: DesugarContext | undefined, left: boolean): P {
  const span = written.kind === "sequence" ? written.span : patternSpanOf(written);
  const wrap = (p: Pattern): Pattern => (p.kind === "sequence" ? { ...p, span } : { kind: "sequence", items: [p], span });
  if (side.kind === "none") return wrap(written);
  if (side.kind === "never") return null;
  const outward = left ? reverse(written) : written;
  const product = new Product(side, ctx, span);
  let result: P;
  try {
    result = product.run([outward], false);
  } catch (e) {
    if (!(e instanceof Budget)) throw e;
    // Pathological nesting: fall back to placing the material next to the target.
    result = seq([...product.material(), outward], span);
  }
  if (result === null) return null;
  return wrap(left ? reverse(result) : result);
}

const patternSpanOf = (p: Pattern): Span => (p.kind === "element" ? p.element.span : p.span);

/**
 * The variants (left constraint, right constraint) an environment's conditions allow. Each
 * stress condition is a choice of side (its nucleus to the right or to the left); several stress
 * conditions choose independently (as the interpreter reads them: each condition on its own).
 */
function sides(env: Environment): { left: Side; right: Side }[] {
  let left: Side = NONE;
  let right: Side = NONE;
  const stress: Side[] = [];
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
        stress.push({ kind: "nucleus", specs: [value(s.feature, s.value, span)], span });
        break;
      }
      default: {
        const never: never = condition;
        return never;
      }
    }
  }
  let variants = [{ left, right }];
  for (const s of stress)
    variants = variants.flatMap((v) => [
      { left: v.left, right: conjoin(v.right, s) },
      { left: conjoin(v.left, s), right: v.right },
    ]);
  const seen = new Set<string>();
  return variants.filter((v) => {
    if (v.left.kind === "never" || v.right.kind === "never") return false;
    const key = JSON.stringify(v, (k, x) => (k === "span" ? undefined : x));
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
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
export function desugar(rule: Rule, ctx?: DesugarContext): Rule {
  const boundaryBlind = isBoundaryBlind(rule);
  const expanded = expandEnvironments(insertedBundlesAsSegments(rule, ctx));
  const environments: Environment[] = [];
  for (const env of expanded.environments) {
    // Exceptions: each condition variant is one more exception; one that never holds is dropped.
    const except = env.except === undefined ? undefined : env.except.flatMap((x) => desugarConditions(x, ctx) ?? []);
    const scoped = (e: Environment): Environment => (except === undefined || except.length === 0 ? withoutExcept(e) : { ...e, except });
    const variants = desugarConditions(env, ctx);
    if (variants === null) environments.push(neverEnvironment(env));
    else environments.push(...variants.map(scoped));
  }
  return { ...expanded, environments, boundaryBlind };
}

/**
 * An insertion written as a feature bundle that denotes exactly one inventory segment becomes that
 * segment (DEVELOPERS.md, "Inserting a bundle"); any other bundle is left for the checker to report.
 */
export function insertedBundlesAsSegments(rule: Rule, ctx: DesugarContext | undefined): Rule {
  if (ctx === undefined || rule.target.length > 0 || !rule.change.some((c) => c.kind === "bundle")) return rule;
  const nodes = new Map((ctx.nodes ?? []).map((n) => [n.name, n] as const));
  const change = rule.change.map((c): ChangeElement => {
    if (c.kind !== "bundle") return c;
    const seg = insertedSegment(c, ctx.inventory, { nodes });
    return typeof seg === "string" ? c : { kind: "segment", symbol: seg.symbol, span: c.span };
  });
  return { ...rule, change };
}

const withoutExcept = (e: Environment): Environment => {
  if (e.except === undefined) return e;
  const { except: _x, ...rest } = e;
  return rest;
};

/** An environment's `where` conditions as ordinary patterns: its variants, or null when none can hold. */
function desugarConditions(env: Environment, ctx: DesugarContext | undefined): Environment[] | null {
  if (env.conditions.length === 0) return [env];
  const out: Environment[] = [];
  for (const v of sides(env)) {
    const left = conjoinSide(env.left, v.left, ctx, true);
    const right = conjoinSide(env.right, v.right, ctx, false);
    if (left === null || right === null) continue;
    out.push({ left, right, conditions: [], span: env.span });
  }
  return out.length > 0 ? out : null;
}

/**
 * DEVELOPERS.md, "Boundary transparency": a rule is boundary-blind when its target, change and
 * environments never mention a syllable boundary (`$`, `.`) and it uses no `where` shorthand.
 * For a desugared rule this returns the value recorded before desugaring.
 */
export function isBoundaryBlind(rule: Rule): boolean {
  if (rule.boundaryBlind !== undefined) return rule.boundaryBlind;
  if (rule.target.some(isSyllableBoundary)) return false;
  const sees = (env: Environment): boolean =>
    env.conditions.length > 0 || mentionsSyllableBoundary(env.left) || mentionsSyllableBoundary(env.right) || (env.except ?? []).some(sees);
  return !rule.environments.some(sees) && !(rule.unless ?? []).some(sees);
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
