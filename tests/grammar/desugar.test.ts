// Desugaring tests: each shorthand's expansion, exact conjunction with written contexts (cases and
// a property test against a direct regular-expression reading), and boundary blindness.

import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { bundleOf, type Inventory } from "../../src/inventory/index.js";
import {
  desugar,
  isBoundaryBlind,
  parseGrammarText,
  type ClassDef,
  type Element,
  type Environment,
  type Pattern,
  type ProsodicCondition,
  type Rule,
  type Span,
} from "../../src/grammar/index.js";
import { rules, show, toyInventory } from "./helpers.js";

const ruleOf = (text: string): { rule: Rule; classes: readonly ClassDef[] } => {
  const { grammar, diagnostics } = parseGrammarText(text, "/t/g.strata");
  expect(diagnostics).toEqual([]);
  return { rule: rules(grammar)[0]!, classes: grammar.classes };
};
/** Desugars the last rule of `text` with the toy inventory; returns each environment as "left _ right". */
const expand = (text: string): string[] => {
  const { rule, classes } = ruleOf(text);
  const d = desugar(rule, { inventory: toyInventory(), classes });
  for (const e of d.environments) expect(e.conditions).toEqual([]);
  return d.environments.map((e) => `${show(e.left)} _ ${show(e.right)}`.trim());
};

const C0 = "[-syllabic]_0";
describe("each shorthand", () => {
  const cases: [string, string[]][] = [
    ["_ where syllable-initial", ["$ _"]],
    ["_ where syllable-final", ["_ $"]],
    ["_ where word-initial", ["# _"]],
    ["_ where word-final", ["_ #"]],
    ["_ where onset", [`_ ${C0} [+syllabic]`]],
    ["_ where coda", [`[+syllabic] ${C0} _`]],
    ["_ where stressed", [`_ ${C0} [+syllabic +stress]`, `[+syllabic +stress] ${C0} _`]],
    ["_ where unstressed", [`_ ${C0} [+syllabic -stress]`, `[+syllabic -stress] ${C0} _`]],
    ["_ where primary", [`_ ${C0} [+syllabic +primary]`, `[+syllabic +primary] ${C0} _`]],
    // conditions on one side conjoin
    ["_ where syllable-initial, word-initial", ["# _"]],
    [
      "_ where stressed, primary",
      [
        `_ ${C0} [+syllabic +stress +primary]`,
        `[+syllabic +primary] ${C0} _ ${C0} [+syllabic +stress]`,
        `[+syllabic +stress] ${C0} _ ${C0} [+syllabic +primary]`,
        `[+syllabic +stress +primary] ${C0} _`,
      ],
    ],
    ["_ where onset, stressed", [`_ ${C0} [+syllabic +stress]`, `[+syllabic +stress] ${C0} _ ${C0} [+syllabic]`]],
    ["_ where coda, stressed", [`[+syllabic] ${C0} _ ${C0} [+syllabic +stress]`, `[+syllabic +stress] ${C0} _`]],
    ["_ where syllable-initial, stressed", [`$ _ ${C0} [+syllabic +stress]`]],
    // contradictions leave an environment that never holds
    ["_ where onset, coda", [`[+syllabic] ${C0} _ ${C0} [+syllabic]`]],
    ["_ where stressed, unstressed", [`[+syllabic -stress] ${C0} _ ${C0} [+syllabic +stress]`, `[+syllabic +stress] ${C0} _ ${C0} [+syllabic -stress]`]],
    ["_ where word-final, onset", ["[+syllabic -syllabic] _"]],
    ["_ where syllable-initial, coda", ["[+syllabic -syllabic] _"]],
    // nucleus is a check on the target only
    ["_ where nucleus", ["_"]],
  ];
  test.each(cases)("t -> d / %s", (env, expected) => expect(expand(`rule r:\n  t -> d / ${env}`)).toEqual(expected));
});

