// Parser tests: valid constructs → AST with exact spans; invalid inputs → exact diagnostics
// (fixture table: input, code, line:column); recovery; caret rendering; never throwing.

import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { renderDiagnostic } from "../../src/diagnostics.js";
import { parseGrammarText, type Rule, type Span } from "../../src/grammar/index.js";
import { at, rules, show } from "./helpers.js";

const FILE = "/g/main.strata";
const parse = (text: string) => parseGrammarText(text, FILE);
const span = (line: number, column: number, length: number): Span => ({ file: FILE, line, column, length });
/** The AST without spans, for comparing two spellings of the same rule. */
const noSpans = (x: unknown): unknown => JSON.parse(JSON.stringify(x, (k, v) => (k === "span" ? undefined : v)));

describe("valid declarations", () => {
  const text = [
    'inventory "segments.csv"',
    'diacritics "marks--old.csv"   -- a comment after a path that itself contains two hyphens',
    "node place = labial coronal dorsal",
    "class C = [-syllabic]",
    "class Stop = p t k",
    "onsets = p t pl",
    "codas = s ts",
    "heavy = [+syllabic +long] | [+syllabic] C",
    "syllabify",
    "stress from right 2 if heavy else 3",
    "stress from left 1",
    "syllabify",
  ].join("\n");
  const { grammar, diagnostics } = parse(text);

  test("no diagnostics", () => expect(diagnostics).toEqual([]));
  test("paths resolve relative to the declaring file", () => {
    expect(grammar.inventory).toBe("/g/segments.csv");
    expect(grammar.diacritics).toBe("/g/marks--old.csv");
  });
  test("node", () => expect(grammar.nodes).toEqual([{ name: "place", features: ["labial", "coronal", "dorsal"], span: span(3, 6, 5) }]));
  test("classes: a bundle and a segment list", () => {
    expect(grammar.classes[0]).toEqual({
      name: "C",
      span: span(4, 7, 1),
      members: [{ kind: "bundle", span: span(4, 11, 11), specs: [{ kind: "value", feature: "syllabic", value: "-", span: span(4, 12, 9) }] }],
    });
    expect(grammar.classes[1]!.members).toEqual([
      { kind: "segment", symbol: "p", span: span(5, 14, 1) },
      { kind: "segment", symbol: "t", span: span(5, 16, 1) },
      { kind: "segment", symbol: "k", span: span(5, 18, 1) },
    ]);
  });
  test("clusters stay as written until the loader splits them", () => {
    expect(grammar.onsets).toEqual([
      { segments: ["p"], span: span(6, 10, 1) },
      { segments: ["t"], span: span(6, 12, 1) },
      { segments: ["pl"], span: span(6, 14, 2) },
    ]);
    expect(grammar.codas!.map((c) => c.segments[0])).toEqual(["s", "ts"]);
  });
  test("heavy alternatives", () => {
    expect(grammar.heavy.map(show)).toEqual(["[+syllabic +long]", "[+syllabic] C"]);
    expect(grammar.heavy[1]!.kind === "sequence" && grammar.heavy[1]!.span).toEqual(span(8, 29, 13));
  });
  test("steps in order, named by keyword and numbered from the second", () => {
    expect(grammar.steps).toEqual([
      { kind: "syllabify", name: "syllabify", span: span(9, 1, 9) },
      { kind: "stress", name: "stress", span: span(10, 1, 35), edge: "right", position: 2, otherwise: 3 },
      { kind: "stress", name: "stress-2", span: span(11, 1, 18), edge: "left", position: 1, otherwise: null },
      { kind: "syllabify", name: "syllabify-2", span: span(12, 1, 9) },
    ]);
  });
});

