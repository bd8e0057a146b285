// The grammar checker: names, feature values, variables, lengths, and what the rules can do with
// the inventory (bundles matching nothing, unwritable results, rules that can never apply).

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { bundleKey, PROSODIC_FEATURES, realise, bundleOf, describeBundle, type Bundle, type FeatureValue, type Inventory } from "../inventory/index.js";
import type { ChangeElement, ClassDef, Element, Environment, FeatureSpec, Grammar, NodeDef, Pattern, Rule, Span } from "./ast.js";
import { conditionsSatisfiable } from "./desugar.js";
import { elementText } from "./parser.js";
import { distance } from "fastest-levenshtein";

/** Most bundles the reachability estimate keeps (it over-approximates; the cap keeps it cheap). */
const MAX_REACHABLE = 20_000;
/** Most "cannot write" errors reported per rule (the first ones show the problem). */
const MAX_UNWRITABLE_PER_RULE = 5;
/** Most variable assignments tried per change when checking what it can write. */
const MAX_ASSIGNMENTS = 256;

type Assignment = ReadonlyMap<string, readonly FeatureValue[]>;

/**
 * Checks a grammar against its inventory. Literal segments should already be split (loadGrammar
 * does it); an unsplit literal that is not one segment is reported here too. Returns every problem.
 */
export function checkGrammar(grammar: Grammar, inv: Inventory): Diagnostic[] {
  return new Checker(grammar, inv).run();
}

class Checker {
  readonly out: Diagnostic[] = [];
  readonly nodes = new Map<string, NodeDef>();
  readonly classes = new Map<string, ClassDef>();
  readonly literals = new Map<string, Bundle | null>();
  readonly nProsodic = PROSODIC_FEATURES.length;
  readonly syllabic: number;
  readonly stress: number;
  readonly primary: number;

  constructor(
    readonly grammar: Grammar,
    readonly inv: Inventory,
  ) {
    this.syllabic = inv.featureIndex.get("syllabic") ?? -1;
    this.stress = inv.featureIndex.get("stress") ?? -1;
    this.primary = inv.featureIndex.get("primary") ?? -1;
  }

  error(code: string, message: string, span: Span): void {
    this.out.push(diagnostic("error", code, message, span));
  }
  warn(code: string, message: string, span: Span): void {
    this.out.push(diagnostic("warning", code, message, span));
  }

  run(): Diagnostic[] {
    const g = this.grammar;
    for (const n of g.nodes) {
      this.nodes.set(n.name, n);
      if (this.inv.featureIndex.has(n.name))
        this.error("grammar/node-is-feature", `node '${n.name}' has the name of a feature`, n.span);
      for (const f of n.features)
        if (!this.inv.featureIndex.has(f)) this.error("grammar/unknown-feature", `node '${n.name}' groups '${f}', which is not a feature of the inventory${this.suggest(f)}`, n.span);
    }
    for (const c of g.classes) this.classes.set(c.name, c);
    for (const c of g.classes) {
      this.classCycle(c);
      for (const m of c.members) this.element(m, null);
    }
    for (const h of g.heavy) this.pattern(h, null);
    for (const list of [g.onsets, g.codas])
      for (const cl of list ?? [])
        for (const s of cl.segments)
          if (this.literal(s) === null) this.error("grammar/bad-cluster", `'${s}' in the cluster is not a segment of the inventory`, cl.span);
    const names = new Map<string, Span>();
    for (const s of g.steps) {
      if (s.kind !== "rule") continue;
      const first = names.get(s.name);
      if (first !== undefined)
        this.error("grammar/duplicate-rule", `rule name '${s.name}' is used twice (first at line ${first.line} of ${first.file})`, s.span);
      else names.set(s.name, s.span);
      this.rule(s);
    }
    this.reachability();
    return this.out;
  }

  suggest(name: string): string {
    let best: string | null = null;
    let bestD = 3;
    for (const f of [...this.inv.features, ...this.nodes.keys()]) {
      const d = distance(name, f);
      if (d < bestD) {
        bestD = d;
        best = f;
      }
    }
    return best === null ? "" : ` (did you mean '${best}'?)`;
  }

