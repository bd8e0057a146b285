// fast-check generators for differential tests (compiled machine vs reference interpreter): random
// small grammars over the tiny inventory, as AST and as grammar text, and random words.

import fc from "fast-check";
import type {
  ApplicationMode, ChangeElement, ClassDef, Element, Environment, FeatureSpec, Grammar, NodeDef, Pattern, ProsodicCondition,
  Rule, Step,
} from "../../src/grammar/ast.js";
import type { FeatureValue, Inventory } from "../../src/inventory/types.js";
import type { Sym } from "../../src/interp/types.js";
import { SYLLABLE_EDGE, WORD_EDGE } from "../../src/interp/types.js";
import { SPAN, clusters, pat } from "./ast.js";
import { tinyInventory } from "./tiny-inventory.js";

/** The segmental features of the tiny inventory, and its one node. */
const FEATURES = ["syllabic", "voice", "nasal", "labial", "coronal"] as const;
const SEGMENTS = ["p", "t", "k", "b", "d", "n", "a", "i"] as const;
const CONSONANTS = ["p", "t", "k", "b", "d", "n"] as const;
const VOWELS = ["a", "i"] as const;

/** Classes and the node every generated grammar declares (the rules refer to them). */
export const ARB_CLASSES: readonly ClassDef[] = [
  { name: "C", members: [{ kind: "bundle", specs: [{ kind: "value", feature: "syllabic", value: "-", span: SPAN }], span: SPAN }], span: SPAN },
  { name: "V", members: [{ kind: "bundle", specs: [{ kind: "value", feature: "syllabic", value: "+", span: SPAN }], span: SPAN }], span: SPAN },
  { name: "Stop", members: ["p", "t", "k"].map((symbol): Element => ({ kind: "segment", symbol, span: SPAN })), span: SPAN },
];
export const ARB_NODES: readonly NodeDef[] = [{ name: "place", features: ["labial", "coronal"], span: SPAN }];
/** Onsets and codas of generated grammars that syllabify (some words will need the fallbacks). */
export const ARB_ONSETS = clusters("p t k b d n pn tn kn bn dn");
export const ARB_CODAS = clusters("p t k n nt np nk");
export const ARB_HEAVY: readonly Pattern[] = [
  { kind: "sequence", items: [pat({ kind: "class", name: "V", span: SPAN }), pat({ kind: "class", name: "C", span: SPAN })], span: SPAN },
];

const value = (feature: string, v: FeatureValue): FeatureSpec => ({ kind: "value", feature, value: v, span: SPAN });
const variable = (feature: string, name: string, negated = false): FeatureSpec => ({ kind: "variable", feature, variable: name, negated, span: SPAN });
const bundle = (specs: FeatureSpec[]): Element => ({ kind: "bundle", specs, span: SPAN });

const arbValue: fc.Arbitrary<FeatureValue> = fc.constantFrom<FeatureValue>("+", "-");
const arbSpec: fc.Arbitrary<FeatureSpec> = fc.tuple(fc.constantFrom(...FEATURES), arbValue).map(([f, v]) => value(f, v));
/** A bundle of one or two distinct features (no variables: those come from `arbAlpha`). */
const arbBundle: fc.Arbitrary<Element> = fc
  .uniqueArray(arbSpec, { minLength: 1, maxLength: 2, selector: (s) => s.feature })
  .map(bundle);
const arbSegment: fc.Arbitrary<Element> = fc.constantFrom(...SEGMENTS).map((symbol): Element => ({ kind: "segment", symbol, span: SPAN }));
const arbClass: fc.Arbitrary<Element> = fc.constantFrom("C", "V", "Stop").map((name): Element => ({ kind: "class", name, span: SPAN }));
/** A target element: never a boundary. */
const arbTargetElement: fc.Arbitrary<Element> = fc.oneof(arbBundle, arbSegment, arbClass);
const arbContextElement: fc.Arbitrary<Element> = fc.oneof(
  { weight: 3, arbitrary: arbTargetElement },
  { weight: 1, arbitrary: fc.constantFrom<Element>({ kind: "boundary", which: "word", span: SPAN }, { kind: "boundary", which: "syllable", span: SPAN }) },
);

