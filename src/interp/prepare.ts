// Resolves a rule's AST against the inventory, classes and nodes into the small internal form
// the interpreter walks: feature indices, literal bundles, classes as alternatives, conditions.

import type { Diagnostic } from "../diagnostics.js";
import { diagnostic } from "../diagnostics.js";
import type { Bundle, FeatureValue, Inventory } from "../inventory/types.js";
import type {
  ApplicationMode, ChangeElement, ClassDef, Element, Environment, FeatureSpec, Grammar, NodeDef, Pattern, ProsodicCondition, Rule, Span,
} from "../grammar/ast.js";
import { desugar, expandEnvironments, hasEnvironmentNotation, insertedBundlesAsSegments, isBoundaryBlind, namesJoin } from "../grammar/index.js";
import { resolveSymbol } from "./segments.js";

/** What a rule needs from its grammar to be applied. */
export interface RuleContext {
  readonly inv: Inventory;
  readonly classes: ReadonlyMap<string, ClassDef>;
  readonly nodes: ReadonlyMap<string, NodeDef>;
  /** Boundary-blind rules see through every `.` (DEVELOPERS.md, "Boundary transparency"). */
  readonly boundaryBlind: boolean;
  /** How a literal IPA segment is read (default: the inventory's tokeniser). */
  readonly resolve?: (symbol: string) => Bundle | null;
  /**
   * How `where` conditions are read. "desugared" (the default): as the grammar front end's
   * `desugar` rewrites them into patterns, which is what the compiler reads too. "direct": each
   * condition is checked on its own, as the DEVELOPERS.md table states it, conjoined with the
   * written contexts (an independent reading used to cross-check the desugaring).
   */
  readonly conditions?: "desugared" | "direct";
}

/** One feature condition or change, resolved to feature indices. A value on a node sets/tests every feature of the node. */
export type Spec =
  | { readonly kind: "value"; readonly indices: readonly number[]; readonly value: FeatureValue }
  | { readonly kind: "fvar"; readonly index: number; readonly variable: string; readonly negated: boolean }
  | { readonly kind: "nvar"; readonly indices: readonly number[]; readonly variable: string; readonly negated: boolean };

/** An element matching one symbol. `literal` compares non-prosodic features only. */
export type Elem =
  | { readonly kind: "boundary"; readonly which: "word" | "syllable" | "join" }
  | { readonly kind: "specs"; readonly specs: readonly Spec[] }
  | { readonly kind: "literal"; readonly bundle: Bundle }
  | { readonly kind: "any"; readonly options: readonly Elem[] };

export type Pat =
  | { readonly kind: "elem"; readonly elem: Elem }
  | { readonly kind: "seq"; readonly items: readonly Pat[] }
  | { readonly kind: "opt"; readonly body: Pat }
  | { readonly kind: "alt"; readonly options: readonly Pat[] }
  | { readonly kind: "rep"; readonly body: Pat; readonly min: number; readonly max: number | null };

/**
 * A prosodic condition (`where ...`) as alternatives, any of which makes it hold: a pattern that
 * must match a suffix of the left side, a prefix of the right side, or an element that some
 * segment of the matched target must match (`every` for `nucleus`: all of them).
 */
export type CondAlt =
  | { readonly side: "left" | "right"; readonly pat: Pat }
  | { readonly side: "target-some" | "target-every"; readonly elem: Elem };

export interface PreparedEnv {
  readonly left: Pat;
  readonly right: Pat;
  /** Conjunction of conditions, each a disjunction of alternatives. */
  readonly conditions: readonly (readonly CondAlt[])[];
  /** Environments that must not hold for this one to hold (`unless`, longer expansions); they share the target's variables only. */
  readonly except: readonly PreparedEnv[];
}

export type Change =
  | { readonly kind: "set"; readonly specs: readonly Spec[] }
  | { readonly kind: "literal"; readonly bundle: Bundle };

export type VarKind = { readonly kind: "feature" } | { readonly kind: "node"; readonly indices: readonly number[] };