  classCycle(c: ClassDef): void {
    const seen = new Set<string>();
    const visit = (name: string): boolean => {
      if (name === c.name && seen.size > 0) return true;
      if (seen.has(name)) return false;
      seen.add(name);
      const d = this.classes.get(name);
      return d !== undefined && d.members.some((m) => m.kind === "class" && visit(m.name));
    };
    if (visit(c.name)) this.error("grammar/class-cycle", `class '${c.name}' is defined in terms of itself`, c.span);
  }

  /** The bundle of a literal segment (null when the inventory cannot read it as one segment). */
  literal(symbol: string): Bundle | null {
    let b = this.literals.get(symbol);
    if (b === undefined) {
      b = bundleOf(this.inv, symbol) ?? null;
      this.literals.set(symbol, b);
    }
    return b;
  }

  /** Validates names and values in an element; records variables in `vars` when given. */
  element(e: Element | ChangeElement, vars: Map<string, { kind: "feature" | string; span: Span }> | null): void {
    switch (e.kind) {
      case "bundle":
        this.specs(e.specs, e.span, vars);
        break;
      case "segment":
        if (this.literal(e.symbol) === null)
          this.error("grammar/unknown-segment", `'${e.symbol}' is not one segment of the inventory (with its diacritics)`, e.span);
        break;
      case "class":
        if (!this.classes.has(e.name)) this.error("grammar/unknown-class", `no class named '${e.name}' is defined`, e.span);
        break;
      case "boundary":
        break;
    }
  }

  specs(specs: readonly FeatureSpec[], span: Span, vars: Map<string, { kind: "feature" | string; span: Span }> | null): void {
    const seen = new Map<string, string>();
    for (const s of specs) {
      const isNode = this.nodes.has(s.feature);
      if (!isNode && !this.inv.featureIndex.has(s.feature)) {
        this.error("grammar/unknown-feature", `'${s.feature}' is not a feature of the inventory or a node${this.suggest(s.feature)}`, s.span);
        continue;
      }
      const written = s.kind === "value" ? s.value : `${s.negated ? "-" : ""}${s.variable}`;
      const before = seen.get(s.feature);
      if (before !== undefined && before !== written)
        this.error("grammar/contradictory-bundle", `the bundle gives '${s.feature}' two values (${before} and ${written})`, s.span);
      seen.set(s.feature, written);
      if (s.kind === "variable" && vars !== null) {
        const kind = isNode ? s.feature : "feature";
        const prev = vars.get(s.variable);
        if (prev !== undefined && prev.kind !== kind)
          this.error(
            "grammar/variable-kind",
            `variable ${s.variable} stands for ${prev.kind === "feature" ? "a feature value" : `node '${prev.kind}'`} elsewhere in this rule, but for ${kind === "feature" ? "a feature value" : `node '${kind}'`} here`,
            s.span,
          );
        else if (prev === undefined) vars.set(s.variable, { kind, span: s.span });
      }
    }
    void span;
  }

  pattern(p: Pattern, vars: Map<string, { kind: "feature" | string; span: Span }> | null): void {
    switch (p.kind) {
      case "element":
        this.element(p.element, vars);
        break;
      case "sequence":
        p.items.forEach((i) => this.pattern(i, vars));
        break;
      case "optional":
      case "repeat":
        this.pattern(p.body, vars);
        break;
      case "choice":
        p.options.forEach((o) => this.pattern(o, vars));
        break;
    }
  }

  /** Rules with errors in their names or shape: left out of the reachability pass (no cascades). */
  readonly broken = new Set<Rule>();

  rule(r: Rule): void {
    const errorsBefore = this.out.filter((d) => d.severity === "error").length;
    this.ruleShape(r);
    if (this.out.filter((d) => d.severity === "error").length > errorsBefore) this.broken.add(r);
  }

