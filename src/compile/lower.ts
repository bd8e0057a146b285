// Rule lowering, on feature bundles: alpha-variable assignments (one "case" per assignment),
// elements as bundle predicates, changes applied to bundles. Shared by the alphabet closure
// (alphabet.ts) and the rule construction (rule.ts, via elements as symbol sets).

import type { ChangeElement, Element, FeatureSpec, Grammar, NodeDef, ClassDef, Pattern, Rule, Span } from "../grammar/ast.js";
import type { Bundle, FeatureValue, Inventory } from "../inventory/types.js";
import { PROSODIC_FEATURES } from "../inventory/types.js";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { resolveSymbol } from "../interp/index.js";

/** Values of the alpha variables of one case: a feature variable has one value (+ or -), a node variable one value per node feature. */
export type Assignment = ReadonlyMap<string, readonly FeatureValue[]>;

/** What an element matches: `#`, `.`, `+`, and segments whose bundle satisfies `seg`. */
export interface ElementMatch {
  readonly word: boolean;
  readonly syll: boolean;
  readonly join?: boolean;
  readonly seg: (b: Bundle) => boolean;
}

/** Error raised inside lowering; converted to a Diagnostic at the compiler's edge. */
export class LowerError extends Error {
  constructor(readonly diagnostic: Diagnostic) {
    super(diagnostic.message);
  }
}

export function lowerError(code: string, message: string, span: Span): LowerError {
  return new LowerError(diagnostic("error", code, message, { file: span.file, line: span.line, column: span.column, length: span.length }));
}

/** Name lookups for one grammar over one inventory, with literal segments read once. */
export class Lowering {
  readonly classes: ReadonlyMap<string, ClassDef>;
  readonly nodes: ReadonlyMap<string, NodeDef>;
  readonly stressIdx: number;
  readonly primaryIdx: number;
  readonly syllabicIdx: number;
  /** Indices of the non-prosodic features. */
  readonly segmental: readonly number[];
  private readonly literals = new Map<string, Bundle>();

  /** Most assignments one rule may have (CompileLimits.ruleCases); more is a `compile/too-large` at the rule. */
  maxAssignments = Infinity;

  constructor(readonly grammar: Grammar, readonly inventory: Inventory) {
    this.classes = new Map(grammar.classes.map((c) => [c.name, c]));
    this.nodes = new Map(grammar.nodes.map((n) => [n.name, n]));
    const fi = inventory.featureIndex;
    this.stressIdx = fi.get(PROSODIC_FEATURES[0]) ?? -1;
    this.primaryIdx = fi.get(PROSODIC_FEATURES[1]) ?? -1;
    this.syllabicIdx = fi.get("syllabic") ?? -1;
    const pros = new Set([this.stressIdx, this.primaryIdx]);
    this.segmental = inventory.features.map((_, i) => i).filter((i) => !pros.has(i));
  }

  /** The bundle of a literal IPA segment (prosodic features '0'). */
  literal(symbol: string, span: Span): Bundle {
    const hit = this.literals.get(symbol);
    if (hit) return hit;
    // Read exactly as the interpreter reads literals (an inventory symbol plus declared diacritics).
    const b = resolveSymbol(this.inventory, symbol);
    if (b === null) throw lowerError("compile/unknown-segment", `'${symbol}' is not a segment of the inventory (nor one with declared diacritics).`, span);
    this.literals.set(symbol, b);
    return b;
  }

  feature(name: string, span: Span): number {
    const i = this.inventory.featureIndex.get(name);
    if (i === undefined) throw lowerError("compile/unknown-feature", `There is no feature '${name}' in the inventory.`, span);
    return i;
  }

  isNucleus(b: Bundle): boolean {
    return this.syllabicIdx >= 0 && b[this.syllabicIdx] === "+";
  }

  /** Feature indices a variable spec on `name` ranges over (a node's features, or the one feature). */
  varFeatures(name: string, span: Span): { node: boolean; idx: number[] } {
    const fi = this.inventory.featureIndex.get(name);
    if (fi !== undefined) return { node: false, idx: [fi] };
    const node = this.nodes.get(name);
    if (node) return { node: true, idx: node.features.map((f) => this.feature(f, node.span)) };
    return { node: false, idx: [this.feature(name, span)] };
  }