/** One context item: an element, `( x )`, `{ x | y }`, or `x₀ x₁ x₀² x₁²`. */
const arbItem: fc.Arbitrary<Pattern> = fc.oneof(
  { weight: 5, arbitrary: arbContextElement.map(pat) },
  { weight: 1, arbitrary: arbContextElement.map((e): Pattern => ({ kind: "optional", body: pat(e), span: SPAN })) },
  { weight: 1, arbitrary: fc.tuple(arbContextElement, arbContextElement).map(([a, b]): Pattern => ({ kind: "choice", options: [pat(a), pat(b)], span: SPAN })) },
  {
    weight: 1,
    arbitrary: fc.tuple(arbTargetElement, fc.constantFrom<[number, number | null]>([0, null], [1, null], [0, 2], [1, 2])).map(
      ([e, [min, max]]): Pattern => ({ kind: "repeat", body: pat(e), min, max, span: SPAN }),
    ),
  },
);
const arbSide: fc.Arbitrary<Pattern> = fc.array(arbItem, { maxLength: 2 }).map((items): Pattern => ({ kind: "sequence", items, span: SPAN }));
const arbConditions = (targetIsVowel: boolean): fc.Arbitrary<ProsodicCondition[]> => {
  const all: ProsodicCondition[] = ["onset", "coda", "syllable-initial", "syllable-final", "word-initial", "word-final", "stressed", "unstressed", "primary"];
  if (targetIsVowel) all.push("nucleus");
  return fc.oneof({ weight: 3, arbitrary: fc.constant<ProsodicCondition[]>([]) }, { weight: 1, arbitrary: fc.uniqueArray(fc.constantFrom(...all), { minLength: 1, maxLength: 2 }) });
};
const arbEnv = (targetIsVowel: boolean): fc.Arbitrary<Environment> =>
  fc.record({ left: arbSide, right: arbSide, conditions: arbConditions(targetIsVowel), mirrored: fc.constantFrom(false, false, false, true) }).map(
    ({ left, right, conditions, mirrored }): Environment => ({
      left, right, conditions: conditions.map((condition) => ({ condition, span: SPAN })), span: SPAN, ...(mirrored ? { mirrored } : {}),
    }),
  );

interface Core {
  target: Element[];
  change: ChangeElement[];
  /** Extra context put next to the target to bind the change's variables. */
  bindLeft: Element[];
  bindRight: Element[];
}

const changeSeg = (symbol: string): ChangeElement => ({ kind: "segment", symbol, span: SPAN });
const arbChangeBundle: fc.Arbitrary<ChangeElement> = fc
  .uniqueArray(fc.tuple(fc.constantFrom("voice", "nasal", "labial", "coronal"), arbValue).map(([f, v]) => value(f, v)), { minLength: 1, maxLength: 2, selector: (s) => s.feature })
  .map((specs): ChangeElement => ({ kind: "bundle", specs, span: SPAN }));
const arbChangeElement: fc.Arbitrary<ChangeElement> = fc.oneof(arbChangeBundle, fc.constantFrom(...SEGMENTS).map(changeSeg));

