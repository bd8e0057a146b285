// Random small rules and words over the tiny fixture inventory, for the differential tests of the
// compiler against the reference interpreter (fast-check arbitraries).

import fc from "fast-check";
import type { ChangeElement, Element, Environment, JoinMode, Pattern, Rule } from "../../src/grammar/ast.js";
import type { FeatureValue } from "../../src/inventory/types.js";
import type { Sym } from "../../src/interp/index.js";
import { JOIN_EDGE, SYLLABLE_EDGE, WORD_EDGE } from "../../src/interp/index.js";
import { SPAN, bun, cls, seg, WB, SB, pat } from "../support/ast.js";
import { tinyBundle } from "../support/tiny-inventory.js";

const SEGMENTS = ["p", "t", "k", "b", "d", "n", "a", "i"] as const;
const VOWELS = new Set(["a", "i"]);
const FEATURES = ["syllabic", "voice", "nasal", "labial", "coronal"] as const;

const sign = fc.constantFrom<"+" | "-">("+", "-");

/** A feature bundle element with 1–2 specs, sometimes an alpha variable (α on a feature, or on the place node). */
const bundleEl = (vars: boolean): fc.Arbitrary<Element> =>
  fc.array(
    fc.oneof(
      { weight: 4, arbitrary: fc.tuple(sign, fc.constantFrom(...FEATURES)).map(([s, f]) => `${s}${f}`) },
      { weight: vars ? 1 : 0, arbitrary: fc.tuple(fc.constantFrom("", "-"), fc.constantFrom("voice", "nasal", "place")).map(([s, f]) => `${s}α${f}`) },
      { weight: 1, arbitrary: fc.constantFrom("+stress", "-stress", "0stress") },
    ),
    { minLength: 1, maxLength: 2 },
  ).map((specs) => bun([...new Set(specs)].join(" ")));

const segEl: fc.Arbitrary<Element> = fc.constantFrom(...SEGMENTS).map(seg);

/** The morpheme join `+` in a pattern: a rule naming it sees every join. */
const JB: Element = { kind: "boundary", which: "join", span: SPAN };

const element = (vars: boolean, boundaries: boolean): fc.Arbitrary<Element> =>
  fc.oneof(
    { weight: 4, arbitrary: bundleEl(vars) },
    { weight: 2, arbitrary: segEl },
    { weight: 1, arbitrary: fc.constant(cls("V")) },
    { weight: boundaries ? 1 : 0, arbitrary: fc.constant(WB) },
    { weight: boundaries ? 1 : 0, arbitrary: fc.constant(SB) },
    { weight: boundaries ? 1 : 0, arbitrary: fc.constant(JB) },
  );

const pattern = (vars: boolean): fc.Arbitrary<Pattern> =>
  fc.array(
    fc.oneof(
      { weight: 5, arbitrary: element(vars, true).map(pat) },
      { weight: 1, arbitrary: element(false, false).map((e): Pattern => ({ kind: "optional", body: pat(e), span: SPAN })) },
      { weight: 1, arbitrary: fc.tuple(element(false, true), element(false, true)).map(([a, b]): Pattern => ({ kind: "choice", options: [pat(a), pat(b)], span: SPAN })) },
      { weight: 1, arbitrary: fc.tuple(element(false, false), fc.constantFrom(0, 1)).map(([e, min]): Pattern => ({ kind: "repeat", body: pat(e), min, max: null, span: SPAN })) },
    ),
    { maxLength: 2 },
  ).map((items): Pattern => ({ kind: "sequence", items, span: SPAN }));

const environment: fc.Arbitrary<Environment> = fc
  .tuple(pattern(true), pattern(true), fc.subarray(["syllable-initial", "coda", "stressed", "word-final"] as const, { maxLength: 1 }), fc.constantFrom(false, false, false, true))
  .map(([left, right, conds, mirrored]) => ({ left, right, conditions: conds.map((condition) => ({ condition, span: SPAN })), span: SPAN, ...(mirrored ? { mirrored } : {}) }));