export interface PreparedRule {
  readonly name: string;
  readonly optional: boolean;
  readonly mode: ApplicationMode;
  readonly prefer: "applied" | "unapplied";
  readonly target: readonly Elem[];
  readonly change: readonly Change[];
  readonly envs: readonly PreparedEnv[];
  readonly blind: boolean;
  /** The rule never names `+`: every join is invisible to it (copied through like a `.` in a boundary-blind rule). */
  readonly joinBlind: boolean;
  readonly inv: Inventory;
  /** Every variable of the rule and what it ranges over. */
  readonly variables: ReadonlyMap<string, VarKind>;
  /** Index of `syllabic` (for the insertion convention), or -1. */
  readonly syllabic: number;
  readonly stress: number;
  readonly primary: number;
}

/** The RuleContext for one rule of a grammar (boundary-blindness by the front end's `isBoundaryBlind`). */
export function ruleContext(grammar: Pick<Grammar, "classes" | "nodes">, inv: Inventory, rule: Rule): RuleContext {
  const classes = new Map(grammar.classes.map((c) => [c.name, c] as const));
  const nodes = new Map(grammar.nodes.map((n) => [n.name, n] as const));
  return { inv, classes, nodes, boundaryBlind: isBoundaryBlind(rule) };
}

export { isBoundaryBlind };

const desugared = new WeakMap<Rule, { inv: Inventory; rule: Rule }>();

/**
 * The front end's `desugar`, given the inventory and classes (so literal segments and classes
 * are intersected with the condition material exactly), memoised per rule object and inventory.
 */
export function desugarOnce(rule: Rule, ctx: Pick<RuleContext, "inv" | "classes"> & Partial<Pick<RuleContext, "nodes">>): Rule {
  const hit = desugared.get(rule);
  if (hit !== undefined && hit.inv === ctx.inv) return hit.rule;
  const insertsBundle = rule.target.length === 0 && rule.change.some((c) => c.kind === "bundle");
  const d = rule.environments.some((e) => e.conditions.length > 0) || hasEnvironmentNotation(rule) || insertsBundle
    ? desugar(rule, { inventory: ctx.inv, classes: [...ctx.classes.values()], nodes: [...(ctx.nodes?.values() ?? [])] })
    : rule;
  desugared.set(rule, { inv: ctx.inv, rule: d });
  return d;
}

export function assertNever(x: never): never {
  throw new Error(`unexpected value ${JSON.stringify(x)}`);
}

const cache = new WeakMap<Rule, { ctx: RuleContext; result: PrepareResult }>();

export type PrepareResult = { readonly rule: PreparedRule; readonly diagnostics: readonly Diagnostic[] } | { readonly rule: null; readonly diagnostics: readonly Diagnostic[] };

/** Resolve a rule; every problem is a positioned diagnostic (the rule is null when any is an error). */
/**
 * Resolve a rule; every problem is a positioned diagnostic (the rule is null when any is an
 * error). Unless `ctx.conditions` is "direct", `where` conditions are first desugared by the
 * grammar front end. Memoised per rule object and context object.
 */
export function prepareRule(rule: Rule, ctx: RuleContext): PrepareResult {
  const hit = cache.get(rule);
  if (hit !== undefined && hit.ctx === ctx) return hit.result;
  const written = ctx.conditions === "direct"
    ? expandEnvironments(insertedBundlesAsSegments(rule, { inventory: ctx.inv, classes: [...ctx.classes.values()], nodes: [...ctx.nodes.values()] }))
    : desugarOnce(rule, ctx);
  const result = new Preparer(written, ctx).run();
  cache.set(rule, { ctx, result });
  return result;
}

/**
 * Resolve a free-standing pattern (the grammar's `heavy` rhymes) against the inventory, classes
 * and nodes. `owner` names it in messages.
 */
export function preparePattern(pattern: Pattern, ctx: RuleContext, owner: string): { pat: Pat | null; diagnostics: readonly Diagnostic[] } {
  const p = new Preparer(null, ctx, owner);
  const pat = p.pattern(pattern);
  return { pat: p.failed() ? null : pat, diagnostics: p.diagnostics() };
}

class Preparer {
  private readonly diags: Diagnostic[] = [];
  private readonly variables = new Map<string, VarKind>();
  private readonly inv: Inventory;
  private readonly owner: string;
  constructor(private readonly maybeRule: Rule | null, private readonly ctx: RuleContext, owner?: string) {
    this.inv = ctx.inv;
    this.owner = owner ?? `rule '${maybeRule?.name ?? "?"}'`;
  }

  private get rule(): Rule {
    if (this.maybeRule === null) throw new Error("no rule to prepare");
    return this.maybeRule;
  }