/** Feature changes, deletion, insertion, multi-segment targets, and alpha variables bound next to the target. */
const arbCore: fc.Arbitrary<Core> = fc.oneof(
  // feature or segment change, one or two target elements
  { weight: 4, arbitrary: fc.integer({ min: 1, max: 2 }).chain((n) => fc.tuple(fc.array(arbTargetElement, { minLength: n, maxLength: n }), fc.array(arbChangeElement, { minLength: n, maxLength: n }))).map(([target, change]): Core => ({ target, change, bindLeft: [], bindRight: [] })) },
  // deletion
  { weight: 1, arbitrary: fc.array(arbTargetElement, { minLength: 1, maxLength: 2 }).map((target): Core => ({ target, change: [], bindLeft: [], bindRight: [] })) },
  // insertion of one or two segments
  { weight: 1, arbitrary: fc.array(fc.constantFrom(...SEGMENTS).map(changeSeg), { minLength: 1, maxLength: 2 }).map((change): Core => ({ target: [], change, bindLeft: [], bindRight: [] })) },
  // alpha variable on a feature: bound in the target, or in a context element beside it
  {
    weight: 2,
    arbitrary: fc.record({ f: fc.constantFrom("voice", "nasal", "labial", "coronal"), g: fc.constantFrom("voice", "nasal", "labial", "coronal"), neg: fc.boolean(), where: fc.constantFrom("target", "left", "right") }).map(({ f, g, neg, where }): Core => {
      const change: ChangeElement[] = [{ kind: "bundle", specs: [variable(g, "alpha", neg)], span: SPAN }];
      if (where === "target") return { target: [bundle([value("syllabic", "-"), variable(f, "alpha")])], change, bindLeft: [], bindRight: [] };
      const binder = bundle([variable(f, "alpha")]);
      return { target: [bundle([value("syllabic", "-")])], change, bindLeft: where === "left" ? [binder] : [], bindRight: where === "right" ? [binder] : [] };
    }),
  },
  // a variable only the change uses: it takes every value (several outputs)
  { weight: 1, arbitrary: fc.tuple(arbTargetElement, fc.constantFrom("voice", "nasal", "labial", "coronal")).map(([t, f]): Core => ({ target: [t], change: [{ kind: "bundle", specs: [variable(f, "beta")], span: SPAN }], bindLeft: [], bindRight: [] })) },
  // insertion of a bundle that denotes one segment (every feature of a tiny-inventory segment)
  {
    weight: 1,
    arbitrary: fc.constantFrom(...SEGMENTS).map((symbol): Core => {
      const seg = tinyInventory.segments.find((x) => x.symbol === symbol)!;
      const specs = FEATURES.map((f) => value(f, seg.bundle[tinyInventory.featureIndex.get(f)!]!));
      return { target: [], change: [{ kind: "bundle", specs, span: SPAN }], bindLeft: [], bindRight: [] };
    }),
  },
  // node variable: place copied from a neighbouring consonant (assimilation)
  {
    weight: 1,
    arbitrary: fc.tuple(fc.constantFrom("left", "right"), fc.constantFrom(...CONSONANTS)).map(([side, c]): Core => {
      const binder = bundle([value("syllabic", "-"), variable("place", "alpha")]);
      return { target: [{ kind: "segment", symbol: c, span: SPAN }], change: [{ kind: "bundle", specs: [variable("place", "alpha")], span: SPAN }], bindLeft: side === "left" ? [binder] : [], bindRight: side === "right" ? [binder] : [] };
    }),
  },
);

const arbRule = (index: number): fc.Arbitrary<Rule> =>
  fc
    .record({
      core: arbCore,
      mode: fc.constantFrom<ApplicationMode>("simultaneous", "left-to-right", "right-to-left"),
      optional: fc.boolean(),
      prefer: fc.constantFrom<"applied" | "unapplied">("applied", "unapplied"),
      envCount: fc.integer({ min: 0, max: 2 }),
      unlessCount: fc.constantFrom(0, 0, 0, 0, 1),
      longestFirst: fc.constantFrom(false, false, false, true),
    })
    .chain(({ core, mode, optional, prefer, envCount, unlessCount, longestFirst }) => {
      const vowelTarget = core.target.length === 1 && core.target[0]?.kind === "class" && core.target[0].name === "V";
      // The checker rejects stress conditions on a target that can be a nucleus (the stress is
      // then written in the target itself), so they are dropped for such targets.
      const nucleusTarget = core.target.some(canBeNucleus);
      return fc.tuple(fc.array(arbEnv(vowelTarget), { minLength: envCount, maxLength: envCount }), fc.array(arbEnv(vowelTarget), { minLength: unlessCount, maxLength: unlessCount })).map(([written, unlessWritten]): Rule => {
        const envs = nucleusTarget
          ? written.map((e): Environment => ({ ...e, conditions: e.conditions.filter((c) => !STRESS_CONDITIONS.includes(c.condition)) }))
          : written;
        // Variables must be bound in every environment: the binder goes next to the target in each.
        const bound = (core.bindLeft.length > 0 || core.bindRight.length > 0) && envs.length === 0 ? [{ left: seqOf([]), right: seqOf([]), conditions: [], span: SPAN }] : envs;
        const environments = bound.map((e): Environment => ({
          ...e,
          left: seqOf([...itemsOf(e.left), ...core.bindLeft.map(pat)]),
          right: seqOf([...core.bindRight.map(pat), ...itemsOf(e.right)]),
        }));
        const unless = nucleusTarget
          ? unlessWritten.map((e): Environment => ({ ...e, conditions: e.conditions.filter((c) => !STRESS_CONDITIONS.includes(c.condition)) }))
          : unlessWritten;
        return {
          kind: "rule", name: `r${index + 1}`, span: SPAN, optional, mode, prefer: optional ? prefer : "applied",
          target: core.target, change: core.change, environments,
          ...(unless.length > 0 ? { unless } : {}),
          ...(longestFirst ? { expansion: "longest-first" as const } : {}),
        };
      });
    });

