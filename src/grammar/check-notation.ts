// Checks of the rule notation the interpreter and compiler read through `expand.ts`: variables a
// site can leave free (several outputs), too many `longest-first` expansions, and inserted
// feature bundles, which must denote exactly one segment of the inventory.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { segmentsMatching } from "../inventory/index.js";
import type { FeatureValue, Inventory, PartialBundle, Segment } from "../inventory/types.js";
import type { ChangeElement, ClassDef, Element, Environment, FeatureSpec, NodeDef, Pattern, Rule, Span } from "./ast.js";
import { expandEnvironments, mirrorImages, TooManyExpansions } from "./expand.js";

/** Names a checker needs to read a rule: the grammar's classes and nodes. */
export interface NotationScope {
  readonly classes: ReadonlyMap<string, ClassDef>;
  readonly nodes: ReadonlyMap<string, NodeDef>;
}

/**
 * Every problem of one rule's notation:
 * - `grammar/ambiguous-variable` (warning): a variable of the change not set by the target is set
 *   by several environments, or, in one environment, by a segment whose place depends on how an
 *   optional part, choice or repetition matches (`_ C₀ [α voice]`): one site, several outputs.
 * - `grammar/free-variable` (warning): a variable of the change that the target does not set and
 *   this environment does not set on every way it can match — there the variable takes every value,
 *   so the site gets several outputs (an obligatory rule too). Named per environment and variable.
 * - `grammar/too-many-expansions` (error): `longest-first` with more than MAX_EXPANSIONS expansions.
 * - `grammar/insert-bundle` (error): an inserted bundle that is not exactly one inventory segment.
 */
export function checkNotation(rule: Rule, inv: Inventory, scope: NotationScope): Diagnostic[] {
  const out: Diagnostic[] = [];
  try {
    expandEnvironments(rule);
  } catch (e) {
    if (!(e instanceof TooManyExpansions)) throw e;
    out.push(diagnostic("error", "grammar/too-many-expansions", `rule '${rule.name}': with longest-first this environment has ${e.message}; use fewer '( )' groups`, e.span));
  }
  if (rule.target.length === 0) {
    for (const c of rule.change) {
      if (c.kind !== "bundle") continue;
      const r = insertedSegment(c, inv, scope);
      if (typeof r === "string") out.push(diagnostic("error", "grammar/insert-bundle", `rule '${rule.name}': ${r}`, c.span));
    }
  }
  const changeVars = new Map<string, Span>();
  for (const c of rule.change) if (c.kind === "bundle") for (const s of c.specs) if (s.kind === "variable" && !changeVars.has(s.variable)) changeVars.set(s.variable, s.span);
  if (changeVars.size === 0) return out;
  const inTarget = new Set<string>();
  for (const t of rule.target) for (const v of boundBy({ kind: "element", element: t }, scope, 0)) inTarget.add(v);
  const free = [...changeVars.keys()].filter((v) => !inTarget.has(v)).sort();
  if (free.length === 0) return out;
  const envs: Environment[] = rule.environments.length > 0 ? rule.environments.flatMap(mirrorImages) : [];
  if (envs.length === 0) {
    for (const v of free)
      out.push(diagnostic("warning", "grammar/free-variable", `rule '${rule.name}': variable ${v} of the change is set by no target or environment, so it takes every value (several outputs)`, changeVars.get(v)!));
    return out;
  }
  // Alpha-ambiguous sites: the same site can set the variable from different segments.
  for (const v of free) {
    const setting = envs.filter((e) => mentions(e.left, v) || mentions(e.right, v));
    if (setting.length > 1)
      out.push(diagnostic("warning", "grammar/ambiguous-variable", `rule '${rule.name}': ${setting.length} environments set variable ${v} of the change; where more than one holds with different values, the site gets one output per value`, setting[1]!.span));
    for (const e of setting) {
      const setsAlways = boundBy(e.left, scope, 0).has(v) || boundBy(e.right, scope, 0).has(v);
      if (setsAlways && (variableReach(outward(e.left, true), v) === "varies" || variableReach(outward(e.right, false), v) === "varies"))
        out.push(diagnostic("warning", "grammar/ambiguous-variable", `rule '${rule.name}': in this environment the segment that sets variable ${v} depends on how an optional part, choice or repetition matches; different matches give different outputs`, e.span));
    }
  }
  for (const env of envs) {
    const bound = new Set([...boundBy(env.left, scope, 0), ...boundBy(env.right, scope, 0)]);
    for (const v of free) {
      if (bound.has(v)) continue;
      out.push(
        diagnostic(
          "warning", "grammar/free-variable",
          `rule '${rule.name}': in this environment variable ${v} of the change is not set on every match (it is missing or optional), so a site there takes every value of ${v} (several outputs)`,
          env.span,
        ),
      );
    }
  }
  return out;
}