describe("conjunction with the written context", () => {
  const cases: [string, string[]][] = [
    // a boundary merges with a written boundary; a segment is not a boundary
    ["# _ where syllable-initial", ["# _"]],
    ["$ _ where word-initial", ["# _"]],
    ["a _ where syllable-initial", ["[+syllabic -syllabic] _"]],
    ["a $ _ where syllable-initial", ["a $ _"]],
    ["_ s where syllable-final", ["[+syllabic -syllabic] _ s"]],
    // the written vowel is the nucleus coda asks for (ə is [+syllabic] in the inventory)
    ["s ə _ where coda", ["s ə _"]],
    // a written consonant lies between the nucleus and the target
    ["s _ where coda", [`[+syllabic] ${C0} s _`]],
    // bundles merge their specs
    ["[+voice] _ where coda", [`{[+voice +syllabic] | [+syllabic] ${C0} [+voice -syllabic]} _`]],
    // the written bundle is either the onset's nucleus itself or a consonant before it
    ["_ [+nasal] where onset", [`_ {[+nasal +syllabic] | [+nasal -syllabic] ${C0} [+syllabic]}`]],
    // a class is the choice of its members, each intersected: a is the nucleus, m n are consonants
    ["N _ where coda", [`{a | [+syllabic] ${C0} {m | n}} _`]],
    // optional written material: either absent (the material alone) or present and compatible
    ["(s) _ where coda", [`{[+syllabic] ${C0} | [+syllabic] ${C0} s} _`]],
    // a written stressed-syllable nucleus that is a literal becomes its full bundle plus the stress value
    ["a _ where stressed", [`a _ ${C0} [+syllabic +stress]`, "[+syllabic -consonantal +sonorant +continuant -nasal +voice -labial -coronal +dorsal -spread_glottis -long +stress] _"]],
  ];
  test.each(cases)("t -> d / %s", (env, expected) => {
    const text = `class N = m n a\nrule r:\n  t -> d / ${env}`;
    expect(expand(text)).toEqual(expected);
  });

  test("an unbounded repetition next to the target is solved exactly (Arden's lemma)", () => {
    // The nucleus is either i (and every [+sonorant] after it is a consonant) or one of the [+sonorant].
    expect(expand("rule r:\n  t -> d / i [+sonorant]₀ _ where coda")).toEqual([
      "{i | i [+sonorant]_0 [+sonorant +syllabic]} [+sonorant -syllabic]_0 _",
    ]);
  });

  test("without an inventory context, literals are kept as written", () => {
    const { rule } = ruleOf("rule r:\n  t -> d / s ə _ where coda");
    const d = desugar(rule);
    // ə is assumed to be both a possible nucleus and a possible consonant, s too.
    expect(show(d.environments[0]!.left)).toBe(`{s ə | {s | [+syllabic] ${C0} s} ə}`);
  });

  test("desugaring is idempotent and keeps spans inside the rule", () => {
    const { rule, classes } = ruleOf("rule r:\n  t -> d / s _ where coda, stressed");
    const ctx = { inventory: toyInventory(), classes };
    const once = desugar(rule, ctx);
    expect(desugar(once, ctx)).toEqual(once);
    const spans: Span[] = [];
    JSON.stringify(once.environments, (k, v) => (k === "span" ? (spans.push(v as Span), v) : v));
    expect(spans.length).toBeGreaterThan(5);
    for (const s of spans) expect(s.line).toBe(2);
  });
});

describe("boundary blindness", () => {
  const blind = (text: string) => {
    const { rule, classes } = ruleOf(text);
    const d = desugar(rule, { inventory: toyInventory(), classes });
    return [isBoundaryBlind(rule), isBoundaryBlind(d), d.boundaryBlind];
  };
  test("no boundary and no condition: blind", () => expect(blind("rule r:\n  t -> d / a _ a")).toEqual([true, true, true]));
  test("a word boundary keeps it blind", () => expect(blind("rule r:\n  t -> d / # _")).toEqual([true, true, true]));
  test("$ or . is seen", () => {
    expect(blind("rule r:\n  t -> d / $ _")).toEqual([false, false, false]);
    expect(blind("rule r:\n  t -> d / _ (a .)")).toEqual([false, false, false]);
  });
  test("a where condition makes the rule see boundaries, also after desugaring to '#'", () => {
    expect(blind("rule r:\n  t -> d / _ where word-final")).toEqual([false, false, false]);
  });
});

// ---------------------------------------------------------------------------------------------
// Property: for random written contexts and random (non-stress) conditions, the desugared rule
// holds on a random left/right string exactly when the written contexts and every condition hold
// when read directly (DEVELOPERS.md: "Conditions conjoin with the written left and right contexts").