  failed(): boolean {
    return this.diags.some((d) => d.severity === "error");
  }

  diagnostics(): readonly Diagnostic[] {
    return this.diags;
  }

  run(): PrepareResult {
    const r = this.rule;
    const syllabic = this.inv.featureIndex.get("syllabic") ?? -1;
    const stress = this.inv.featureIndex.get("stress") ?? -1;
    const primary = this.inv.featureIndex.get("primary") ?? -1;
    const target = r.target.map((e) => this.elem(e, new Set()));
    const change = r.change.map((c) => this.change(c));
    if (r.target.length === 0 && change.some((c) => c.kind === "set")) {
      this.error("interp/insert-bundle", "an inserted segment must be written as an IPA segment, not a feature bundle", r.span);
    }
    if (r.target.length > 0 && r.change.length > 0 && r.change.length !== r.target.length && change.some((c) => c.kind === "set")) {
      this.error("interp/change-length", `a feature change needs one element per target element (target ${r.target.length}, change ${r.change.length})`, r.span);
    }
    if (r.target.length === 0 && r.change.length === 0) {
      this.error("interp/empty-rule", "a rule cannot have ∅ as both target and change", r.span);
    }
    const envs: PreparedEnv[] = [];
    const rawEnvs = r.environments.length > 0 ? r.environments : null;
    if (rawEnvs === null) {
      envs.push({ left: { kind: "seq", items: [] }, right: { kind: "seq", items: [] }, conditions: [], except: [] });
    } else {
      const prepareEnv = (env: Environment): PreparedEnv => ({
        left: this.pattern(env.left),
        right: this.pattern(env.right),
        conditions: env.conditions.map((c) => this.condition(c.condition, c.span, syllabic, stress, primary)),
        except: (env.except ?? []).map(prepareEnv),
      });
      for (const env of rawEnvs) envs.push(prepareEnv(env));
    }
    if (this.diags.some((d) => d.severity === "error")) return { rule: null, diagnostics: this.diags };
    const prepared: PreparedRule = {
      name: r.name, optional: r.optional, mode: r.mode, prefer: r.prefer,
      target, change, envs, blind: this.ctx.boundaryBlind, joinBlind: !namesJoin(r), inv: this.inv,
      variables: this.variables, syllabic, stress, primary,
    };
    return { rule: prepared, diagnostics: this.diags };
  }

  private error(code: string, message: string, span: Span): void {
    this.diags.push(diagnostic("error", code, `${this.owner}: ${message}`, span));
  }

  private literal(symbol: string, span: Span): Bundle {
    const b = this.ctx.resolve !== undefined ? this.ctx.resolve(symbol) : resolveSymbol(this.inv, symbol);
    if (b === null) {
      this.error("interp/unknown-segment", `'${symbol}' is not a segment of the inventory (nor a segment with declared diacritics)`, span);
      return [];
    }
    return b;
  }

  private spec(s: FeatureSpec): Spec | null {
    const node = this.ctx.nodes.get(s.feature);
    const fi = this.inv.featureIndex.get(s.feature);
    let indices: number[];
    if (fi !== undefined) indices = [fi];
    else if (node !== undefined) {
      indices = [];
      for (const f of node.features) {
        const i = this.inv.featureIndex.get(f);
        if (i === undefined) this.error("interp/unknown-feature", `node '${node.name}' names '${f}', which is not a feature of the inventory`, node.span);
        else indices.push(i);
      }
    } else {
      this.error("interp/unknown-feature", `'${s.feature}' is neither a feature of the inventory nor a declared node`, s.span);
      return null;
    }
    if (s.kind === "value") return { kind: "value", indices, value: s.value };
    const isNode = fi === undefined;
    const kind: VarKind = isNode ? { kind: "node", indices } : { kind: "feature" };
    const prior = this.variables.get(s.variable);
    if (prior !== undefined && (prior.kind !== kind.kind || (prior.kind === "node" && kind.kind === "node" && prior.indices.join() !== kind.indices.join()))) {
      this.error("interp/variable-kind", `variable '${s.variable}' is used both for a feature and for a node (or for two different nodes)`, s.span);
      return null;
    }
    this.variables.set(s.variable, kind);
    return isNode
      ? { kind: "nvar", indices, variable: s.variable, negated: s.negated }
      : { kind: "fvar", index: indices[0] as number, variable: s.variable, negated: s.negated };
  }