/** A side's items read outward from the target (the left side backwards). */
function outward(p: Pattern, left: boolean): Pattern[] {
  const items = p.kind === "sequence" ? [...p.items] : [p];
  return left ? items.reverse() : items;
}

/** Does the pattern use variable v anywhere? */
function mentions(p: Pattern, v: string): boolean {
  switch (p.kind) {
    case "element": return p.element.kind === "bundle" && p.element.specs.some((s) => s.kind === "variable" && s.variable === v);
    case "sequence": return p.items.some((q) => mentions(q, v));
    case "optional":
    case "repeat": return mentions(p.body, v);
    case "choice": return p.options.some((q) => mentions(q, v));
  }
}

/**
 * Reading outward, is the first element that sets v always the same distance from the target
 * ("fixed"), or can optional parts, choices or repetitions before or around it move it ("varies")?
 */
function variableReach(items: readonly Pattern[], v: string): "fixed" | "varies" | "none" {
  let flexible = false;
  for (const it of items) {
    const plain = it.kind === "element" || (it.kind === "repeat" && it.min === it.max);
    if (mentions(it, v)) return flexible || !plain ? "varies" : "fixed";
    if (!plain) flexible = true;
  }
  return "none";
}

/** The variables a pattern sets on every way it can match. */
function boundBy(p: Pattern, scope: NotationScope, depth: number): Set<string> {
  switch (p.kind) {
    case "element": return elementBinds(p.element, scope, depth);
    case "sequence": return new Set(p.items.flatMap((q) => [...boundBy(q, scope, depth)]));
    case "optional": return new Set();
    case "choice": return intersectAll(p.options.map((o) => boundBy(o, scope, depth)));
    case "repeat": return p.min >= 1 ? boundBy(p.body, scope, depth) : new Set();
  }
}

function elementBinds(e: Element, scope: NotationScope, depth: number): Set<string> {
  if (e.kind === "bundle") return new Set(e.specs.flatMap((s) => (s.kind === "variable" ? [s.variable] : [])));
  if (e.kind === "class" && depth < 20) {
    const c = scope.classes.get(e.name);
    if (c !== undefined) return intersectAll(c.members.map((m) => elementBinds(m, scope, depth + 1)));
  }
  return new Set();
}

function intersectAll(sets: readonly Set<string>[]): Set<string> {
  if (sets.length === 0) return new Set();
  return new Set([...sets[0]!].filter((v) => sets.every((s) => s.has(v))));
}

/**
 * The inventory segment an inserted bundle denotes: the one segment whose features satisfy every
 * value of the bundle (a value on a node: every feature of the node). A message when there is no
 * such segment, several, or the bundle uses a variable or an unknown name.
 */
export function insertedSegment(c: ChangeElement & { kind: "bundle" }, inv: Inventory, scope: Pick<NotationScope, "nodes">): Segment | string {
  const partial = new Map<number, FeatureValue>();
  for (const s of c.specs) {
    if (s.kind === "variable") return `an inserted bundle cannot use a variable (${s.variable}); it must name one segment`;
    const idx = featureIndices(s, inv, scope);
    if (idx === null) return `'${s.feature}' is neither a feature nor a node`;
    for (const i of idx) partial.set(i, s.value);
  }
  const found = segmentsMatching(inv, partial satisfies PartialBundle);
  if (found.length === 1) return found[0]!;
  if (found.length === 0) return "no segment of the inventory has every value of this inserted bundle";
  const names = found.slice(0, 6).map((x) => x.symbol).join(" ");
  return `this inserted bundle fits ${found.length} segments (${names}${found.length > 6 ? " …" : ""}); an inserted bundle must name exactly one`;
}

function featureIndices(s: FeatureSpec, inv: Inventory, scope: Pick<NotationScope, "nodes">): number[] | null {
  const i = inv.featureIndex.get(s.feature);
  if (i !== undefined) return [i];
  const node = scope.nodes.get(s.feature);
  if (node === undefined) return null;
  const idx = node.features.map((f) => inv.featureIndex.get(f));
  return idx.every((x) => x !== undefined) ? (idx as number[]) : null;
}