describe("valid rules", () => {
  test("header options, bundles, node variable, spans", () => {
    const text = "rule nasal-assimilation optional left-to-right prefer unapplied:\n  [+nasal -syllabic] -> [α place] / _ [α place +consonantal]";
    const { grammar, diagnostics } = parse(text);
    expect(diagnostics).toEqual([]);
    const r = rules(grammar)[0]!;
    expect(r).toMatchObject({ name: "nasal-assimilation", span: span(1, 6, 18), optional: true, mode: "left-to-right", prefer: "unapplied" });
    expect(r.target).toEqual([
      {
        kind: "bundle",
        span: span(2, 3, 18),
        specs: [
          { kind: "value", feature: "nasal", value: "+", span: span(2, 4, 6) },
          { kind: "value", feature: "syllabic", value: "-", span: span(2, 11, 9) },
        ],
      },
    ]);
    expect(r.change).toEqual([
      { kind: "bundle", span: span(2, 25, 9), specs: [{ kind: "variable", feature: "place", variable: "α", negated: false, span: span(2, 26, 7) }] },
    ]);
    const env = r.environments[0]!;
    expect(env.left).toEqual({ kind: "sequence", items: [], span: span(2, 37, 1) });
    expect(env.right.kind === "sequence" && env.right.span).toEqual(span(2, 39, 22));
    expect(show(env.right)).toBe("[αplace +consonantal]");
    expect(env.span).toEqual(span(2, 37, 24));
    expect(env.conditions).toEqual([]);
  });

  test("defaults: obligatory, simultaneous, prefer applied; body on the header line", () => {
    const r = rules(parse("rule r: a -> b").grammar)[0]!;
    expect(r).toMatchObject({ optional: false, mode: "simultaneous", prefer: "applied", environments: [] });
    expect(r.target).toEqual([{ kind: "segment", symbol: "a", span: span(1, 9, 1) }]);
  });

  test("ASCII spellings mean the same as the Unicode ones", () => {
    const uni = parse("rule r:\n  ∅ → ə / C₀² _ [−αvoice]").grammar;
    const ascii = parse("rule r:\n  0 -> ə / C_0^2 _ [-alpha voice]").grammar;
    expect(noSpans(ascii)).toEqual(noSpans(uni));
    const r = rules(uni)[0]!;
    expect(r.target).toEqual([]);
    expect(show(r.environments[0]!.left)).toBe("C_0^2");
    expect(show(r.environments[0]!.right)).toBe("[-αvoice]");
  });

  test("optional parts, choices, subscripts, boundaries", () => {
    const r = rules(parse("rule r:\n  a -> b / # (s) {p | t k}₁ $ _ . C₁ V_1").grammar)[0]!;
    expect(show(r.environments[0]!.left)).toBe("# (s) {p | t k}_1 $");
    expect(show(r.environments[0]!.right)).toBe("$ C_1 V_1");
    const rep = r.environments[0]!.left.kind === "sequence" ? r.environments[0]!.left.items[2]! : null;
    expect(rep).toMatchObject({ kind: "repeat", min: 1, max: null, span: span(2, 18, 10) });
  });

  test("a choice in the target becomes an implicit class", () => {
    const { grammar, diagnostics } = parse("rule flap optional prefer applied:\n  {t | d} -> ɾ / [+syllabic] _ [+syllabic -stress]");
    expect(diagnostics).toEqual([]);
    expect(rules(grammar)[0]!.target).toEqual([{ kind: "class", name: "{t|d}", span: span(2, 3, 7) }]);
    expect(grammar.classes).toEqual([
      {
        name: "{t|d}",
        span: span(2, 3, 7),
        members: [
          { kind: "segment", symbol: "t", span: span(2, 4, 1) },
          { kind: "segment", symbol: "d", span: span(2, 8, 1) },
        ],
      },
    ]);
  });

  test("several environments on continuation lines, with conditions", () => {
    const text = ["rule aspirate:", "  [-voice -continuant] -> [+spread_glottis]", "    / _ where syllable-initial, stressed", "    / # _"].join("\n");
    const { grammar, diagnostics } = parse(text);
    expect(diagnostics).toEqual([]);
    const envs = rules(grammar)[0]!.environments;
    expect(envs).toHaveLength(2);
    expect(envs[0]!.conditions).toEqual([
      { condition: "syllable-initial", span: span(3, 15, 16) },
      { condition: "stressed", span: span(3, 33, 8) },
    ]);
    expect(envs[0]!.span).toEqual(span(3, 7, 34));
    expect(show(envs[1]!.left)).toBe("#");
    expect(envs[1]!.conditions).toEqual([]);
  });

  test("IPA runs stay whole in the parser (the loader splits them); Greek β outside brackets is IPA", () => {
    const r = rules(parse("rule r:\n  st -> β / tʰ _").grammar)[0]!;
    expect(r.target).toEqual([{ kind: "segment", symbol: "st", span: span(2, 3, 2) }]);
    expect(r.change).toEqual([{ kind: "segment", symbol: "β", span: span(2, 9, 1) }]);
    expect(show(r.environments[0]!.left)).toBe("tʰ");
  });

  test("literals are normalised to NFC", () => {
    const r = rules(parse("rule r:\n  a\u0303 -> a").grammar)[0]!;
    expect(r.target[0]).toMatchObject({ kind: "segment", symbol: "ã" });
  });
});