  // ---- alpha variables -------------------------------------------------------------------

  /**
   * The variables a rule uses, each with the feature indices it ranges over. A variable used on
   * a node takes, per case, one combination of that node's values; on a plain feature, + or -.
   */
  variables(rule: Rule): Map<string, { node: boolean; idx: number[]; span: Span; matched: boolean }> {
    const vars = new Map<string, { node: boolean; idx: number[]; span: Span; matched: boolean }>();
    let matching = true;
    const seen = new Set<ClassDef>();
    const visitSpecs = (specs: readonly FeatureSpec[]): void => {
      for (const s of specs) {
        if (s.kind !== "variable") continue;
        const vf = this.varFeatures(s.feature, s.span);
        const prev = vars.get(s.variable);
        if (!prev) { vars.set(s.variable, { ...vf, span: s.span, matched: matching }); continue; }
        if (matching) prev.matched = true;
        if (prev.node !== vf.node || (vf.node && prev.idx.join(",") !== vf.idx.join(","))) {
          throw lowerError("compile/mixed-variable", `Variable '${s.variable}' is used both on ${prev.node ? "a node" : "a feature"} and on '${s.feature}'; use a different variable.`, s.span);
        }
      }
    };
    const visitElement = (e: Element): void => {
      if (e.kind === "bundle") visitSpecs(e.specs);
      else if (e.kind === "class") {
        const c = this.classes.get(e.name);
        if (c && !seen.has(c)) { seen.add(c); c.members.forEach(visitElement); }
      }
    };
    const visitPattern = (p: Pattern): void => {
      switch (p.kind) {
        case "element": visitElement(p.element); break;
        case "sequence": p.items.forEach(visitPattern); break;
        case "optional": visitPattern(p.body); break;
        case "choice": p.options.forEach(visitPattern); break;
        case "repeat": visitPattern(p.body); break;
        default: { const never: never = p; throw new Error(String(never)); }
      }
    };
    rule.target.forEach(visitElement);
    for (const env of rule.environments) { visitPattern(env.left); visitPattern(env.right); }
    matching = false;
    for (const c of rule.change) if (c.kind === "bundle") visitSpecs(c.specs);
    return vars;
  }

