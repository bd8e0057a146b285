// Checker pass: declarations and names — nodes, classes (and their cycles), the heavy patterns and
// cluster lists, and the validation of every element (features, values, variables, segments).

import type { ChangeElement, ClassDef, Element, FeatureSpec, Pattern } from "./ast.js";
import type { CheckContext, VariableUses } from "./check-context.js";

/** Nodes, classes, heavy patterns and cluster lists. */
export function checkDeclarations(c: CheckContext): void {
  const g = c.grammar;
  for (const n of g.nodes) {
    if (c.inv.featureIndex.has(n.name)) c.error("grammar/node-is-feature", `node '${n.name}' has the name of a feature`, n.span);
    for (const f of n.features)
      if (!c.inv.featureIndex.has(f)) c.error("grammar/unknown-feature", `node '${n.name}' groups '${f}', which is not a feature of the inventory${c.suggest(f)}`, n.span);
  }
  for (const cl of g.classes) {
    classCycle(c, cl);
    for (const m of cl.members) checkElement(c, m, null);
  }
  for (const h of g.heavy) checkPattern(c, h, null);
  for (const list of [g.onsets, g.codas])
    for (const cl of list ?? [])
      for (const s of cl.segments)
        if (c.literal(s) === null) c.error("grammar/bad-cluster", `'${s}' in the cluster is not a segment of the inventory`, cl.span);
}

function classCycle(c: CheckContext, cl: ClassDef): void {
  const seen = new Set<string>();
  const visit = (name: string): boolean => {
    if (name === cl.name && seen.size > 0) return true;
    if (seen.has(name)) return false;
    seen.add(name);
    const d = c.classes.get(name);
    return d !== undefined && d.members.some((m) => m.kind === "class" && visit(m.name));
  };
  if (visit(cl.name)) c.error("grammar/class-cycle", `class '${cl.name}' is defined in terms of itself`, cl.span);
}

/** Validates names and values in an element; records variables in `vars` when given. */
export function checkElement(c: CheckContext, e: Element | ChangeElement, vars: VariableUses | null): void {
  switch (e.kind) {
    case "bundle":
      checkSpecs(c, e.specs, vars);
      break;
    case "segment":
      if (c.literal(e.symbol) === null) c.error("grammar/unknown-segment", `'${e.symbol}' is not one segment of the inventory (with its diacritics)`, e.span);
      break;
    case "class":
      if (!c.classes.has(e.name)) c.error("grammar/unknown-class", `no class named '${e.name}' is defined`, e.span);
      break;
    case "boundary":
      break;
  }
}

function checkSpecs(c: CheckContext, specs: readonly FeatureSpec[], vars: VariableUses | null): void {
  const seen = new Map<string, string>();
  for (const s of specs) {
    const isNode = c.nodes.has(s.feature);
    if (!isNode && !c.inv.featureIndex.has(s.feature)) {
      c.error("grammar/unknown-feature", `'${s.feature}' is not a feature of the inventory or a node${c.suggest(s.feature)}`, s.span);
      continue;
    }
    const written = s.kind === "value" ? s.value : `${s.negated ? "-" : ""}${s.variable}`;
    const before = seen.get(s.feature);
    if (before !== undefined && before !== written)
      c.error("grammar/contradictory-bundle", `the bundle gives '${s.feature}' two values (${before} and ${written})`, s.span);
    seen.set(s.feature, written);
    if (s.kind === "variable" && vars !== null) {
      const kind = isNode ? s.feature : "feature";
      const prev = vars.get(s.variable);
      if (prev !== undefined && prev.kind !== kind)
        c.error(
          "grammar/variable-kind",
          `variable ${s.variable} stands for ${kindText(prev.kind)} elsewhere in this rule, but for ${kindText(kind)} here`,
          s.span,
        );
      else if (prev === undefined) vars.set(s.variable, { kind, span: s.span });
    }
  }
}

export const kindText = (kind: string): string => (kind === "feature" ? "a feature value" : `node '${kind}'`);

export function checkPattern(c: CheckContext, p: Pattern, vars: VariableUses | null): void {
  switch (p.kind) {
    case "element":
      checkElement(c, p.element, vars);
      break;
    case "sequence":
      p.items.forEach((i) => checkPattern(c, i, vars));
      break;
    case "optional":
    case "repeat":
      checkPattern(c, p.body, vars);
      break;
    case "choice":
      p.options.forEach((o) => checkPattern(c, o, vars));
      break;
  }
}