  ruleShape(r: Rule): void {
    const bound = new Map<string, { kind: "feature" | string; span: Span }>();
    for (const t of r.target) {
      this.element(t, bound);
      if (t.kind === "boundary") this.error("grammar/boundary-target", "a boundary cannot be rewritten", t.span);
    }
    for (const env of r.environments) {
      this.pattern(env.left, bound);
      this.pattern(env.right, bound);
    }
    const used = new Map<string, { kind: "feature" | string; span: Span }>();
    for (const c of r.change) this.element(c, used);
    for (const [v, u] of used) {
      const b = bound.get(v);
      if (b === undefined)
        this.error("grammar/unbound-variable", `variable ${v} in the change of rule '${r.name}' is not set by the target or an environment`, u.span);
      else if (b.kind !== u.kind)
        this.error("grammar/variable-kind", `variable ${v} stands for ${b.kind === "feature" ? "a feature value" : `node '${b.kind}'`} in the target or environment, but not in the change`, u.span);
    }
    if (r.target.length === 0 && r.change.length === 0) this.error("grammar/empty-rule", `rule '${r.name}' has ∅ on both sides of the arrow`, r.span);
    if (r.target.length === 0) {
      for (const c of r.change)
        if (c.kind === "bundle")
          this.error("grammar/insert-bundle", "an insertion writes whole segments; write the inserted segment in IPA, not a bundle", c.span);
    } else if (r.change.some((c) => c.kind === "bundle") && r.change.length !== r.target.length) {
      this.error(
        "grammar/change-length",
        `rule '${r.name}': a feature change needs one element per target element (target ${r.target.length}, change ${r.change.length})`,
        r.change[0]!.span,
      );
    }
    for (const env of r.environments) this.conditions(r, env);
  }

  /** Preconditions that make `desugar` exact (see desugar.ts), and conditions that contradict. */
  conditions(r: Rule, env: Environment): void {
    if (env.conditions.length === 0) return;
    if (!conditionsSatisfiable(env))
      this.warn("grammar/conditions-contradict", `the conditions of this environment of rule '${r.name}' can never hold together`, env.span);
    const base = this.baseBundles();
    for (const { condition, span } of env.conditions) {
      if (condition === "nucleus") {
        for (const t of r.target) {
          const bad = base.filter((b) => this.matches(t, b) && b[this.syllabic] !== "+");
          if (bad.length > 0)
            this.error(
              "grammar/nucleus-target",
              `'where nucleus' needs a target that is always a nucleus, but ${elementText(t)} also matches ${this.names(bad)}; add +syllabic to the target`,
              span,
            );
        }
      }
      if (condition === "stressed" || condition === "unstressed" || condition === "primary") {
        for (const t of r.target) {
          const bad = base.filter((b) => this.matches(t, b) && b[this.syllabic] === "+");
          if (bad.length > 0)
            this.error(
              "grammar/stress-condition-on-nucleus",
              `'where ${condition}' describes the syllable around a non-nucleus target, but ${elementText(t)} can be a nucleus (${this.names(bad)}); write ${condition === "unstressed" ? "-stress" : condition === "primary" ? "+primary" : "+stress"} in a +syllabic target instead`,
              span,
            );
        }
      }
    }
    if (!this.grammar.steps.some((s) => s.kind === "syllabify") && env.conditions.some((c) => c.condition !== "word-initial" && c.condition !== "word-final" && c.condition !== "nucleus"))
      this.warn("grammar/no-syllabify", `rule '${r.name}' uses syllable conditions, but the grammar has no syllabify step`, env.conditions[0]!.span);
  }

  names(bs: readonly Bundle[]): string {
    const seen = new Set<string>();
    const parts: string[] = [];
    for (const b of bs) {
      const r = realise(this.inv, b);
      const t = r.ok ? r.text : describeBundle(this.inv, b);
      if (!seen.has(t)) {
        seen.add(t);
        parts.push(t);
      }
    }
    return parts.slice(0, 6).join(" ") + (parts.length > 6 ? " …" : "");
  }