  /**
   * Every assignment of the rule's variables: feature variables over + and -, node variables over
   * the combinations of the node's values that occur among `bundles` (the alphabet so far).
   * Deterministic order: variables by name, values in first-occurrence order of a sorted list.
   */
  assignments(rule: Rule, bundles: readonly Bundle[]): Assignment[] {
    const vars = [...this.variables(rule).entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
    let out: Map<string, readonly FeatureValue[]>[] = [new Map()];
    for (const [name, v] of vars) {
      let domain: FeatureValue[][];
      if (!v.node) domain = [["+"], ["-"]];
      else {
        // Tuples a match can bind: those of the symbols (and their mirror images, for [-α node]),
        // plus the inventory's, which an unbound variable ranges over (as the interpreter does).
        const keys = new Set<string>();
        domain = [];
        const addTuple = (t: FeatureValue[]): void => {
          const k = t.join("");
          if (!keys.has(k)) { keys.add(k); domain.push(t); }
        };
        // A variable only the change uses ranges over the inventory's tuples alone.
        const sources = v.matched ? [...bundles, ...this.inventory.segments.map((s) => s.bundle)] : this.inventory.segments.map((s) => s.bundle);
        for (const b of sources) {
          const t = v.idx.map((i) => b[i]!);
          addTuple(t);
          if (v.matched) addTuple(t.map(flip));
        }
        domain.sort((a, b) => (a.join("") < b.join("") ? -1 : a.join("") > b.join("") ? 1 : 0));
      }
      if (out.length * domain.length > this.maxAssignments) {
        throw lowerError(
          "compile/too-large",
          `Rule '${rule.name}' cannot be compiled within the limits: its ${vars.length} alpha variables combine in more than ${this.maxAssignments.toLocaleString("en-US")} ways. Split the rule or use fewer variables.`,
          rule.span,
        );
      }
      const next: Map<string, readonly FeatureValue[]>[] = [];
      for (const a of out) for (const d of domain) { const m = new Map(a); m.set(name, d); next.push(m); }
      out = next;
    }
    return out;
  }

  // ---- elements ----------------------------------------------------------------------------

  private specTest(s: FeatureSpec, asg: Assignment): (b: Bundle) => boolean {
    if (s.kind === "value") {
      // A value on a node tests every feature of the node (as the interpreter reads it).
      const idx = this.varFeatures(s.feature, s.span).idx;
      const v = s.value;
      return (b) => idx.every((i) => b[i] === v);
    }
    const vf = this.varFeatures(s.feature, s.span);
    const val = asg.get(s.variable);
    if (!val) throw lowerError("compile/unbound-variable", `Variable '${s.variable}' has no value here.`, s.span);
    if (!vf.node) {
      const i = vf.idx[0]!;
      const want = s.negated ? flip(val[0]!) : val[0]!;
      return (b) => b[i] === want;
    }
    const idx = vf.idx;
    const want = s.negated ? val.map(flip) : val;
    return (b) => idx.every((i, k) => b[i] === want[k]);
  }

  /** What an element matches under an assignment. */
  element(e: Element, asg: Assignment, depth = 0): ElementMatch {
    switch (e.kind) {
      case "bundle": {
        const tests = e.specs.map((s) => this.specTest(s, asg));
        return { word: false, syll: false, seg: (b) => tests.every((t) => t(b)) };
      }
      case "segment": {
        const lit = this.literal(e.symbol, e.span);
        const idx = this.segmental;
        return { word: false, syll: false, seg: (b) => idx.every((i) => b[i] === lit[i]) };
      }
      case "class": {
        const c = this.classes.get(e.name);
        if (!c) throw lowerError("compile/unknown-class", `There is no class '${e.name}'.`, e.span);
        if (depth > 20) throw lowerError("compile/class-cycle", `Class '${e.name}' refers to itself.`, e.span);
        const ms = c.members.map((m) => this.element(m, asg, depth + 1));
        return { word: ms.some((m) => m.word), syll: ms.some((m) => m.syll), seg: (b) => ms.some((m) => m.seg(b)) };
      }
      case "boundary":
        if (e.which === "join") return { word: false, syll: false, join: true, seg: () => false };
        return e.which === "word" ? { word: true, syll: false, seg: () => false } : { word: true, syll: true, seg: () => false };
      default: {
        const never: never = e;
        throw new Error(String(never));
      }
    }
  }

  // ---- changes -------------------------------------------------------------------------------

  /**
   * The bundle a change element makes of a target bundle: a bundle change sets the features it
   * names; a literal segment replaces the non-prosodic features and keeps the target's prosodic ones.
   */
  applyChange(c: ChangeElement, asg: Assignment, target: Bundle): Bundle {
    const out = [...target];
    if (c.kind === "segment") {
      const lit = this.literal(c.symbol, c.span);
      for (const i of this.segmental) out[i] = lit[i]!;
      return out;
    }
    for (const s of c.specs) {
      if (s.kind === "value") {
        for (const i of this.varFeatures(s.feature, s.span).idx) out[i] = s.value;
        continue;
      }
      const vf = this.varFeatures(s.feature, s.span);
      const val = asg.get(s.variable);
      if (!val) throw lowerError("compile/unbound-variable", `Variable '${s.variable}' has no value here.`, s.span);
      if (!vf.node) out[vf.idx[0]!] = s.negated ? flip(val[0]!) : val[0]!;
      else vf.idx.forEach((i, k) => { out[i] = s.negated ? flip(val[k]!) : val[k]!; });
    }
    return out;
  }

  /** An inserted segment: a literal; consonants get [0stress 0primary], nuclei [-stress -primary]. */
  inserted(c: ChangeElement): Bundle {
    if (c.kind !== "segment") {
      throw lowerError("compile/insert-bundle", "An insertion must name the segment to insert, not a feature bundle.", c.span);
    }
    const out = [...this.literal(c.symbol, c.span)];
    const v: FeatureValue = this.isNucleus(out) ? "-" : "0";
    if (this.stressIdx >= 0) out[this.stressIdx] = v;
    if (this.primaryIdx >= 0) out[this.primaryIdx] = v;
    return out;
  }
}

export function flip(v: FeatureValue): FeatureValue {
  return v === "+" ? "-" : v === "-" ? "+" : "0";
}