const changeFor = (vars: boolean): fc.Arbitrary<ChangeElement> =>
  fc.oneof(
    { weight: 3, arbitrary: fc.tuple(sign, fc.constantFrom("voice", "nasal", "labial", "coronal")).map(([s, f]): ChangeElement => ({ kind: "bundle", specs: bun(`${s}${f}`).kind === "bundle" ? (bun(`${s}${f}`) as Extract<Element, { kind: "bundle" }>).specs : [], span: SPAN })) },
    { weight: vars ? 1 : 0, arbitrary: fc.constantFrom("αvoice", "-αvoice", "αplace").map((t): ChangeElement => ({ kind: "bundle", specs: (bun(t) as Extract<Element, { kind: "bundle" }>).specs, span: SPAN })) },
    { weight: 1, arbitrary: fc.constantFrom("t", "d", "n").map((s): ChangeElement => ({ kind: "segment", symbol: s, span: SPAN })) },
  );

/** A random rule: feature change, literal change, deletion or insertion; 0–2 environments; any mode. */
const plainRuleArb: fc.Arbitrary<Rule> = fc
  .record({
    kind: fc.constantFrom("change", "change", "change", "delete", "insert"),
    n: fc.constantFrom(1, 1, 1, 2),
    targetEls: fc.array(element(true, false), { minLength: 2, maxLength: 2 }),
    changes: fc.array(changeFor(true), { minLength: 2, maxLength: 2 }),
    insertSeg: fc.constantFrom("t", "a", "n"),
    envs: fc.array(environment, { maxLength: 2 }),
    unless: fc.oneof({ weight: 4, arbitrary: fc.constant([] as Environment[]) }, { weight: 1, arbitrary: fc.array(environment, { minLength: 1, maxLength: 1 }) }),
    longestFirst: fc.constantFrom(false, false, false, true),
    optional: fc.boolean(),
    mode: fc.constantFrom("simultaneous", "left-to-right", "right-to-left") as fc.Arbitrary<Rule["mode"]>,
    prefer: fc.constantFrom("applied", "unapplied") as fc.Arbitrary<Rule["prefer"]>,
  })
  .map((r): Rule => {
    const target = r.kind === "insert" ? [] : r.targetEls.slice(0, r.n);
    const change = r.kind === "insert" ? [{ kind: "segment", symbol: r.insertSeg, span: SPAN } as ChangeElement] : r.kind === "delete" ? [] : r.changes.slice(0, r.n);
    return {
      kind: "rule", name: "random", span: SPAN, optional: r.optional, mode: r.mode, prefer: r.prefer,
      target, change, environments: r.envs,
      ...(r.unless.length > 0 ? { unless: r.unless } : {}),
      ...(r.longestFirst ? { expansion: "longest-first" as const } : {}),
    };
  });

const segSym = (s: string, stress: FeatureValue, primary: FeatureValue): Sym => ({ kind: "segment", bundle: tinyBundle(s, stress, primary) });

/** A random word: 0–7 segments with '.' and '+' between some, bracketed by '#', sometimes two words (any order of boundaries: rules may leave joins anywhere). */
export const wordArb: fc.Arbitrary<Sym[]> = fc
  .array(
    fc.oneof(
      { weight: 18, arbitrary: fc.tuple(fc.constantFrom(...SEGMENTS), fc.constantFrom<[FeatureValue, FeatureValue]>(["+", "+"], ["+", "-"], ["-", "-"], ["0", "0"])).map(([s, [a, b]]) => (VOWELS.has(s) ? segSym(s, a, b) : segSym(s, "0", "0"))) },
      { weight: 3, arbitrary: fc.constant(SYLLABLE_EDGE) },
      { weight: 3, arbitrary: fc.constant(JOIN_EDGE) },
      { weight: 1, arbitrary: fc.constant(WORD_EDGE) },
    ),
    { maxLength: 7 },
  )
  .map((body) => [WORD_EDGE, ...body, WORD_EDGE]);

/** Random onset and coda lists over the tiny inventory's consonants (null: none declared). */
const CONS = ["p", "t", "k", "b", "d", "n"] as const;
const clusterArb = fc.array(fc.constantFrom(...CONS), { minLength: 1, maxLength: 3 }).map((c) => ({ segments: c, span: SPAN }));
export const clusterListArb = fc.option(fc.uniqueArray(clusterArb, { maxLength: 10, selector: (c) => c.segments.join("") }), { freq: 5 });