describe("invalid input: exact diagnostics", () => {
  // input, expected code, line:column of the first diagnostic
  const cases: [string, string, string][] = [
    ["rul x:", "grammar/unknown-statement", "1:1"],
    ["rule x:\n  a -> b / c", "grammar/syntax", "2:13"],
    ["rule x:\n  [nasal] -> b", "grammar/bad-feature-value", "2:4"],
    ["rule x:\n  a -> b / _ where stresed", "grammar/unknown-condition", "2:20"],
    ["rule x:\n  C₀ -> b", "grammar/target-not-fixed", "2:3"],
    ["rule x:\n  (a) -> b", "grammar/target-not-fixed", "2:3"],
    ["rule x:\n  a -> C", "grammar/class-in-change", "2:8"],
    ["rule x:\n  a b -> 0 b", "grammar/null-not-alone", "2:10"],
    ["rule x:\n  a -> b / _ c _", "grammar/extra-underscore", "2:16"],
    ["rule x:\n  a -> b / _ [+voice", "grammar/unclosed", "2:14"],
    ["rule x:\n  a -> b / _ (c", "grammar/unclosed", "2:14"],
    ["rule x:\n  a -> b / _ {c | d", "grammar/unclosed", "2:14"],
    ["inventory segments.csv", "grammar/syntax", "1:11"],
    ['inventory "segments.csv', "grammar/unterminated-string", "1:11"],
    ["stress from middle 2", "grammar/syntax", "1:13"],
    ["stress from left 0", "grammar/bad-count", "1:18"],
    ["rule x optional optional:", "grammar/duplicate-option", "1:17"],
    ["rule x simultaneous right-to-left:", "grammar/duplicate-option", "1:21"],
    ["rule x sometimes:", "grammar/syntax", "1:8"],
    ["class lower = a", "grammar/syntax", "1:7"],
    ["class C_1 = a", "grammar/bad-name", "1:8"],
    ["class B = #", "grammar/bad-class-member", "1:11"],
    ["rule x:\n  a -> b / C_2^1 _", "grammar/bad-subscript", "2:12"],
    ["rule x:\n  a -> b / C^2 _", "grammar/bad-subscript", "2:13"],
    ["  rule x:", "grammar/orphan-line", "1:3"],
    ["rule x:\n  ˈa -> b", "grammar/stress-mark", "2:3"],
    ["rule x:\n  a -> b / 0 _", "grammar/null-misplaced", "2:12"],
    ["rule x:\n  # -> b", "grammar/boundary-target", "2:3"],
    ["rule x:\n  a -> #", "grammar/boundary-in-change", "2:8"],
    ["rule x:", "grammar/empty-rule", "1:6"],
    ["rule x:\n  -> b", "grammar/empty-target", "2:3"],
    ["rule x:\n  a ->", "grammar/empty-change", "2:7"],
    ["rule x:\n  a b", "grammar/syntax", "2:6"],
    ["onsets = p 1t", "grammar/bad-cluster", "1:12"],
    ["heavy = ", "grammar/syntax", "1:8"], // trailing blanks are not part of the statement: just after '=' 
    ["node Place = labial", "grammar/syntax", "1:6"],
    ["rule x:\n  a -> [αvoice 0βplace]", "grammar/bad-feature-value", "2:16"],
    ["rule x:\n  a -> b / _ +voice", "grammar/syntax", "2:14"],
    ["syllabify now", "grammar/syntax", "1:11"],
    ['inventory "a.csv"\ninventory "b.csv"', "grammar/duplicate-declaration", "2:11"],
    ["class C = a\nclass C = b", "grammar/duplicate-name", "2:7"],
  ];
  test.each(cases)("%j → %s at %s", (input, code, pos) => {
    const { diagnostics } = parse(input);
    expect(diagnostics.length).toBeGreaterThan(0);
    expect(diagnostics[0]!.code).toBe(code);
    expect(at(diagnostics[0]!)).toBe(pos);
    expect(diagnostics[0]!.file).toBe(FILE);
    expect(diagnostics[0]!.message.length).toBeGreaterThan(10);
  });

  test("a message names what was expected and what was found", () => {
    const d = parse("rule x:\n  a -> b / c").diagnostics[0]!;
    expect(d.message).toBe("expected '_' (the target's place) in the environment, found the end of the statement");
    expect(parse("rule x:\n  [nasal] -> b").diagnostics[0]!.message).toBe("feature 'nasal' needs a value: +nasal, -nasal or 0nasal");
  });

  test("'prefer' on an obligatory rule is a warning, not an error", () => {
    const ds = parse("rule x prefer unapplied:\n  a -> b").diagnostics;
    expect(ds.map((d) => [d.severity, d.code, at(d)])).toEqual([["warning", "grammar/prefer-obligatory", "1:6"]]);
  });
});