const STRESS_CONDITIONS: readonly ProsodicCondition[] = ["stressed", "unstressed", "primary"];

/** Whether a target element can match a vowel of the tiny inventory (variables match anything). */
function canBeNucleus(e: Element): boolean {
  switch (e.kind) {
    case "segment": return (VOWELS as readonly string[]).includes(e.symbol);
    case "class": return e.name === "V";
    case "boundary": return false;
    case "bundle":
      return tinyInventory.segments.some((seg) =>
        seg.bundle[0] === "+" &&
        e.specs.every((sp) => sp.kind === "variable" || seg.bundle[tinyInventory.featureIndex.get(sp.feature) ?? -1] === sp.value));
  }
}

const seqOf = (items: Pattern[]): Pattern => ({ kind: "sequence", items, span: SPAN });
const itemsOf = (p: Pattern): Pattern[] => (p.kind === "sequence" ? [...p.items] : [p]);

export interface ArbGrammar {
  readonly grammar: Grammar;
  /** The same grammar as `.strata` text (without an `inventory` line: use the tiny inventory). */
  readonly text: string;
}

export interface ArbGrammarOptions {
  /** Most rules (default 3). */
  readonly maxRules?: number;
  /** Allow `syllabify` and `stress` steps (default true). */
  readonly prosody?: boolean;
}

/**
 * Random small grammars over the tiny inventory: bundles, segments, classes, `#` and `$`,
 * optional parts, choices, repetition, several environments, alpha and node variables,
 * insertion, deletion, two-segment targets, the three modes, optional rules, `where`
 * conditions, and optionally `syllabify` / `stress` steps placed among the rules.
 */
export function arbGrammar(opts: ArbGrammarOptions = {}): fc.Arbitrary<ArbGrammar> {
  const maxRules = opts.maxRules ?? 3;
  const prosody = opts.prosody ?? true;
  return fc
    .record({
      rules: fc.integer({ min: 1, max: maxRules }).chain((n) => fc.tuple(...Array.from({ length: n }, (_, i) => arbRule(i)))),
      syllabifyAt: prosody ? fc.option(fc.nat({ max: maxRules }), { nil: null }) : fc.constant(null),
      stress: prosody ? fc.option(fc.record({ edge: fc.constantFrom<"left" | "right">("left", "right"), position: fc.integer({ min: 1, max: 3 }), otherwise: fc.option(fc.integer({ min: 1, max: 3 }), { nil: null }) }), { nil: null }) : fc.constant(null),
    })
    .map(({ rules, syllabifyAt, stress }): ArbGrammar => {
      const steps: Step[] = [...rules];
      if (syllabifyAt !== null) {
        const at = Math.min(syllabifyAt, steps.length);
        steps.splice(at, 0, { kind: "syllabify", name: "syllabify", span: SPAN });
        if (stress !== null) steps.splice(at + 1, 0, { kind: "stress", name: "stress", span: SPAN, ...stress });
      }
      const grammar: Grammar = {
        file: "arb.strata", inventory: null, diacritics: null, nodes: ARB_NODES, classes: ARB_CLASSES,
        onsets: syllabifyAt !== null ? ARB_ONSETS : null, codas: syllabifyAt !== null ? ARB_CODAS : null,
        heavy: ARB_HEAVY, steps, files: ["arb.strata"],
      };
      return { grammar, text: grammarText(grammar) };
    });
}

