// Applies one rule directly to a symbol array, exactly as DEVELOPERS.md ("Application",
// "Boundary transparency") specifies: sites, modes, optionality, alpha variables, changes.

import { StrataError } from "../diagnostics.js";
import type { Bundle, FeatureValue } from "../inventory/types.js";
import type { Rule } from "../grammar/ast.js";
import type { Binding, Bindings } from "./match.js";
import { EMPTY_BINDINGS, bindingsKey, flip, matchElem, matchElems, matchPrefix, matchSuffix } from "./match.js";
import type { Change, CondAlt, PreparedEnv, PreparedRule, RuleContext } from "./prepare.js";
import { assertNever, prepareRule } from "./prepare.js";
import { segmentalWidth } from "./segments.js";
import type { Sym, Word } from "./types.js";
import { isJoin, isSegment, isSyllableEdge, isWordEdge, toKey, wordKey } from "./types.js";

/** Every output of one rule on one word, and the preferred one (DEVELOPERS.md, "optional"). */
export interface RuleOutputs {
  /** Sorted by `wordKey`, distinct. One element for an obligatory rule without alpha ambiguity. */
  readonly outputs: Sym[][];
  /** The variant that applies (prefer applied) or skips (prefer unapplied) at every site; for
   *  alpha ambiguities, the change whose symbols sort first. */
  readonly preferred: Sym[];
}

/** All outputs (sorted, distinct) of `rule` on `word`. Throws StrataError (with diagnostics) for a rule that cannot be resolved. */
export function applyRule(rule: Rule, ctx: RuleContext, word: Word): Sym[][] {
  return applyRuleDetailed(rule, ctx, word).outputs;
}

export function applyRuleDetailed(rule: Rule, ctx: RuleContext, word: Word): RuleOutputs {
  const prepared = prepareRule(rule, ctx);
  if (prepared.rule === null) throw new StrataError(prepared.diagnostics);
  return applyPrepared(prepared.rule, word);
}

/**
 * The word as a rule sees it. For a boundary-blind rule every `.` is taken out (`view`), and
 * every `+` for a rule that does not name `+`; they are remembered, in order, as the hidden
 * symbols standing before each view symbol (`dots[k]`) and after the last (`trailing`), and copied
 * back in those places, so an insertion lands after them.
 */
interface View {
  readonly view: readonly Sym[];
  readonly dots: readonly Sym[][];
  readonly trailing: readonly Sym[];
}

function makeView(word: Word, blind: boolean, joinBlind: boolean): View {
  if (!blind && !joinBlind) return { view: word, dots: word.map(() => []), trailing: [] };
  const view: Sym[] = [];
  const dots: Sym[][] = [];
  let pending: Sym[] = [];
  for (const s of word) {
    if ((blind && isSyllableEdge(s)) || (joinBlind && isJoin(s))) pending.push(s);
    else {
      view.push(s);
      dots.push(pending);
      pending = [];
    }
  }
  return { view, dots, trailing: pending };
}

/**
 * A site for ∅ is the gap before a segment, before a `.` (in a rule that sees boundaries: the end
 * of a syllable inside a word), or before the final `#` (DEVELOPERS.md, "Application"). A
 * boundary-blind rule's view has no `.`.
 */
function isInsertionSite(view: readonly Sym[], k: number): boolean {
  const s = view[k] as Sym;
  return isSegment(s) || isSyllableEdge(s) || isJoin(s) || (k === view.length - 1 && isWordEdge(s));
}

/**
 * Apply a resolved rule. `limit` (default: none) bounds the number of distinct outputs kept:
 * the search takes the preferred choice first at every site, so the preferred output is always
 * among those kept, and `capped` says the search stopped at the limit (outputs may be missing).
 */
export function applyPrepared(p: PreparedRule, word: Word, limit = Number.POSITIVE_INFINITY): RuleOutputs & { readonly capped: boolean } {
  const v = makeView(word, p.blind, p.joinBlind);
  const results = new Map<string, Sym[]>();
  let preferred: Sym[] | null = null;
  let capped = false;
  const scan: Scan = {
    record(w, pref) {
      const k = wordKey(w);
      if (!results.has(k)) {
        if (results.size >= limit) {
          capped = true;
          return;
        }
        results.set(k, w);
      }
      if (pref) preferred = w;
    },
    full: () => results.size >= limit && preferred !== null && (capped = true),
  };
  if (p.mode === "right-to-left") backward(p, v, scan);
  else forward(p, v, scan);
  const outputs = [...results.keys()].sort().map((k) => results.get(k) as Sym[]);
  return { outputs, preferred: preferred ?? (outputs[0] as Sym[]), capped };
}