  /** Inventory segments, nuclei in each stress state the lexicon reader and the stress step give. */
  private base: Bundle[] | null = null;
  baseBundles(): Bundle[] {
    if (this.base !== null) return this.base;
    const out: Bundle[] = [];
    for (const s of this.inv.segments) {
      out.push(s.bundle);
      if (this.syllabic >= 0 && s.bundle[this.syllabic] === "+" && this.stress >= 0 && this.primary >= 0)
        for (const [st, pr] of [["+", "+"], ["+", "-"], ["-", "-"]] as const) {
          const b = [...s.bundle];
          b[this.stress] = st;
          b[this.primary] = pr;
          out.push(b);
        }
    }
    this.base = out;
    return out;
  }

  /** Does the element match the segment bundle? Variables accept any +/− value (node variables: anything). */
  matches(e: Element, b: Bundle, depth = 0): boolean {
    switch (e.kind) {
      case "boundary":
        return false;
      case "segment": {
        const l = this.literal(e.symbol);
        if (l === null) return false;
        const n = l.length - this.nProsodic;
        for (let i = 0; i < n; i++) if (l[i] !== b[i]) return false;
        return true;
      }
      case "class": {
        const c = this.classes.get(e.name);
        if (c === undefined || depth > 20) return false;
        return c.members.some((m) => this.matches(m, b, depth + 1));
      }
      case "bundle":
        return e.specs.every((s) => {
          const node = this.nodes.get(s.feature);
          const idxs = node !== undefined ? node.features.map((f) => this.inv.featureIndex.get(f) ?? -1) : [this.inv.featureIndex.get(s.feature) ?? -1];
          if (idxs.some((i) => i < 0)) return true; // reported as unknown already
          if (s.kind === "value") return idxs.every((i) => b[i] === s.value);
          return node !== undefined || b[idxs[0]!] !== "0";
        });
    }
  }

  /**
   * Reachable bundles: start from the inventory (nuclei in every stress state) and, rule by rule,
   * add what each change makes of the bundles its target matches. Environments are ignored, so
   * this over-approximates what can occur. Along the way: bundles that match nothing, rules that
   * can never apply, and changes that yield something the inventory cannot write.
   */
  reachability(): void {
    const reach = new Map<string, Bundle>();
    const add = (b: Bundle): void => {
      if (reach.size < MAX_REACHABLE) reach.set(bundleKey(b), b);
    };
    const base = this.baseBundles();
    base.forEach(add);
    const baseKeys = new Set(base.map(bundleKey));
    const unwritable = new Set<string>();
    const reported = new Map<string, number>();
    for (const step of this.grammar.steps) {
      if (step.kind !== "rule" || this.broken.has(step)) continue;
      const r = step;
      const now = [...reach.values()];
      // Environment bundles that match nothing available at this point.
      for (const env of r.environments) for (const side of [env.left, env.right]) this.matchNothing(side, now);
      if (r.target.length === 0) {
        for (const c of r.change) if (c.kind === "segment") {
          const l = this.literal(c.symbol);
          if (l !== null) add(this.inserted(l));
        }
        continue;
      }
      const matched = r.target.map((t) => now.filter((b) => this.matches(t, b)));
      const dead = r.target.findIndex((_, k) => matched[k]!.length === 0);
      if (dead >= 0) {
        const t = r.target[dead]!;
        if (t.kind === "bundle") this.matchNothing({ kind: "element", element: t }, now, true);
        else this.warn("grammar/never-applies", `rule '${r.name}' can never apply: no segment available at this point matches ${elementText(t)}`, t.span);
        continue;
      }
      if (r.change.length === 0) continue;
      if (r.change.length !== r.target.length) {
        for (const c of r.change) if (c.kind === "segment") {
          const l = this.literal(c.symbol);
          if (l !== null) add(l);
        }
        continue;
      }
      r.change.forEach((c, k) => {
        for (const b of matched[k]!) {
          for (const a of this.assignments(r, k, b, now)) {
            const result = this.apply(c, b, a);
            if (result === null) continue;
            const key = bundleKey(result);
            if (!reach.has(key)) {
              const w = realise(this.inv, result);
              const from = w.ok ? null : realise(this.inv, b);
              const fromText = from === null ? "" : from.ok ? from.text : describeBundle(this.inv, b);
              // One report per rule, source segment and change (its stress variants say nothing new).
              const id = `${r.name}\u0000${fromText}\u0000${this.difference(b, result)}`;
              const perRule = reported.get(r.name) ?? 0;
              if (!w.ok && !unwritable.has(id) && perRule < MAX_UNWRITABLE_PER_RULE) {
                unwritable.add(id);
                reported.set(r.name, perRule + 1);
                const message = `rule '${r.name}' turns ${fromText} into ${fromText} with ${this.difference(b, result)}, which the inventory and its diacritics cannot write`;
                if (baseKeys.has(bundleKey(b))) this.error("grammar/unwritable", message, c.span);
                else this.warn("grammar/unwritable", `${message} (${fromText} comes from an earlier rule)`, c.span);
              }
            }
            add(result);
          }
        }
      });
    }
    const all = [...reach.values()];
    for (const c of this.grammar.classes) for (const m of c.members) this.matchNothing({ kind: "element", element: m }, all);
  }

