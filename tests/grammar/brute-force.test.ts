// The front end the interpreter and the compiler share — `where` desugaring, `mirrored`, `unless`
// and `longest-first` written out, segment and class resolution, `( )`, `{ | }` and subscripts —
// against a plain reading of the semantics in DEVELOPERS.md: every string over a small alphabet up
// to four symbols is checked with a backtracking matcher written here from the definitions (it
// shares no code with src/), and the rule's sites must be exactly the ones the interpreter and the
// compiled machine find. The rules delete their target (simultaneous, obligatory), so the output
// shows every site.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { SPAN, classDef, bun, grammar, nodeDef } from "../support/ast.js";
import type { Element, Environment, Pattern, ProsodicCondition, Rule } from "../../src/grammar/ast.js";
import { desugar, isBoundaryBlind } from "../../src/grammar/index.js";
import { applyRuleDetailed, ruleContext, wordKey, WORD_EDGE, SYLLABLE_EDGE, type Sym } from "../../src/interp/index.js";
import { compileGrammar } from "../../src/compile/index.js";
import { StrataError } from "../../src/diagnostics.js";
import type { Bundle, FeatureValue } from "../../src/inventory/types.js";

const FEATURES = ["syllabic", "voice", "nasal", "labial", "coronal"] as const;
const F = (name: string): number => inv.featureIndex.get(name)!;
const CLASSES = [
  classDef("C", [bun("-syllabic")]),
  classDef("V", [bun("+syllabic")]),
  classDef("Stop", ["p", "t", "k"].map((symbol): Element => ({ kind: "segment", symbol, span: SPAN }))),
];
const G = grammar([], { classes: CLASSES, nodes: [nodeDef("place", ["labial", "coronal"])] });

// ---- the plain reading ------------------------------------------------------------------------

const segmentBundle = (symbol: string): Bundle => inv.segments.find((s) => s.symbol === symbol)!.bundle;
const isSeg = (s: Sym): s is Extract<Sym, { kind: "segment" }> => s.kind === "segment";
const isWordEdge = (s: Sym | undefined): boolean => s !== undefined && s.kind === "boundary" && s.which === "word";
const isDot = (s: Sym | undefined): boolean => s !== undefined && s.kind === "boundary" && s.which === "syllable";
const vowel = (s: Sym | undefined): boolean => s !== undefined && isSeg(s) && s.bundle[F("syllabic")] === "+";
const consonant = (s: Sym | undefined): boolean => s !== undefined && isSeg(s) && s.bundle[F("syllabic")] === "-";

/** Does element `e` match symbol `s`? Bundles compare the values they name; a literal segment its non-prosodic features; `$` is `.` or `#`. */
function elementMatches(e: Element, s: Sym): boolean {
  switch (e.kind) {
    case "boundary":
      return e.which === "word" ? isWordEdge(s) : isWordEdge(s) || isDot(s);
    case "bundle":
      return isSeg(s) && e.specs.every((sp) => sp.kind === "value" && s.bundle[F(sp.feature)] === sp.value);
    case "segment": {
      if (!isSeg(s)) return false;
      const b = segmentBundle(e.symbol);
      return FEATURES.every((f) => s.bundle[F(f)] === b[F(f)]);
    }
    case "class":
      return CLASSES.find((c) => c.name === e.name)!.members.some((m) => elementMatches(m, s));
  }
}

/** The positions where a match of `p` starting at `from` in `w` can end. */
function ends(p: Pattern, w: readonly Sym[], from: number): Set<number> {
  switch (p.kind) {
    case "element":
      return from < w.length && elementMatches(p.element, w[from]!) ? new Set([from + 1]) : new Set();
    case "sequence": {
      let cur = new Set([from]);
      for (const item of p.items) cur = new Set([...cur].flatMap((q) => [...ends(item, w, q)]));
      return cur;
    }
    case "optional":
      return new Set([from, ...ends(p.body, w, from)]);
    case "choice":
      return new Set(p.options.flatMap((o) => [...ends(o, w, from)]));
    case "repeat": {
      const out = new Set<number>();
      let cur = new Set([from]);
      for (let k = 0; cur.size > 0 && (p.max === null || k <= p.max); k++) {
        if (k >= p.min) for (const q of cur) out.add(q);
        cur = new Set([...cur].flatMap((q) => [...ends(p.body, w, q)]));
      }
      return out;
    }
  }
}