describe("error recovery", () => {
  test("several errors are reported at once and later statements still parse", () => {
    const text = [
      "rule one:",
      "  a -> b / c",
      "rul two:",
      "  a -> b",
      "class lower = a",
      "rule three:",
      "  [+voice] -> [-voice] / _ #",
    ].join("\n");
    const { grammar, diagnostics } = parse(text);
    expect(diagnostics.map((d) => [d.code, at(d)])).toEqual([
      ["grammar/syntax", "2:13"],
      ["grammar/unknown-statement", "3:1"],
      ["grammar/syntax", "5:7"],
    ]);
    expect(rules(grammar).map((r) => r.name)).toEqual(["three"]);
  });

  test("an unindented rule body gets a hint", () => {
    const ds = parse("rule x:\na -> b").diagnostics;
    expect(ds.map((d) => [d.code, at(d)])).toEqual([
      ["grammar/empty-rule", "1:6"],
      ["grammar/unknown-statement", "2:1"],
    ]);
    const d = ds[1]!;
    expect(d.message).toContain("the lines of a rule are indented");
  });
});

describe("rendering", () => {
  test("renderDiagnostic shows the source line and a caret under the span", () => {
    const text = "rule x:\n  a -> b / _ where stresed";
    const d = parse(text).diagnostics[0]!;
    expect(renderDiagnostic(d, text)).toBe(
      [
        "/g/main.strata:2:20: error: 'stresed' is not a condition; use one of onset, nucleus, coda, syllable-initial, syllable-final, word-initial, word-final, stressed, unstressed, primary [grammar/unknown-condition]",
        "    2 |   a -> b / _ where stresed",
        "      |                    ^^^^^^^",
      ].join("\n"),
    );
  });
});

describe("the parser never throws", () => {
  const pieces = [
    "rule ", "r", ":", "\n", "\n  ", " ", "->", "→", "/", "_", "[", "]", "(", ")", "{", "}", "|", "+", "-", "−", "0", "∅",
    "α", "alpha ", "voice", "place", "C", "V", "₀", "²", "_0", "^2", "#", "$", ".", "a", "tʰ", "ə", "where ", "stressed",
    "onset", ",", "class ", "node ", "= ", "include ", '"', "x.strata", "inventory ", "onsets ", "heavy ", "stress from ",
    "right ", "2 ", "if heavy else ", "syllabify", "--", "optional ", "prefer ", "applied", "ˈ", "\t", "\r\n",
  ];
  test("on random grammar-like text", () => {
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...pieces), { maxLength: 60 }), (parts) => {
        const text = parts.join("");
        const r = parse(text);
        const lines = text.split(/\r\n|\n|\r/).length;
        for (const d of r.diagnostics) {
          expect(d.line).toBeGreaterThanOrEqual(1);
          expect(d.line).toBeLessThanOrEqual(lines);
          expect(d.column).toBeGreaterThanOrEqual(1);
          expect(d.code).not.toBe("grammar/internal");
        }
      }),
      { numRuns: 400 },
    );
  });
  test("on random Unicode text", () => {
    fc.assert(
      fc.property(fc.string({ unit: "grapheme", maxLength: 200 }), (text) => {
        const r = parse(text);
        expect(r.diagnostics.every((d) => d.code !== "grammar/internal")).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});

// Used only to keep the type import honest in this file.
export type { Rule };