  /** Warns for each bundle in the pattern that matches none of `available`. */
  matchNothing(p: Pattern, available: readonly Bundle[], isTarget = false): void {
    switch (p.kind) {
      case "element": {
        const e = p.element;
        if (e.kind !== "bundle" || e.specs.length === 0) return;
        if (available.some((b) => this.matches(e, b))) return;
        const shown = `[${e.specs.map((s) => (s.kind === "value" ? `${s.value === "-" ? "−" : s.value}${s.feature}` : `${s.negated ? "−" : ""}${s.variable}${s.feature}`)).join(" ")}]`;
        if (isTarget) this.warn("grammar/never-applies", `the rule can never apply: its target ${shown} matches no segment available at this point`, e.span);
        else this.warn("grammar/matches-nothing", `the bundle ${shown} matches no segment`, e.span);
        return;
      }
      case "sequence":
        p.items.forEach((i) => this.matchNothing(i, available));
        return;
      case "optional":
      case "repeat":
        this.matchNothing(p.body, available);
        return;
      case "choice":
        p.options.forEach((o) => this.matchNothing(o, available));
        return;
    }
  }

  /** Inserted segments: consonants [0stress 0primary], nuclei [-stress -primary] (DEVELOPERS.md). */
  inserted(l: Bundle): Bundle {
    const b = [...l];
    if (this.stress >= 0 && this.primary >= 0 && this.syllabic >= 0) {
      const v: FeatureValue = b[this.syllabic] === "+" ? "-" : "0";
      b[this.stress] = v;
      b[this.primary] = v;
    }
    return b;
  }

  nodeIndices(name: string): number[] | null {
    const node = this.nodes.get(name);
    if (node === undefined) return null;
    return node.features.map((f) => this.inv.featureIndex.get(f) ?? -1).filter((i) => i >= 0);
  }