/** The tiny inventory the generated grammars are written over. */
export const arbInventory: Inventory = tinyInventory;

export interface ArbWordOptions {
  /** Most segments per word (default 6). */
  readonly maxLength?: number;
  /** Sometimes put `.` between segments (default false: words as the lexicon reader gives them). */
  readonly dots?: boolean;
  /** Sometimes make a two-word phrase (default true). */
  readonly phrases?: boolean;
  /**
   * Change one segmental feature (not `syllabic`) of one segment, as a diacritic would: a
   * segment the inventory does not list and no rule may make (default false).
   */
  readonly unseen?: boolean;
}

/**
 * Random `#`-bracketed words over an inventory's segments, following the lexicon reader's
 * stress convention: either every nucleus [0stress 0primary], or one [+stress +primary], maybe one
 * [+stress -primary], the rest [-stress -primary]. Consonants are always [0stress 0primary].
 */
export function arbWord(inv: Inventory = tinyInventory, opts: ArbWordOptions = {}): fc.Arbitrary<Sym[]> {
  const max = opts.maxLength ?? 6;
  const syl = inv.featureIndex.get("syllabic");
  const si = inv.featureIndex.get("stress");
  const pi = inv.featureIndex.get("primary");
  const arbPiece = fc.array(fc.nat({ max: inv.segments.length - 1 }), { minLength: 1, maxLength: max });
  return fc
    .record({
      words: opts.phrases === false ? arbPiece.map((w) => [w]) : fc.array(arbPiece, { minLength: 1, maxLength: 2 }),
      marked: fc.boolean(),
      primaryPick: fc.nat(),
      secondaryPick: fc.option(fc.nat(), { nil: null }),
      dotSeed: opts.dots === true ? fc.array(fc.boolean(), { minLength: 2 * max + 2, maxLength: 2 * max + 2 }) : fc.constant([] as boolean[]),
      flip: opts.unseen === true ? fc.tuple(fc.nat({ max: 2 * max }), fc.nat({ max: inv.features.length - 1 })) : fc.constant(null),
    })
    .map(({ words, marked, primaryPick, secondaryPick, dotSeed, flip }) => {
      const flat = words.flat();
      const nuclei = flat.map((s, i) => ((inv.segments[s]?.bundle[syl ?? -1] ?? "-") === "+" ? i : -1)).filter((i) => i >= 0);
      const primary = marked && nuclei.length > 0 ? nuclei[primaryPick % nuclei.length] : undefined;
      const secondary = marked && secondaryPick !== null && nuclei.length > 1 ? nuclei[secondaryPick % nuclei.length] : undefined;
      const out: Sym[] = [WORD_EDGE];
      let k = 0;
      words.forEach((w, wi) => {
        if (wi > 0) out.push(WORD_EDGE);
        w.forEach((s, j) => {
          if (j > 0 && dotSeed[k % Math.max(1, dotSeed.length)] === true) out.push(SYLLABLE_EDGE);
          const b = [...(inv.segments[s]?.bundle ?? [])] as FeatureValue[];
          const nucleus = syl !== undefined && b[syl] === "+";
          if (si !== undefined && pi !== undefined) {
            if (!nucleus || !marked) [b[si], b[pi]] = ["0", "0"];
            else if (k === primary) [b[si], b[pi]] = ["+", "+"];
            else if (k === secondary) [b[si], b[pi]] = ["+", "-"];
            else [b[si], b[pi]] = ["-", "-"];
          }
          // The chosen segment gets the chosen feature flipped (+ ↔ -), unless it is syllabic or prosodic.
          const f = flip !== null && flip[0] % Math.max(1, flat.length) === k ? flip[1] : -1;
          if (f >= 0 && f !== syl && f !== si && f !== pi && (b[f] === "+" || b[f] === "-")) b[f] = b[f] === "+" ? "-" : "+";
          out.push({ kind: "segment", bundle: b });
          k++;
        });
      });
      out.push(WORD_EDGE);
      return out;
    });
}