interface Scan {
  record(w: Sym[], pref: boolean): void;
  /** True once no more outputs are wanted (the search then stops). */
  full(): boolean;
}

/**
 * Run the branches of one site: the rewrite (one per change variant) and, for an optional rule
 * or where no site holds, the copy; the preferred branch goes first.
 */
function branch(p: PreparedRule, scan: Scan, changes: readonly Sym[][], apply: (c: Sym[], pref: boolean) => void, copy: (pref: boolean) => void, pref: boolean, same?: Sym): void {
  const tasks: { run: () => void; pref: boolean; copies: boolean }[] = changes.map((c, idx) => {
    const pr = pref && idx === 0 && !(p.optional && p.prefer === "unapplied");
    // A one-symbol change to the symbol already there writes what the copy writes, and both go on
    // from the next symbol: the two branches are the same search.
    return { run: () => apply(c, pr), pref: pr, copies: same !== undefined && c.length === 1 && toKey(c[0]!) === toKey(same) };
  });
  if (changes.length === 0 || p.optional) {
    const pr = pref && !(changes.length > 0 && p.prefer === "applied");
    const copyTask = { run: (): void => copy(pr), pref: pr, copies: true };
    if (changes.length > 0 && p.prefer === "unapplied") tasks.unshift(copyTask);
    else tasks.push(copyTask);
  }
  // Of two branches that are the same search, the later adds no output (the earlier one found them
  // all, or the search is over); it is left out unless it carries the preferred choice. Without
  // this, an optional rule whose change leaves many sites as they were took time exponential in
  // their number (2^n identical paths) in a random grammar of the property tests.
  let copied = false;
  const kept = tasks.filter((t) => {
    if (!t.copies) return true;
    if (copied && !t.pref) return false;
    copied = true;
    return true;
  });
  for (const { run: t } of kept) {
    if (scan.full()) return;
    t();
  }
}

/** The symbols a change writes over the target span `view[k .. k+n)`, with the span's dots in place. */
function splice(v: View, k: number, n: number, change: readonly Sym[]): Sym[] {
  const out: Sym[] = [];
  if (n > 0 && change.length === n) {
    for (let j = 0; j < n; j++) out.push(...(v.dots[k + j] as Sym[]), change[j] as Sym);
  } else if (n === 0) {
    out.push(...(v.dots[k] as Sym[]), ...change, v.view[k] as Sym);
  } else {
    // Deletion, or a literal change of another length: the dots inside the span follow the change.
    out.push(...(v.dots[k] as Sym[]), ...change);
    for (let j = 1; j < n; j++) out.push(...(v.dots[k + j] as Sym[]));
  }
  return out;
}

/** simultaneous and left-to-right: scan from the left; leftmost sites win, matches never overlap. */
function forward(p: PreparedRule, v: View, scan: Scan): void {
  const n = p.target.length;
  const { view } = v;
  const go = (k: number, out: Sym[], outView: Sym[], pref: boolean): void => {
    if (k >= view.length) {
      scan.record([...out, ...v.trailing], pref);
      return;
    }
    const left = p.mode === "left-to-right" ? { arr: outView, end: outView.length } : { arr: view, end: k };
    let changes: Sym[][] = [];
    if (n === 0 ? isInsertionSite(view, k) : k + n <= view.length) {
      changes = siteChanges(p, view.slice(k, k + n), left, { arr: view, start: k + n });
    }
    branch(
      p, scan, changes,
      (c, pr) => go(k + (n === 0 ? 1 : n), [...out, ...splice(v, k, n, c)], [...outView, ...(n === 0 ? [...c, view[k] as Sym] : c)], pr),
      (pr) => go(k + 1, [...out, ...(v.dots[k] as Sym[]), view[k] as Sym], [...outView, view[k] as Sym], pr),
      pref,
      n === 1 ? view[k] : undefined,
    );
  };
  go(0, [], [], true);
}

