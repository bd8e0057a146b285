// The grammars the regular-expression comparison runs on, cut from the shipped en-us grammar so
// their rules are the en-us rules verbatim: prosody only (the shared starting point) and prosody
// plus the subset of rules the hand-written cascade in regex-cascade.ts implements.

import type { Grammar } from "../src/grammar/ast.js";

/** The en-us rules the regular-expression cascade implements, in the en-us grammar's order. */
export const SUBSET_RULES = ["dark-l", "flapping", "aspiration", "approximant-devoicing", "nasalisation"] as const;

/** `full` with only its syllabify and stress steps and the named rules (order kept); throws if a rule is missing. */
export function cutGrammar(full: Grammar, rules: readonly string[]): Grammar {
  const names = new Set(full.steps.map((s) => s.name));
  const missing = rules.filter((r) => !names.has(r));
  if (missing.length > 0) throw new Error(`the en-us grammar has no rule ${missing.join(", ")} (the regex cascade must follow it)`);
  const keep = new Set<string>(rules);
  return { ...full, steps: full.steps.filter((s) => s.kind !== "rule" || keep.has(s.name)) };
}

/** Syllabification and default stress only: what both sides of the comparison start from. */
export const prosodyGrammar = (full: Grammar): Grammar => cutGrammar(full, []);

/** Prosody and the subset rules: what the regular-expression cascade must reproduce exactly. */
export const subsetGrammar = (full: Grammar): Grammar => cutGrammar(full, SUBSET_RULES);