/** The written sides at target position t of view v: the left side matches a suffix of v[0..t), the right side a prefix of v[t+1..). */
const sidesHold = (e: Environment, v: readonly Sym[], t: number): boolean => {
  let left = false;
  for (let j = 0; j <= t && !left; j++) left = ends(e.left, v, j).has(t);
  return left && ends(e.right, v.slice(0, v.length), t + 1).size > 0;
};

/** Scans from t in direction d over consonants; the first other symbol. */
function pastConsonants(w: readonly Sym[], t: number, d: 1 | -1): Sym | undefined {
  let k = t + d;
  while (consonant(w[k])) k += d;
  return w[k];
}

/** A condition read directly from its definition (DEVELOPERS.md, "Prosodic shorthands"), target at t of the full string. */
function conditionHolds(c: ProsodicCondition, w: readonly Sym[], t: number): boolean {
  const syllableNucleus = (ok: (b: Bundle) => boolean): boolean =>
    [pastConsonants(w, t, 1), pastConsonants(w, t, -1)].some((s) => vowel(s) && ok((s as Extract<Sym, { kind: "segment" }>).bundle));
  switch (c) {
    case "syllable-initial": return isWordEdge(w[t - 1]) || isDot(w[t - 1]);
    case "syllable-final": return isWordEdge(w[t + 1]) || isDot(w[t + 1]);
    case "word-initial": return isWordEdge(w[t - 1]);
    case "word-final": return isWordEdge(w[t + 1]);
    case "onset": return vowel(pastConsonants(w, t, 1));
    case "coda": return vowel(pastConsonants(w, t, -1));
    case "nucleus": return true;
    case "stressed": return syllableNucleus((b) => b[F("stress")] === "+");
    case "unstressed": return syllableNucleus((b) => b[F("stress")] === "-");
    case "primary": return syllableNucleus((b) => b[F("primary")] === "+");
  }
}

/** Holds at t: the written sides (or, mirrored, the sides read on the reversed string), and every condition on the full string. */
function environmentHolds(e: Environment, v: readonly Sym[], t: number, full: readonly Sym[], tf: number): boolean {
  const sides = sidesHold(e, v, t) || (e.mirrored === true && sidesHold(e, [...v].reverse(), v.length - 1 - t));
  return sides && e.conditions.every((c) => conditionHolds(c.condition, full, tf));
}

const mentionsDollar = (p: Pattern): boolean => {
  switch (p.kind) {
    case "element": return p.element.kind === "boundary" && p.element.which === "syllable";
    case "sequence": return p.items.some(mentionsDollar);
    case "optional": case "repeat": return mentionsDollar(p.body);
    case "choice": return p.options.some(mentionsDollar);
  }
};

/** The output of the deletion rule by the plain reading: every target position where an environment holds and no `unless` does is removed. */
function plainOutput(r: Rule, w: readonly Sym[]): Sym[] {
  const envs = [...r.environments, ...(r.unless ?? [])];
  const blind = !envs.some((e) => mentionsDollar(e.left) || mentionsDollar(e.right) || e.conditions.length > 0);
  // A boundary-blind rule does not see '.': it matches on the string without them.
  const viewIndex = w.flatMap((s, i) => (blind && isDot(s) ? [] : [i]));
  const v = viewIndex.map((i) => w[i]!);
  const deleted = new Set<number>();
  v.forEach((s, t) => {
    if (!elementMatches(r.target[0]!, s) || !isSeg(s)) return;
    const tf = viewIndex[t]!;
    const some = r.environments.length === 0 || r.environments.some((e) => environmentHolds(e, v, t, w, tf));
    const except = (r.unless ?? []).some((e) => environmentHolds(e, v, t, w, tf));
    if (some && !except) deleted.add(tf);
  });
  return w.filter((_, i) => !deleted.has(i));
}