  private specs(list: readonly FeatureSpec[]): Spec[] {
    const out: Spec[] = [];
    for (const s of list) {
      const r = this.spec(s);
      if (r !== null) out.push(r);
    }
    return out;
  }

  private elem(e: Element, visiting: Set<string>): Elem {
    switch (e.kind) {
      case "boundary": return { kind: "boundary", which: e.which };
      case "bundle": return { kind: "specs", specs: this.specs(e.specs) };
      case "segment": return { kind: "literal", bundle: this.literal(e.symbol, e.span) };
      case "class": {
        const c = this.ctx.classes.get(e.name);
        if (c === undefined) {
          this.error("interp/unknown-class", `class '${e.name}' is not defined`, e.span);
          return { kind: "any", options: [] };
        }
        if (visiting.has(e.name)) {
          this.error("interp/class-cycle", `class '${e.name}' is defined in terms of itself`, e.span);
          return { kind: "any", options: [] };
        }
        const inner = new Set(visiting).add(e.name);
        return { kind: "any", options: c.members.map((m) => this.elem(m, inner)) };
      }
      default: return assertNever(e);
    }
  }

  pattern(p: Pattern): Pat {
    switch (p.kind) {
      case "element": return { kind: "elem", elem: this.elem(p.element, new Set()) };
      case "sequence": return { kind: "seq", items: p.items.map((q) => this.pattern(q)) };
      case "optional": return { kind: "opt", body: this.pattern(p.body) };
      case "choice": return { kind: "alt", options: p.options.map((q) => this.pattern(q)) };
      case "repeat": return { kind: "rep", body: this.pattern(p.body), min: p.min, max: p.max };
      default: return assertNever(p);
    }
  }

  private change(c: ChangeElement): Change {
    switch (c.kind) {
      case "bundle": return { kind: "set", specs: this.specs(c.specs) };
      case "segment": return { kind: "literal", bundle: this.literal(c.symbol, c.span) };
      default: return assertNever(c);
    }
  }

  /** DEVELOPERS.md, "Prosodic shorthands": each condition as the patterns of its table row. */
  private condition(c: ProsodicCondition, span: Span, syllabic: number, stress: number, primary: number): CondAlt[] {
    const need = (i: number, name: string): boolean => {
      if (i < 0) this.error("interp/missing-feature", `'where ${c}' needs the feature '${name}', which the inventory lacks`, span);
      return i >= 0;
    };
    const el = (elem: Elem): Pat => ({ kind: "elem", elem });
    const seq = (...items: Pat[]): Pat => ({ kind: "seq", items });
    const C: Pat = { kind: "rep", body: el({ kind: "specs", specs: [{ kind: "value", indices: [syllabic], value: "-" }] }), min: 0, max: null };
    const vowel = (extra: Spec[]): Elem => ({ kind: "specs", specs: [{ kind: "value", indices: [syllabic], value: "+" }, ...extra] });
    switch (c) {
      case "syllable-initial": return [{ side: "left", pat: el({ kind: "boundary", which: "syllable" }) }];
      case "syllable-final": return [{ side: "right", pat: el({ kind: "boundary", which: "syllable" }) }];
      case "word-initial": return [{ side: "left", pat: el({ kind: "boundary", which: "word" }) }];
      case "word-final": return [{ side: "right", pat: el({ kind: "boundary", which: "word" }) }];
      case "onset":
        if (!need(syllabic, "syllabic")) return [];
        return [{ side: "right", pat: seq(C, el(vowel([]))) }];
      case "coda":
        if (!need(syllabic, "syllabic")) return [];
        return [{ side: "left", pat: seq(el(vowel([])), C) }];
      case "nucleus":
        if (!need(syllabic, "syllabic")) return [];
        return [{ side: "target-every", elem: vowel([]) }];
      case "stressed":
      case "unstressed":
      case "primary": {
        if (!need(syllabic, "syllabic")) return [];
        const idx = c === "primary" ? primary : stress;
        if (!need(idx, c === "primary" ? "primary" : "stress")) return [];
        const v = vowel([{ kind: "value", indices: [idx], value: c === "unstressed" ? "-" : "+" }]);
        return [
          { side: "right", pat: seq(C, el(v)) },
          { side: "left", pat: seq(el(v), C) },
          { side: "target-some", elem: v },
        ];
      }
      default: return assertNever(c);
    }
  }
}