const SYMBOLS = ["p", "t", "k", "b", "d", "s", "m", "n", "ŋ", "l", "a", "i", "ə"];
const escape = (c: string): string => c.replace(/[.#$]/g, "\\$&");

function elementRegex(e: Element, inv: Inventory, classes: readonly ClassDef[]): string {
  const chars: string[] = [];
  switch (e.kind) {
    case "boundary":
      return e.which === "word" ? "#" : "[.#]";
    case "segment":
      return escape(e.symbol);
    case "class": {
      const c = classes.find((x) => x.name === e.name)!;
      return `(?:${c.members.map((m) => elementRegex(m, inv, classes)).join("|")})`;
    }
    case "bundle":
      for (const s of SYMBOLS) {
        const b = bundleOf(inv, s)!;
        const ok = e.specs.every((sp) => sp.kind === "value" && b[inv.featureIndex.get(sp.feature)!] === sp.value);
        if (ok) chars.push(s);
      }
      return chars.length === 0 ? "(?!)" : `[${chars.join("")}]`;
  }
}

function regex(p: Pattern, inv: Inventory, classes: readonly ClassDef[]): string {
  switch (p.kind) {
    case "element":
      return elementRegex(p.element, inv, classes);
    case "sequence":
      return p.items.map((i) => regex(i, inv, classes)).join("");
    case "optional":
      return `(?:${regex(p.body, inv, classes)})?`;
    case "choice":
      return `(?:${p.options.map((o) => regex(o, inv, classes)).join("|")})`;
    case "repeat":
      return `(?:${regex(p.body, inv, classes)}){${p.min},${p.max ?? ""}}`;
  }
}

const V = "[aiə]";
const C = "[ptkbdsmnŋl]";
const CONDITION_REGEX: Partial<Record<ProsodicCondition, { side: "left" | "right"; re: string }>> = {
  "syllable-initial": { side: "left", re: "[.#]" },
  "word-initial": { side: "left", re: "#" },
  coda: { side: "left", re: `${V}${C}*` },
  "syllable-final": { side: "right", re: "[.#]" },
  "word-final": { side: "right", re: "#" },
  onset: { side: "right", re: `${C}*${V}` },
};

const WRITTEN = [
  "a", "ə", "s", "m", "N", "#", "$", "[+nasal]", "[-syllabic]", "[+syllabic]", "[+voice -sonorant]", "[+sonorant]",
];
const writtenPattern: fc.Arbitrary<string> = fc.letrec<{ p: string }>((tie) => ({
  p: fc.oneof(
    { depthSize: "small", withCrossShrink: true },
    fc.constantFrom(...WRITTEN),
    fc.tuple(tie("p"), tie("p")).map(([a, b]) => `${a} ${b}`),
    tie("p").map((a) => `(${a})`),
    fc.tuple(tie("p"), tie("p")).map(([a, b]) => `{${a} | ${b}}`),
    fc.tuple(fc.constantFrom("[+sonorant]", "[-syllabic]", "s", "N", "[+voice]"), fc.constantFrom("₀", "₁", "₀²")).map(([a, s]) => `${a}${s}`),
  ),
})).p;

describe("property: desugaring equals the direct reading", () => {
  test("on random contexts, conditions and strings", () => {
    const inv = toyInventory();
    const word = fc.array(fc.constantFrom(...SYMBOLS, ".", "#"), { maxLength: 6 }).map((a) => a.join(""));
    const conditions = fc.subarray(Object.keys(CONDITION_REGEX) as ProsodicCondition[], { minLength: 1 });
    fc.assert(
      fc.property(writtenPattern, writtenPattern, conditions, fc.array(fc.tuple(word, word), { minLength: 8, maxLength: 8 }), (l, r, conds, strings) => {
        const text = `class N = m n a\nrule r:\n  t -> d / ${l} _ ${r} where ${conds.join(", ")}`;
        const { grammar, diagnostics } = parseGrammarText(text, "/t/g.strata");
        expect(diagnostics).toEqual([]);
        const rule = rules(grammar)[0]!;
        const env: Environment = rule.environments[0]!;
        const d = desugar(rule, { inventory: inv, classes: grammar.classes });
        const L = new RegExp(`(?:${regex(env.left, inv, grammar.classes)})$`, "u");
        const R = new RegExp(`^(?:${regex(env.right, inv, grammar.classes)})`, "u");
        const conds2 = conds.map((c) => {
          const x = CONDITION_REGEX[c]!;
          return { side: x.side, re: x.side === "left" ? new RegExp(`(?:${x.re})$`, "u") : new RegExp(`^(?:${x.re})`, "u") };
        });
        const envs = d.environments.map((e) => ({
          left: new RegExp(`(?:${regex(e.left, inv, grammar.classes)})$`, "u"),
          right: new RegExp(`^(?:${regex(e.right, inv, grammar.classes)})`, "u"),
        }));
        for (const [wl, wr] of strings) {
          const direct = L.test(wl) && R.test(wr) && conds2.every((c) => c.re.test(c.side === "left" ? wl : wr));
          const desugared = envs.some((e) => e.left.test(wl) && e.right.test(wr));
          expect({ wl, wr, desugared }).toEqual({ wl, wr, desugared: direct });
        }
      }),
      { numRuns: 400 },
    );
  });
});
