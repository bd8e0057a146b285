// Morpheme joins in rules: whether a rule names `+` (DEVELOPERS.md, "Boundary transparency"). A rule
// that never names `+` sees through every join, as a boundary-blind rule sees through every `.`.

import type { Environment, Pattern, Rule } from "./ast.js";

function patternNamesJoin(p: Pattern): boolean {
  switch (p.kind) {
    case "element":
      return p.element.kind === "boundary" && p.element.which === "join";
    case "sequence":
      return p.items.some(patternNamesJoin);
    case "optional":
    case "repeat":
      return patternNamesJoin(p.body);
    case "choice":
      return p.options.some(patternNamesJoin);
  }
}

const envNamesJoin = (env: Environment): boolean =>
  patternNamesJoin(env.left) || patternNamesJoin(env.right) || (env.except ?? []).some(envNamesJoin);

/** True when the rule names `+` in an environment or exception (it then sees every join; otherwise joins are invisible to it). */
export function namesJoin(rule: Rule): boolean {
  return rule.environments.some(envNamesJoin) || (rule.unless ?? []).some(envNamesJoin);
}

/** True when the environment (or one of its exceptions) names `+`. */
export const environmentNamesJoin = envNamesJoin;