// ---- grammar text (DEVELOPERS.md, "The grammar language") ----

const GREEK: Record<string, string> = { alpha: "α", beta: "β", gamma: "γ", delta: "δ" };

function specText(s: FeatureSpec): string {
  if (s.kind === "value") return `${s.value}${s.feature}`;
  const g = GREEK[s.variable] ?? `${s.variable} `;
  return `${s.negated ? "-" : ""}${g}${s.feature}`;
}

function elementText(e: Element): string {
  switch (e.kind) {
    case "bundle": return `[${e.specs.map(specText).join(" ")}]`;
    case "segment": return e.symbol;
    case "class": return e.name;
    case "boundary": return e.which === "word" ? "#" : "$";
  }
}

const SUB = "₀₁₂₃₄₅₆₇₈₉";
const SUP = "⁰¹²³⁴⁵⁶⁷⁸⁹";

function patternText(p: Pattern): string {
  switch (p.kind) {
    case "element": return elementText(p.element);
    case "sequence": return p.items.map(patternText).join(" ");
    case "optional": return `( ${patternText(p.body)} )`;
    case "choice": return `{ ${p.options.map(patternText).join(" | ")} }`;
    case "repeat": {
      const body = p.body.kind === "element" ? patternText(p.body) : `( ${patternText(p.body)} )`;
      return `${body}${SUB[p.min] ?? ""}${p.max !== null ? SUP[p.max] ?? "" : ""}`;
    }
  }
}

function changeText(c: ChangeElement): string {
  return c.kind === "bundle" ? `[${c.specs.map(specText).join(" ")}]` : c.symbol;
}

function ruleText(r: Rule): string {
  const head = [`rule ${r.name}`, r.optional ? "optional" : "", r.mode, r.optional ? `prefer ${r.prefer}` : "", r.expansion === "longest-first" ? "longest-first" : ""].filter((x) => x !== "").join(" ");
  const target = r.target.length === 0 ? "∅" : r.target.map(elementText).join(" ");
  const change = r.change.length === 0 ? "∅" : r.change.map(changeText).join(" ");
  const envText = (intro: string, e: Environment): string => {
    const where = e.conditions.length > 0 ? ` where ${e.conditions.map((c) => c.condition).join(", ")}` : "";
    const mirror = e.mirrored === true ? " mirrored" : "";
    return `\n    ${intro} ${patternText(e.left)} _ ${patternText(e.right)}${mirror}${where}`.replace(/ +/g, " ").replace(/^\n /, "\n    ");
  };
  const envs = [...r.environments.map((e) => envText("/", e)), ...(r.unless ?? []).map((e) => envText("unless", e))];
  return `${head}:\n  ${target} -> ${change}${envs.join("")}\n`;
}

/** A grammar as `.strata` text, following DEVELOPERS.md's syntax. */
export function grammarText(g: Grammar): string {
  const lines: string[] = ["-- generated by tests/support/arb-grammar.ts"];
  for (const n of g.nodes) lines.push(`node ${n.name} = ${n.features.join(" ")}`);
  for (const c of g.classes) lines.push(`class ${c.name} = ${c.members.map(elementText).join(" ")}`);
  if (g.onsets !== null) lines.push(`onsets = ${g.onsets.map((c) => c.segments.join("")).join(" ")}`);
  if (g.codas !== null) lines.push(`codas = ${g.codas.map((c) => c.segments.join("")).join(" ")}`);
  if (g.heavy.length > 0) lines.push(`heavy = ${g.heavy.map(patternText).join(" | ")}`);
  lines.push("");
  for (const s of g.steps) {
    if (s.kind === "rule") lines.push(ruleText(s));
    else if (s.kind === "syllabify") lines.push("syllabify\n");
    else lines.push(`stress from ${s.edge} ${s.position}${s.otherwise !== null ? ` if heavy else ${s.otherwise}` : ""}\n`);
  }
  return lines.join("\n");
}

export { VOWELS as ARB_VOWELS, CONSONANTS as ARB_CONSONANTS };
