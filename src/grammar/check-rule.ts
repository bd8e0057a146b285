// Checker pass: each rule on its own — unique names, the shape of target and change, variables
// bound where the change uses them, and the preconditions of its `where` conditions.

import type { Environment, Rule, Span } from "./ast.js";
import type { CheckContext, VariableUses } from "./check-context.js";
import { checkElement, checkPattern, kindText } from "./check-names.js";
import { conditionsSatisfiable } from "./desugar.js";
import { elementText } from "./parse-patterns.js";
import { checkNotation } from "./check-notation.js";
import { namesJoin } from "./joins.js";

/** Every rule: duplicate names, then its shape; a rule with errors is marked broken. */
export function checkRules(c: CheckContext): void {
  const names = new Map<string, Span>();
  for (const s of c.grammar.steps) {
    if (s.kind !== "rule") continue;
    const first = names.get(s.name);
    if (first !== undefined)
      c.error("grammar/duplicate-rule", `rule name '${s.name}' is used twice (first at line ${first.line} of ${first.file})`, s.span);
    else names.set(s.name, s.span);
    const before = c.errorCount();
    ruleShape(c, s);
    if (c.errorCount() > before) c.broken.add(s);
  }
}

function ruleShape(c: CheckContext, r: Rule): void {
  const bound: VariableUses = new Map();
  for (const t of r.target) {
    checkElement(c, t, bound);
    if (t.kind === "boundary") c.error("grammar/boundary-target", "a boundary cannot be rewritten", t.span);
  }
  for (const env of r.environments) {
    checkPattern(c, env.left, bound);
    checkPattern(c, env.right, bound);
  }
  for (const env of r.unless ?? []) {
    checkPattern(c, env.left, new Map(bound));
    checkPattern(c, env.right, new Map(bound));
  }
  // `where` conditions are read on the string with every '.' visible but no '+' (desugar.ts):
  // a rule that names '+' writes its contexts out instead.
  const withWhere = [...r.environments, ...(r.unless ?? [])].find((e) => e.conditions.length > 0);
  if (withWhere !== undefined && namesJoin(r))
    c.error("grammar/join-with-where", "a rule that names the morpheme join '+' cannot use 'where' shorthands; write the contexts out", withWhere.conditions[0]!.span);
  const used: VariableUses = new Map();
  for (const ch of r.change) checkElement(c, ch, used);
  for (const [v, u] of used) {
    const b = bound.get(v);
    // A variable only the change uses takes every value: check-notation.ts warns (grammar/free-variable).
    if (b !== undefined && b.kind !== u.kind)
      c.error("grammar/variable-kind", `variable ${v} stands for ${kindText(b.kind)} in the target or environment, but not in the change`, u.span);
  }
  if (r.target.length === 0 && r.change.length === 0) c.error("grammar/empty-rule", `rule '${r.name}' has ∅ on both sides of the arrow`, r.span);
  c.out.push(...checkNotation(r, c.inv, c)); // inserted bundles, free variables, expansions
  if (r.target.length > 0 && r.change.some((ch) => ch.kind === "bundle") && r.change.length !== r.target.length) {
    c.error(
      "grammar/change-length",
      `rule '${r.name}': a feature change needs one element per target element (target ${r.target.length}, change ${r.change.length})`,
      r.change[0]!.span,
    );
  }
  for (const env of [...r.environments, ...(r.unless ?? [])]) conditions(c, r, env);
}

/** Preconditions that make `desugar` exact (see desugar.ts), and conditions that contradict. */
function conditions(c: CheckContext, r: Rule, env: Environment): void {
  if (env.conditions.length === 0) return;
  if (!conditionsSatisfiable(env))
    c.warn("grammar/conditions-contradict", `the conditions of this environment of rule '${r.name}' can never hold together`, env.span);
  const base = c.baseBundles();
  for (const { condition, span } of env.conditions) {
    if (condition === "nucleus") {
      for (const t of r.target) {
        const bad = base.filter((b) => c.matches(t, b) && b[c.syllabic] !== "+");
        if (bad.length > 0)
          c.error(
            "grammar/nucleus-target",
            `'where nucleus' needs a target that is always a nucleus, but ${elementText(t)} also matches ${c.names(bad)}; add +syllabic to the target`,
            span,
          );
      }
    }
    if (condition === "stressed" || condition === "unstressed" || condition === "primary") {
      for (const t of r.target) {
        const bad = base.filter((b) => c.matches(t, b) && b[c.syllabic] === "+");
        if (bad.length > 0)
          c.error(
            "grammar/stress-condition-on-nucleus",
            `'where ${condition}' describes the syllable around a non-nucleus target, but ${elementText(t)} can be a nucleus (${c.names(bad)}); write ${condition === "unstressed" ? "-stress" : condition === "primary" ? "+primary" : "+stress"} in a +syllabic target instead`,
            span,
          );
      }
    }
  }
  if (!c.grammar.steps.some((s) => s.kind === "syllabify") && env.conditions.some((x) => x.condition !== "word-initial" && x.condition !== "word-final" && x.condition !== "nucleus"))
    c.warn("grammar/no-syllabify", `rule '${r.name}' uses syllable conditions, but the grammar has no syllabify step`, env.conditions[0]!.span);
}