/** right-to-left: the mirror image; the right side is read from the output already written. */
function backward(p: PreparedRule, v: View, scan: Scan): void {
  const n = p.target.length;
  const { view } = v;
  const go = (e: number, out: Sym[], outView: Sym[], pref: boolean): void => {
    if (e <= 0) {
      scan.record(out, pref);
      return;
    }
    if (n === 0) {
      // Copy view[e-1], then consider the gap before it (its right side is the output written so far).
      const k = e - 1;
      const sym = view[k] as Sym;
      const rightView = [sym, ...outView];
      const changes = isInsertionSite(view, k) ? siteChanges(p, [], { arr: view, end: k }, { arr: rightView, start: 0 }) : [];
      branch(
        p, scan, changes,
        (c, pr) => go(k, [...splice(v, k, 0, c), ...out], [...c, ...rightView], pr),
        (pr) => go(k, [...(v.dots[k] as Sym[]), sym, ...out], rightView, pr),
        pref,
      );
      return;
    }
    const k = e - n;
    const changes = k >= 0 ? siteChanges(p, view.slice(k, e), { arr: view, end: k }, { arr: outView, start: 0 }) : [];
    const j = e - 1;
    branch(
      p, scan, changes,
      (c, pr) => go(k, [...splice(v, k, n, c), ...out], [...c, ...outView], pr),
      (pr) => go(j, [...(v.dots[j] as Sym[]), view[j] as Sym, ...out], [view[j] as Sym, ...outView], pr),
      pref,
      n === 1 ? view[j] : undefined,
    );
  };
  go(view.length, [...v.trailing], [], true);
}

interface Side {
  readonly arr: readonly Sym[];
  readonly end: number;
}
interface RightSide {
  readonly arr: readonly Sym[];
  readonly start: number;
}

/**
 * The distinct changes (sorted by key) a site can receive: for every environment that holds
 * and every variable assignment satisfying target and environment together. Empty: no site.
 */
export function siteChanges(p: PreparedRule, target: readonly Sym[], left: Side, right: RightSide): Sym[][] {
  const inTarget = matchElems(p.inv, p.target, target, 0, EMPTY_BINDINGS);
  if (inTarget.length === 0) return [];
  const full = new Map<string, Bindings>();
  for (const env of p.envs) {
    if (!conditionsHold(p, env, target, left, right)) continue;
    for (const b of inTarget) {
      // An exception that holds under the target's bindings (any values for its own variables) blocks this environment.
      if (env.except.some((x) => envHolds(p, x, b, target, left, right))) continue;
      for (const bl of matchSuffix(p.inv, env.left, left.arr, left.end, b)) {
        for (const br of matchPrefix(p.inv, env.right, right.arr, right.start, bl)) full.set(bindingsKey(br), br);
      }
    }
  }
  const changes = new Map<string, Sym[]>();
  for (const b of full.values()) {
    for (const complete of completeBindings(p, b)) {
      const c = writeChange(p, target, complete);
      changes.set(c.map(toKey).join(" "), c);
    }
  }
  return [...changes.keys()].sort().map((k) => changes.get(k) as Sym[]);
}

/** Does an environment hold at the site under bindings `b` (for some values of its other variables)? */
function envHolds(p: PreparedRule, env: PreparedEnv, b: Bindings, target: readonly Sym[], left: Side, right: RightSide): boolean {
  if (!conditionsHold(p, env, target, left, right)) return false;
  if (env.except.some((x) => envHolds(p, x, b, target, left, right))) return false;
  for (const bl of matchSuffix(p.inv, env.left, left.arr, left.end, b)) {
    if (matchPrefix(p.inv, env.right, right.arr, right.start, bl).length > 0) return true;
  }
  return false;
}

function conditionsHold(p: PreparedRule, env: PreparedEnv, target: readonly Sym[], left: Side, right: RightSide): boolean {
  const holds = (a: CondAlt): boolean => {
    switch (a.side) {
      case "left": return matchSuffix(p.inv, a.pat, left.arr, left.end, EMPTY_BINDINGS).length > 0;
      case "right": return matchPrefix(p.inv, a.pat, right.arr, right.start, EMPTY_BINDINGS).length > 0;
      case "target-some": return target.some((s) => matchElem(p.inv, a.elem, s, EMPTY_BINDINGS).length > 0);
      case "target-every": return target.every((s) => matchElem(p.inv, a.elem, s, EMPTY_BINDINGS).length > 0);
      default: return assertNever(a);
    }
  };
  return env.conditions.every((alts) => alts.some(holds));
}

