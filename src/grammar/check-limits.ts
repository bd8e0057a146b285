// Checker pass: resource limits a grammar must stay within before anything expands it — subscript
// bounds, the width of a pattern once bounded repetitions are written out, and the number of
// alpha-variable combinations one rule asks the compiler to enumerate. Each is a positioned error
// naming the limit, instead of an exhausted memory later.

import type { Element, Pattern, Rule } from "./ast.js";
import type { CheckContext } from "./check-context.js";
import { flip } from "./check-context.js";

/** Largest number a subscript or superscript may give (`C₀³²`); `C₀` is "any number" already. */
export const MAX_SUBSCRIPT = 32;
/** Most positions one pattern may span once bounded repetitions are written out (`(C₀⁸)₀⁸` is 64). */
export const MAX_PATTERN_WIDTH = 256;
/** Most combinations of alpha-variable values one rule may have (2 per feature variable, the node's value tuples per node variable). */
export const MAX_ALPHA_COMBINATIONS = 4096;

const count = (n: number): string => n.toLocaleString("en-US");

export function checkLimits(c: CheckContext): void {
  for (const h of c.grammar.heavy) patternLimits(c, h, null);
  for (const s of c.grammar.steps) {
    if (s.kind !== "rule") continue;
    for (const env of s.environments) {
      patternLimits(c, env.left, s);
      patternLimits(c, env.right, s);
    }
    alphaLimit(c, s);
  }
}

/** Subscripts over the limit, then (if none) the written-out width of the whole pattern. */
function patternLimits(c: CheckContext, p: Pattern, rule: Rule | null): void {
  const before = c.errorCount();
  subscripts(c, p);
  if (c.errorCount() > before) {
    if (rule !== null) c.broken.add(rule);
    return;
  }
  const w = width(p);
  if (w > MAX_PATTERN_WIDTH) {
    c.error(
      "grammar/pattern-too-wide",
      `This context spans up to ${w === Infinity ? "an unlimited number of" : count(w)} positions once its repetitions are written out, more than the limit of ${MAX_PATTERN_WIDTH}; use smaller bounds or '₀' (any number).`,
      p.kind === "element" ? p.element.span : p.span,
    );
    if (rule !== null) c.broken.add(rule);
  }
}

function subscripts(c: CheckContext, p: Pattern): void {
  switch (p.kind) {
    case "element":
      return;
    case "sequence":
      p.items.forEach((i) => subscripts(c, i));
      return;
    case "optional":
      subscripts(c, p.body);
      return;
    case "choice":
      p.options.forEach((o) => subscripts(c, o));
      return;
    case "repeat": {
      const big = Math.max(p.min, p.max ?? 0);
      if (!(big <= MAX_SUBSCRIPT)) {
        const shown = Number.isSafeInteger(big) ? count(big) : "a number that large";
        c.error("grammar/subscript-too-large", `A repetition bound of ${shown} is more than the limit of ${MAX_SUBSCRIPT}; write '₀' alone for any number of repetitions.`, p.span);
        return;
      }
      subscripts(c, p.body);
      return;
    }
  }
}

/** Most positions a string matched by `p` can have with bounded repetitions written out; an unbounded one counts its minimum plus one. */
function width(p: Pattern): number {
  switch (p.kind) {
    case "element":
      return 1;
    case "sequence":
      return p.items.reduce((n, i) => n + width(i), 0);
    case "optional":
      return width(p.body);
    case "choice":
      return p.options.reduce((n, o) => Math.max(n, width(o)), 0);
    case "repeat":
      return width(p.body) * (p.max ?? p.min + 1);
  }
}

/** The number of alpha-variable value combinations the compiler enumerates for the rule. */
function alphaLimit(c: CheckContext, r: Rule): void {
  const vars = new Map<string, string | null>(); // variable → node name, or null for a feature
  const seen = new Set<string>();
  const element = (e: Element): void => {
    if (e.kind === "bundle") {
      for (const s of e.specs) if (s.kind === "variable" && !vars.has(s.variable)) vars.set(s.variable, c.nodes.has(s.feature) ? s.feature : null);
    } else if (e.kind === "class" && !seen.has(e.name)) {
      seen.add(e.name);
      c.classes.get(e.name)?.members.forEach(element);
    }
  };
  const pattern = (p: Pattern): void => {
    switch (p.kind) {
      case "element":
        return element(p.element);
      case "sequence":
        return p.items.forEach(pattern);
      case "optional":
      case "repeat":
        return pattern(p.body);
      case "choice":
        return p.options.forEach(pattern);
    }
  };
  r.target.forEach(element);
  for (const env of r.environments) {
    pattern(env.left);
    pattern(env.right);
  }
  for (const ch of r.change) if (ch.kind === "bundle") element(ch);
  let total = 1;
  for (const node of vars.values()) total *= node === null ? 2 : nodeTuples(c, node);
  if (total > MAX_ALPHA_COMBINATIONS) {
    c.error(
      "grammar/too-many-alpha-combinations",
      `Rule '${r.name}' has ${vars.size} alpha variables (${[...vars.keys()].join(" ")}), whose values combine in ${total === Infinity ? "too many" : count(total)} ways, more than the limit of ${count(MAX_ALPHA_COMBINATIONS)}; split the rule or use fewer variables.`,
      r.span,
    );
    c.broken.add(r);
  }
}

/** Distinct value tuples of a node among the segments (and their mirror images, which [-α node] can ask for). */
function nodeTuples(c: CheckContext, node: string): number {
  const idx = c.nodeIndices(node) ?? [];
  const keys = new Set<string>();
  for (const b of c.baseBundles()) {
    const t = idx.map((i) => b[i]!);
    keys.add(t.join(""));
    keys.add(t.map((v) => flip(v, true)).join(""));
  }
  return Math.max(1, keys.size);
}