// ---- the words ----------------------------------------------------------------------------------

const withProsody = (symbol: string, stress: FeatureValue, primary: FeatureValue): Sym => {
  const b = [...segmentBundle(symbol)];
  b[F("stress")] = stress;
  b[F("primary")] = primary;
  return { kind: "segment", bundle: b };
};
/** t n b, a primary, a unstressed, i secondary, '.', and '#' between the words of a phrase. */
const LETTERS: readonly Sym[] = [
  withProsody("t", "0", "0"), withProsody("n", "0", "0"), withProsody("b", "0", "0"),
  withProsody("a", "+", "+"), withProsody("a", "-", "-"), withProsody("i", "+", "-"), SYLLABLE_EDGE, WORD_EDGE,
];
const MAX_LEN = 4;
/** Every string of 1 … MAX_LEN letters between '#'s, with no boundary at either end and no two boundaries in a row. */
const WORDS: Sym[][] = (() => {
  const out: Sym[][] = [];
  let layer: Sym[][] = [[]];
  for (let n = 1; n <= MAX_LEN; n++) {
    layer = layer.flatMap((w) => LETTERS.map((s) => [...w, s]));
    for (const w of layer) {
      const full = [WORD_EDGE, ...w, WORD_EDGE];
      if (full.every((s, i) => i === 0 || s.kind !== "boundary" || full[i - 1]!.kind !== "boundary")) out.push(full);
    }
  }
  return out;
})();

// ---- random rules -------------------------------------------------------------------------------

const value = (feature: string, v: FeatureValue) => ({ kind: "value" as const, feature, value: v, span: SPAN });
const arbBundle = (features: readonly string[]): fc.Arbitrary<Element> =>
  fc.uniqueArray(fc.tuple(fc.constantFrom(...features), fc.constantFrom<FeatureValue>("+", "-")), { minLength: 1, maxLength: 2, selector: (s) => s[0] })
    .map((specs): Element => ({ kind: "bundle", specs: specs.map(([f, v]) => value(f, v)), span: SPAN }));