const nodeValueCache = new WeakMap<PreparedRule, Map<string, FeatureValue[][]>>();

/**
 * Variables that the change uses but target and environment left unbound range over every
 * value: ± for a feature, and for a node every combination of its values found among the
 * inventory's segments (DEVELOPERS.md, "alpha variables").
 */
function completeBindings(p: PreparedRule, b: Bindings): Bindings[] {
  const needed = new Set<string>();
  for (const c of p.change) {
    if (c.kind !== "set") continue;
    for (const s of c.specs) if (s.kind !== "value" && !b.has(s.variable)) needed.add(s.variable);
  }
  let envs: Bindings[] = [b];
  for (const name of [...needed].sort()) {
    const kind = p.variables.get(name);
    let choices: Binding[];
    if (kind === undefined || kind.kind === "feature") {
      choices = [{ kind: "feature", value: "+" }, { kind: "feature", value: "-" }];
    } else {
      let perRule = nodeValueCache.get(p);
      if (perRule === undefined) nodeValueCache.set(p, (perRule = new Map()));
      const key = kind.indices.join(",");
      let tuples = perRule.get(key);
      if (tuples === undefined) {
        const seen = new Map<string, FeatureValue[]>();
        for (const s of p.inv.segments) {
          const t = kind.indices.map((i) => s.bundle[i] as FeatureValue);
          seen.set(t.join(""), t);
        }
        tuples = [...seen.keys()].sort().map((k) => seen.get(k) as FeatureValue[]);
        perRule.set(key, tuples);
      }
      choices = tuples.map((values) => ({ kind: "node", values }));
    }
    envs = envs.flatMap((env) => choices.map((c) => new Map(env).set(name, c)));
  }
  return envs;
}

/** DEVELOPERS.md, "changes": write the change for a matched target under complete bindings. */
function writeChange(p: PreparedRule, target: readonly Sym[], b: Bindings): Sym[] {
  const width = segmentalWidth(p.inv);
  // Equal lengths pair change and target one to one; a literal change of another length keeps
  // the prosodic features of the target segment at the same index, and inserts past its end.
  return p.change.map((c, j) => writeOne(p, c, target[j], b, width));
}

function inserted(p: PreparedRule, bundle: Bundle): Bundle {
  const out = [...bundle];
  const nucleus = p.syllabic >= 0 && bundle[p.syllabic] === "+";
  if (p.stress >= 0) out[p.stress] = nucleus ? "-" : "0";
  if (p.primary >= 0) out[p.primary] = nucleus ? "-" : "0";
  return out;
}

function writeOne(p: PreparedRule, c: Change, t: Sym | undefined, b: Bindings, width: number): Sym {
  switch (c.kind) {
    case "literal": {
      if (t === undefined || t.kind !== "segment") return { kind: "segment", bundle: inserted(p, c.bundle) };
      // A literal replaces the non-prosodic features and keeps the target's prosodic ones.
      const out = [...t.bundle];
      for (let i = 0; i < width; i++) out[i] = c.bundle[i] as FeatureValue;
      return { kind: "segment", bundle: out };
    }
    case "set": {
      if (t === undefined || t.kind !== "segment") return t ?? { kind: "boundary", which: "syllable" };
      const out = [...t.bundle];
      for (const s of c.specs) {
        switch (s.kind) {
          case "value":
            for (const i of s.indices) out[i] = s.value;
            break;
          case "fvar": {
            const v = b.get(s.variable);
            if (v !== undefined && v.kind === "feature") out[s.index] = s.negated ? flip(v.value) : v.value;
            break;
          }
          case "nvar": {
            const v = b.get(s.variable);
            if (v !== undefined && v.kind === "node") s.indices.forEach((i, j) => (out[i] = s.negated ? flip(v.values[j] as FeatureValue) : (v.values[j] as FeatureValue)));
            break;
          }
          default:
            assertNever(s);
        }
      }
      return { kind: "segment", bundle: out };
    }
    default:
      return assertNever(c);
  }
}
