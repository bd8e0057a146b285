// Terse builders for grammar AST values in tests (rules, patterns, environments, steps), so tests
// and generators can state rules without going through the parser.

import type {
  ApplicationMode, ChangeElement, ClassDef, Cluster, Element, Environment, FeatureSpec, Grammar, NodeDef, Pattern,
  ProsodicCondition, Rule, Span, Step, StressStep, SyllabifyStep,
} from "../../src/grammar/ast.js";

export const SPAN: Span = { file: "test.strata", line: 1, column: 1, length: 1 };

const GREEK: Record<string, string> = { "α": "alpha", "β": "beta", "γ": "gamma", "δ": "delta" };

/**
 * Feature specs from SPE-like text: `+voice -nasal 0labial αvoice -βplace`. A Greek letter
 * (α β γ δ) before the name makes a variable; a leading `-` before it negates the variable.
 */
export function specs(text: string): FeatureSpec[] {
  return text.trim().split(/\s+/).filter((t) => t !== "").map((tok): FeatureSpec => {
    const m = /^([+\-0]?)([αβγδ]?)(.+)$/u.exec(tok);
    if (m === null) throw new Error(`bad spec '${tok}'`);
    const [, sign, greek, feature] = m as unknown as [string, string, string, string];
    if (greek !== "") return { kind: "variable", feature, variable: GREEK[greek] as string, negated: sign === "-", span: SPAN };
    if (sign === "") throw new Error(`spec '${tok}' needs + - 0 or a variable`);
    return { kind: "value", feature, value: sign as "+" | "-" | "0", span: SPAN };
  });
}

export const seg = (symbol: string): Element => ({ kind: "segment", symbol, span: SPAN });
export const bun = (text: string): Element => ({ kind: "bundle", specs: text.trim() === "" ? [] : specs(text), span: SPAN });
export const cls = (name: string): Element => ({ kind: "class", name, span: SPAN });
export const WB: Element = { kind: "boundary", which: "word", span: SPAN };
export const SB: Element = { kind: "boundary", which: "syllable", span: SPAN };

export type PatLike = Pattern | Element;
const isElement = (p: PatLike): p is Element => p.kind === "bundle" || p.kind === "segment" || p.kind === "class" || p.kind === "boundary";
export const pat = (p: PatLike): Pattern => (isElement(p) ? { kind: "element", element: p } : p);
export const seq = (...items: PatLike[]): Pattern => ({ kind: "sequence", items: items.map(pat), span: SPAN });
export const opt = (...items: PatLike[]): Pattern => ({ kind: "optional", body: items.length === 1 ? pat(items[0] as PatLike) : seq(...items), span: SPAN });
export const choice = (...options: PatLike[]): Pattern => ({ kind: "choice", options: options.map(pat), span: SPAN });
export const rep = (body: PatLike, min: number, max: number | null = null): Pattern => ({ kind: "repeat", body: pat(body), min, max, span: SPAN });

export function env(left: PatLike[] = [], right: PatLike[] = [], conditions: ProsodicCondition[] = []): Environment {
  return { left: seq(...left), right: seq(...right), conditions: conditions.map((condition) => ({ condition, span: SPAN })), span: SPAN };
}

export const chSeg = (symbol: string): ChangeElement => ({ kind: "segment", symbol, span: SPAN });
export const chBun = (text: string): ChangeElement => ({ kind: "bundle", specs: specs(text), span: SPAN });

export interface RuleOpts {
  readonly optional?: boolean;
  readonly mode?: ApplicationMode;
  readonly prefer?: "applied" | "unapplied";
}

export function rule(name: string, target: Element[], change: ChangeElement[], environments: Environment[], o: RuleOpts = {}): Rule {
  return {
    kind: "rule", name, span: SPAN, optional: o.optional ?? false, mode: o.mode ?? "simultaneous",
    prefer: o.prefer ?? "applied", target, change, environments,
  };
}

export const syllabifyStep = (name = "syllabify"): SyllabifyStep => ({ kind: "syllabify", name, span: SPAN });
export const stressStep = (edge: "left" | "right", position: number, otherwise: number | null = null, name = "stress"): StressStep => ({
  kind: "stress", name, span: SPAN, edge, position, otherwise,
});

export const classDef = (name: string, members: Element[]): ClassDef => ({ name, members, span: SPAN });
export const nodeDef = (name: string, features: string[]): NodeDef => ({ name, features, span: SPAN });
/** Clusters from space-separated text whose segments are separated by `+` or, if none, one code point each. */
export const clusters = (text: string): Cluster[] =>
  text.trim().split(/\s+/).map((c) => ({ segments: c.includes("+") ? c.split("+") : [...c], span: SPAN }));

export function grammar(steps: Step[], extra: Partial<Omit<Grammar, "steps">> = {}): Grammar {
  return {
    file: "test.strata", inventory: null, diacritics: null, nodes: [], classes: [], onsets: null, codas: null,
    heavy: [], files: ["test.strata"], ...extra, steps,
  };
}