const arbSegment = fc.constantFrom("p", "t", "k", "b", "d", "n", "a", "i").map((symbol): Element => ({ kind: "segment", symbol, span: SPAN }));
const arbClass = fc.constantFrom("C", "V", "Stop").map((name): Element => ({ kind: "class", name, span: SPAN }));
const arbTarget: fc.Arbitrary<Element> = fc.oneof(arbBundle(FEATURES), arbSegment, arbClass);
const arbContextElement: fc.Arbitrary<Element> = fc.oneof(
  { weight: 2, arbitrary: arbBundle([...FEATURES, "stress", "primary"]) },
  { weight: 2, arbitrary: arbSegment },
  { weight: 2, arbitrary: arbClass },
  { weight: 2, arbitrary: fc.constantFrom<Element>({ kind: "boundary", which: "word", span: SPAN }, { kind: "boundary", which: "syllable", span: SPAN }) },
);
const el = (e: Element): Pattern => ({ kind: "element", element: e });
const arbItem: fc.Arbitrary<Pattern> = fc.oneof(
  { weight: 4, arbitrary: arbContextElement.map(el) },
  { weight: 1, arbitrary: fc.array(arbContextElement, { minLength: 1, maxLength: 2 }).map((es): Pattern => ({ kind: "optional", body: { kind: "sequence", items: es.map(el), span: SPAN }, span: SPAN })) },
  { weight: 1, arbitrary: fc.tuple(arbContextElement, arbContextElement).map(([a, b]): Pattern => ({ kind: "choice", options: [el(a), el(b)], span: SPAN })) },
  {
    weight: 2,
    arbitrary: fc.tuple(fc.oneof(arbSegment, arbClass, arbBundle(FEATURES)), fc.constantFrom<[number, number | null]>([0, null], [1, null], [0, 1], [0, 2], [1, 2], [2, 3]))
      .map(([e, [min, max]]): Pattern => ({ kind: "repeat", body: el(e), min, max, span: SPAN })),
  },
);
const arbSide = fc.array(arbItem, { maxLength: 2 }).map((items): Pattern => ({ kind: "sequence", items, span: SPAN }));
const CONDITIONS: readonly ProsodicCondition[] = ["onset", "coda", "syllable-initial", "syllable-final", "word-initial", "word-final", "stressed", "unstressed", "primary", "nucleus"];
const arbEnv: fc.Arbitrary<Environment> = fc.record({
  left: arbSide, right: arbSide,
  conditions: fc.oneof({ weight: 2, arbitrary: fc.constant<ProsodicCondition[]>([]) }, { weight: 1, arbitrary: fc.uniqueArray(fc.constantFrom(...CONDITIONS), { minLength: 1, maxLength: 2 }) }),
  mirrored: fc.constantFrom(false, false, true),
}).map(({ left, right, conditions, mirrored }): Environment => ({
  left, right, conditions: conditions.map((condition) => ({ condition, span: SPAN })), span: SPAN, ...(mirrored ? { mirrored } : {}),
}));
const arbRule: fc.Arbitrary<Rule> = fc.record({
  target: arbTarget,
  environments: fc.array(arbEnv, { maxLength: 2 }),
  unless: fc.oneof({ weight: 3, arbitrary: fc.constant<Environment[]>([]) }, { weight: 1, arbitrary: fc.array(arbEnv, { minLength: 1, maxLength: 1 }) }),
  longest: fc.constantFrom(false, false, false, true),
}).map(({ target, environments, unless, longest }): Rule => ({
  kind: "rule", name: "r", span: SPAN, optional: false, mode: "simultaneous", prefer: "applied",
  target: [target], change: [], environments,
  ...(unless.length > 0 ? { unless } : {}),
  ...(longest ? { expansion: "longest-first" as const } : {}),
}));

/** The interpreter's output, or null when it refuses the rule (a condition the checker would reject for this target). */
function interpreted(r: Rule): ((w: Sym[]) => Sym[]) | null {
  const d = desugar(r, { inventory: inv, classes: G.classes, nodes: G.nodes });
  const ctx = { ...ruleContext(G, inv, d), boundaryBlind: isBoundaryBlind(d) };
  try {
    applyRuleDetailed(d, ctx, WORDS[0]!);
  } catch (e) {
    if (e instanceof StrataError) return null;
    throw e;
  }
  return (w) => {
    const out = applyRuleDetailed(d, ctx, w).outputs;
    expect(out).toHaveLength(1);
    return out[0]!;
  };
}

describe("the shared front end against a plain reading, every string up to four symbols", () => {
  it(`has ${WORDS.length} strings to try`, () => {
    expect(WORDS.length).toBeGreaterThan(1000);
  });

  it("random deletion rules: the sites of the interpreter and of the compiled machine are the plain reading's", () => {
    let tried = 0;
    fc.assert(
      fc.property(arbRule, (r) => {
        const interp = interpreted(r);
        fc.pre(interp !== null);
        tried++;
        const g = { ...G, steps: [r] };
        const compiled = compileGrammar(g, inv);
        expect(compiled.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
        const c = compiled.compiled!;
        for (const w of WORDS) {
          const want = wordKey(plainOutput(r, w));
          expect(wordKey(interp!(w)), `interpreter on ${wordKey(w)}`).toBe(want);
          const ids = c.encode(w)!;
          const got = c.variants(ids, 4).outputs.map((o) => wordKey(c.decode(o)));
          expect(got, `machine on ${wordKey(w)}`).toEqual([want]);
        }
      }),
      { numRuns: 30 },
    );
    expect(tried).toBeGreaterThan(0);
  });
});
