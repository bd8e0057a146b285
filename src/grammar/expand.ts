// Environment notation → plain environments with scoped exceptions: `mirrored`, `unless` and the
// `longest-first` expansion of `( )` (DEVELOPERS.md, "Exceptions, mirror images, longest-first").
// Shared by the interpreter and the compiler through `desugar`, like the `where` shorthands.

import type { Environment, Pattern, Rule, Span } from "./ast.js";

/*
 * After `expandEnvironments` a rule has no `unless`, no `mirrored` environment and no expansion
 * option; every environment carries its own `except` list, and the meaning is:
 *
 *   a site holds  ⇔  some environment E holds there and no environment of E.except holds there.
 *
 *   mirrored       `X _ Y mirrored` is the two environments `X _ Y` and `Yᴿ _ Xᴿ` (ᴿ: read
 *                  backwards, groups kept), each with the conditions as written (Langacker 1969;
 *                  Bach 1968 — from memory).
 *   unless         every environment of the rule gets the rule's `unless` environments as
 *                  exceptions; a rule with `unless` and no `/` environment holds everywhere else.
 *   longest-first  each environment becomes its expansions: every way of taking or leaving each
 *                  `( … )` of its left and right sides; an expansion with k groups taken holds
 *                  only where no expansion of the same environment with more groups holds
 *                  (disjunctive ordering, Chomsky & Halle 1968, ch. 8). Expansions with as many
 *                  groups are a plain union. The site as a whole holds where the environment does
 *                  either way; what changes is which variable bindings the site takes (a variable
 *                  bound in a longer expansion wins over the free reading of a shorter one).
 */

/** Most expansions of one environment under `longest-first` (2⁶: six optional groups). */
export const MAX_EXPANSIONS = 64;

/** A pattern read backwards (sequences reversed, recursively). */
export function reversePattern(p: Pattern): Pattern {
  switch (p.kind) {
    case "element":
      return p;
    case "sequence":
      return { ...p, items: [...p.items].reverse().map(reversePattern) };
    case "optional":
    case "repeat":
      return { ...p, body: reversePattern(p.body) };
    case "choice":
      return { ...p, options: p.options.map(reversePattern) };
  }
}

/** `X _ Y` and, when mirrored, `Yᴿ _ Xᴿ`. */
export function mirrorImages(env: Environment): Environment[] {
  const { mirrored: _m, ...plain } = env;
  if (env.mirrored !== true) return [plain];
  return [plain, { ...plain, left: reversePattern(env.right), right: reversePattern(env.left) }];
}

/** Every way of taking or leaving each `( … )` of a pattern, with the number of groups taken. */
export function parenthesisExpansions(p: Pattern): { pattern: Pattern; taken: number }[] {
  switch (p.kind) {
    case "element":
      return [{ pattern: p, taken: 0 }];
    case "sequence": {
      let acc: { items: Pattern[]; taken: number }[] = [{ items: [], taken: 0 }];
      for (const item of p.items) {
        const here = parenthesisExpansions(item);
        acc = acc.flatMap((a) => here.map((h) => ({ items: [...a.items, h.pattern], taken: a.taken + h.taken })));
        if (acc.length > MAX_EXPANSIONS) throw new TooManyExpansions(p.span);
      }
      return acc.map((a) => ({ pattern: { ...p, items: a.items }, taken: a.taken }));
    }
    case "optional":
      return [
        { pattern: { kind: "sequence", items: [], span: p.span }, taken: 0 },
        ...parenthesisExpansions(p.body).map((b) => ({ pattern: b.pattern, taken: b.taken + 1 })),
      ];
    // Inside a choice or a repetition a group is not expanded (it is not a sub-rule of SPE's schema).
    case "choice":
    case "repeat":
      return [{ pattern: p, taken: 0 }];
  }
}

/** Raised when an environment has more than MAX_EXPANSIONS expansions (the checker reports it). */
export class TooManyExpansions extends Error {
  constructor(readonly span: Span) {
    super(`more than ${MAX_EXPANSIONS} expansions`);
  }
}

/** The expansions of one environment, each excepting the longer ones (disjunctive ordering). */
function longestFirst(env: Environment): Environment[] {
  const lefts = parenthesisExpansions(env.left);
  const rights = parenthesisExpansions(env.right);
  const all: { env: Environment; taken: number }[] = [];
  for (const l of lefts) for (const r of rights) all.push({ env: { ...env, left: asSequence(l.pattern), right: asSequence(r.pattern) }, taken: l.taken + r.taken });
  if (all.length > MAX_EXPANSIONS) throw new TooManyExpansions(env.span);
  return all.map((e) => ({
    ...e.env,
    except: [...(env.except ?? []), ...all.filter((o) => o.taken > e.taken).map((o) => o.env)],
  }));
}

const asSequence = (p: Pattern): Pattern => (p.kind === "sequence" ? p : { kind: "sequence", items: [p], span: p.kind === "element" ? p.element.span : p.span });

/** Does the rule use notation that `expandEnvironments` rewrites? */
export function hasEnvironmentNotation(rule: Rule): boolean {
  return (rule.unless?.length ?? 0) > 0 || rule.expansion === "longest-first" || rule.environments.some((e) => e.mirrored === true);
}

/**
 * The rule with `mirrored`, `unless` and `longest-first` written out as environments with
 * `except` lists (see above). Idempotent; `where` conditions are left for `desugar`.
 * Throws TooManyExpansions past MAX_EXPANSIONS.
 */
export function expandEnvironments(rule: Rule): Rule {
  if (!hasEnvironmentNotation(rule)) return rule;
  const unless = (rule.unless ?? []).flatMap(mirrorImages);
  let envs = rule.environments.flatMap(mirrorImages);
  if (envs.length === 0 && unless.length > 0) envs = [{ left: empty(rule.span), right: empty(rule.span), conditions: [], span: rule.span }];
  if (rule.expansion === "longest-first") envs = envs.flatMap(longestFirst);
  if (unless.length > 0) envs = envs.map((e) => ({ ...e, except: [...(e.except ?? []), ...unless] }));
  const { unless: _u, expansion: _x, ...rest } = rule;
  return { ...rest, environments: envs };
}

const empty = (span: Span): Pattern => ({ kind: "sequence", items: [], span });