/** Random heavy patterns: a nucleus with a feature, or a nucleus followed by a consonant. */
export const heavyArb: fc.Arbitrary<Pattern[]> = fc.subarray([
  { kind: "sequence", items: [pat(bun("+syllabic +nasal"))], span: SPAN } as Pattern,
  { kind: "sequence", items: [pat(bun("+syllabic +coronal"))], span: SPAN } as Pattern,
  { kind: "sequence", items: [pat(bun("+syllabic")), pat(bun("-syllabic"))], span: SPAN } as Pattern,
]);

/** A random stress step. */
export const stressArb = fc.record({
  edge: fc.constantFrom<"left" | "right">("left", "right"),
  position: fc.integer({ min: 1, max: 3 }),
  otherwise: fc.option(fc.integer({ min: 1, max: 3 }), { freq: 2 }),
});

/** How syllabification treats `+` (the grammar's `joins` statement); `undefined` is the default (through). */
export const joinModeArb: fc.Arbitrary<JoinMode | undefined> = fc.constantFrom<JoinMode | undefined>(undefined, "through", "closed", "closed-before-consonant");

/** The `joins` field for a grammar: a closing mode needs an onsets list when codas are declared (grammar/joins-without-onsets). */
export const joinsField = (mode: JoinMode | undefined, onsets: unknown, codas: unknown): { joins?: JoinMode } =>
  mode === undefined || (mode !== "through" && onsets === null && codas !== null) ? {} : { joins: mode };

/**
 * An insertion beside a word boundary with an optional group next to the '#' (`(X) # _`, `# (X) _`,
 * `_ # (X)`, `_ (X) #`), usually `longest-first` and often `mirrored`: the longer expansion is then
 * an exception of the shorter one, and its right side may hold where no insertion site is (before
 * the first '#'). A compiled machine once inserted there (`∅ -> t / ([+syllabic]) # _ mirrored`,
 * longest-first, on `# a #`); the plain generator makes this shape too rarely to find it.
 */
const edgeInsertionArb: fc.Arbitrary<Rule> = fc
  .record({
    group: element(false, false),
    groupFirst: fc.boolean(),
    onLeft: fc.boolean(),
    other: fc.option(element(false, true), { freq: 3 }),
    mirrored: fc.constantFrom(false, true, true),
    longestFirst: fc.constantFrom(false, true, true, true),
    insertSeg: fc.constantFrom("t", "a", "n"),
    optional: fc.boolean(),
    mode: fc.constantFrom("simultaneous", "left-to-right", "right-to-left") as fc.Arbitrary<Rule["mode"]>,
    prefer: fc.constantFrom("applied", "unapplied") as fc.Arbitrary<Rule["prefer"]>,
  })
  .map((r): Rule => {
    const group: Pattern = { kind: "optional", body: pat(r.group), span: SPAN };
    const edge: Pattern[] = r.groupFirst ? [group, pat(WB)] : [pat(WB), group];
    const side: Pattern = { kind: "sequence", items: edge, span: SPAN };
    const other: Pattern = { kind: "sequence", items: r.other === null ? [] : [pat(r.other)], span: SPAN };
    const environment: Environment = { left: r.onLeft ? side : other, right: r.onLeft ? other : side, conditions: [], span: SPAN, ...(r.mirrored ? { mirrored: true } : {}) };
    return {
      kind: "rule", name: "random", span: SPAN, optional: r.optional, mode: r.mode, prefer: r.prefer,
      target: [], change: [{ kind: "segment", symbol: r.insertSeg, span: SPAN }], environments: [environment],
      ...(r.longestFirst ? { expansion: "longest-first" as const } : {}),
    };
  });

/** A random rule (see plainRuleArb), sometimes an insertion at a word edge (see edgeInsertionArb). */
export const ruleArb: fc.Arbitrary<Rule> = fc.oneof({ weight: 9, arbitrary: plainRuleArb }, { weight: 1, arbitrary: edgeInsertionArb });
