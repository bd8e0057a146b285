// The grammar checker: names, feature values, variables, lengths, and what the rules can do with
// the inventory (bundles matching nothing, unwritable results, rules that can never apply).
// Each concern is a pass in its own file (check-*.ts) over one shared CheckContext; a new check
// is a new pass added to PASSES.

import type { Diagnostic } from "../diagnostics.js";
import type { Inventory } from "../inventory/index.js";
import type { Grammar } from "./ast.js";
import { CheckContext } from "./check-context.js";
import { checkLimits } from "./check-limits.js";
import { checkDeclarations } from "./check-names.js";
import { checkReachability } from "./check-reach.js";
import { checkRules } from "./check-rule.js";

/** The passes, in order. Later passes may rely on earlier ones (e.g. `broken` rules are skipped). */
const PASSES: readonly ((c: CheckContext) => void)[] = [checkDeclarations, checkRules, checkLimits, checkReachability];

/**
 * Checks a grammar against its inventory. Literal segments should already be split (loadGrammar
 * does it); an unsplit literal that is not one segment is reported here too. Returns every problem.
 */
export function checkGrammar(grammar: Grammar, inv: Inventory): Diagnostic[] {
  const c = new CheckContext(grammar, inv);
  for (const pass of PASSES) pass(c);
  return c.out;
}