  /**
   * Variable assignments for applying the change at target position k to bundle b: variables
   * written in target element k take b's values; the others range over every value (feature: + −;
   * node: every combination found in the inventory). Capped at MAX_ASSIGNMENTS.
   */
  assignments(r: Rule, k: number, b: Bundle, available: readonly Bundle[]): Assignment[] {
    const vars = new Map<string, { node: string | null }>();
    for (const c of r.change)
      if (c.kind === "bundle")
        for (const s of c.specs) if (s.kind === "variable") vars.set(s.variable, { node: this.nodes.has(s.feature) ? s.feature : null });
    if (vars.size === 0) return [new Map()];
    const fixed = new Map<string, FeatureValue[]>();
    const t = r.target[k]!;
    if (t.kind === "bundle")
      for (const s of t.specs) {
        if (s.kind !== "variable") continue;
        const idxs = this.nodeIndices(s.feature) ?? [this.inv.featureIndex.get(s.feature) ?? -1];
        if (idxs.some((i) => i < 0)) continue;
        fixed.set(s.variable, idxs.map((i) => flip(b[i]!, s.negated)));
      }
    let out: Map<string, readonly FeatureValue[]>[] = [new Map(fixed)];
    for (const [v, { node }] of vars) {
      if (fixed.has(v)) continue;
      // Values the variable can take: those of the available bundles matching the element that binds it.
      const binder = this.binder(r, v, k);
      const idxs = node !== null ? (this.nodeIndices(node) ?? []) : [];
      const options: FeatureValue[][] = [];
      const seen = new Set<string>();
      for (const s of available) {
        if (binder !== null && !this.matches(binder.element, s)) continue;
        const feature = binder?.spec.feature;
        const is = node !== null ? idxs : [feature !== undefined ? (this.inv.featureIndex.get(feature) ?? -1) : -1];
        if (is.some((i) => i < 0)) continue;
        const vals = is.map((i) => flip(s[i]!, binder?.spec.negated ?? false));
        if (node === null && vals[0] === "0") continue;
        const key = vals.join("");
        if (!seen.has(key)) {
          seen.add(key);
          options.push(vals);
        }
      }
      if (options.length === 0 && node === null) options.push(["+"], ["-"]);
      const next: Map<string, readonly FeatureValue[]>[] = [];
      for (const a of out) for (const o of options) if (next.length < MAX_ASSIGNMENTS) next.push(new Map(a).set(v, o));
      out = next;
    }
    return out;
  }

  /** The first bundle element (other than target element k) that writes variable v, and its spec. */
  binder(r: Rule, v: string, k: number): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null {
    const inElement = (e: Element): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null => {
      if (e.kind !== "bundle") return null;
      for (const s of e.specs) if (s.kind === "variable" && s.variable === v) return { element: e, spec: s };
      return null;
    };
    const inPattern = (p: Pattern): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null => {
      switch (p.kind) {
        case "element":
          return inElement(p.element);
        case "sequence":
          for (const i of p.items) {
            const f = inPattern(i);
            if (f !== null) return f;
          }
          return null;
        case "optional":
        case "repeat":
          return inPattern(p.body);
        case "choice":
          for (const o of p.options) {
            const f = inPattern(o);
            if (f !== null) return f;
          }
          return null;
      }
    };
    for (let j = 0; j < r.target.length; j++) {
      if (j === k) continue;
      const f = inElement(r.target[j]!);
      if (f !== null) return f;
    }
    for (const env of r.environments) {
      const f = inPattern(env.left) ?? inPattern(env.right);
      if (f !== null) return f;
    }
    return null;
  }

  /** The values that differ between two bundles, as "[+labial −coronal]". */
  difference(from: Bundle, to: Bundle): string {
    const parts: string[] = [];
    to.forEach((v, i) => {
      if (from[i] !== v) parts.push(`${v === "-" ? "−" : v}${this.inv.features[i]}`);
    });
    return `[${parts.join(" ")}]`;
  }

  /** The change applied to one bundle: a bundle sets what it names; a literal keeps prosodic values. */
  apply(c: ChangeElement, b: Bundle, a: Assignment): Bundle | null {
    const out = [...b];
    if (c.kind === "segment") {
      const l = this.literal(c.symbol);
      if (l === null) return null;
      const n = l.length - this.nProsodic;
      for (let i = 0; i < n; i++) out[i] = l[i]!;
      return out;
    }
    for (const s of c.specs) {
      const node = this.nodeIndices(s.feature);
      const idxs = node ?? [this.inv.featureIndex.get(s.feature) ?? -1];
      if (idxs.some((i) => i < 0)) return null;
      if (s.kind === "value") for (const i of idxs) out[i] = s.value;
      else {
        const v = a.get(s.variable);
        if (v === undefined) return null;
        if (node !== null) {
          if (v.length !== idxs.length) return null;
          idxs.forEach((i, j) => (out[i] = flip(v[j]!, s.negated)));
        } else out[idxs[0]!] = flip(v[0]!, s.negated);
      }
    }
    return out;
  }
}

const flip = (v: FeatureValue, negated: boolean): FeatureValue => (!negated || v === "0" ? v : v === "+" ? "-" : "+");

