// Checker tests on the toy inventory: names, values, variables, lengths, realisability,
// reachability (rules fed by earlier rules), conditions, duplicates; several problems at once.

import { describe, expect, test } from "vitest";
import { at, checkText } from "./helpers.js";

const HEAD = "syllabify\n";
const found = (text: string) => checkText(HEAD + text).diagnostics.map((d) => [d.severity, d.code, at(d)]);
const messages = (text: string) => checkText(HEAD + text).diagnostics.map((d) => d.message);

describe("names and values", () => {
  // input (after a first line `syllabify`), expected [severity, code, line:column] list
  const cases: [string, [string, string, string][]][] = [
    ["rule r:\n  a -> [+nasel]", [["error", "grammar/unknown-feature", "3:9"]]],
    ["rule r:\n  Vowel -> ə", [["error", "grammar/unknown-class", "3:3"]]],
    ["rule r:\n  t -> [αvoice]", [["warning", "grammar/free-variable", "3:9"]]],
    ["node place = labial coronal dorsal\nrule r:\n  [αplace] -> [αvoice]", [["error", "grammar/variable-kind", "4:16"]]],
    ["rule r:\n  a i -> [+nasal]", [["error", "grammar/change-length", "3:10"]]],
    ["rule r:\n  0 -> [+voice] / _ a", [["error", "grammar/insert-bundle", "3:8"]]],
    ["rule r:\n  a -> [+voice -voice]", [["error", "grammar/contradictory-bundle", "3:16"]]],
    ["node place = labial coronal velar", [["error", "grammar/unknown-feature", "2:6"]]],
    ["node voice = labial", [["error", "grammar/node-is-feature", "2:6"]]],
    ["class A = B\nclass B = A", [["error", "grammar/class-cycle", "2:7"], ["error", "grammar/class-cycle", "3:7"]]],
    ["rule r:\n  a -> ə\nrule r:\n  i -> ə", [["error", "grammar/duplicate-rule", "4:6"]]],
    ["rule r:\n  a -> ə / _ [+nasal +continuant]", [["warning", "grammar/matches-nothing", "3:14"]]],
  ];
  test.each(cases)("%j", (input, expected) => expect(found(input)).toEqual(expected));

  test("an unknown feature suggests the nearest name", () => {
    expect(messages("rule r:\n  a -> [+nasel]")).toEqual(["'nasel' is not a feature of the inventory or a node (did you mean 'nasal'?)"]);
  });
  test("the bundle that matches nothing is shown", () => {
    expect(messages("rule r:\n  a -> ə / _ [+nasal +continuant]")).toEqual(["the bundle [+nasal +continuant] matches no segment"]);
  });
  test("several problems are reported at once", () => {
    expect(found("rule r:\n  a -> [+nasel]\nrule s:\n  Vowel -> [βvoice]").map((f) => f[1])).toEqual([
      "grammar/unknown-feature",
      "grammar/unknown-class",
      "grammar/free-variable",
    ]);
  });
  test("a clean grammar has no diagnostics", () => {
    const text = [
      "node place = labial coronal dorsal",
      "class N = [+nasal -syllabic]",
      "rule assimilate:",
      "  N -> [α place] / _ [α place -sonorant]",
      "rule nasalise:",
      "  [+syllabic] -> [+nasal] / _ N where nucleus",
      "rule aspirate:",
      "  [-sonorant -continuant -voice] -> [+spread_glottis] / _ where syllable-initial, stressed",
      "rule epenthesis:",
      "  0 -> ə / s _ t",
    ].join("\n");
    expect(checkText(HEAD + text).diagnostics).toEqual([]);
  });
});

describe("what a change can write", () => {
  test("a change the inventory and diacritics cannot write is an error naming rule and segment", () => {
    // The toy inventory has no voiceless sonorants and no diacritic for voicelessness.
    const ds = checkText(HEAD + "rule devoice:\n  [+nasal] -> [-voice]").diagnostics;
    expect(ds.map((d) => [d.code, at(d)])).toEqual([
      ["grammar/unwritable", "3:15"],
      ["grammar/unwritable", "3:15"],
      ["grammar/unwritable", "3:15"],
    ]);
    expect(ds[0]!.message).toBe("rule 'devoice' turns m into m with [−voice], which the inventory and its diacritics cannot write");
  });
  test("a change written with a declared diacritic is fine", () => {
    expect(found("rule nasalise:\n  [+syllabic] -> [+nasal]")).toEqual([]);
  });
  test("a node variable bound in the environment takes only the values found there", () => {
    // n → m before p, n → ŋ before k: all writable; an unrestricted place would make unwritable ones.
    expect(found("node place = labial coronal dorsal\nrule r:\n  n -> [α place] / _ [α place -sonorant]")).toEqual([]);
  });
});

describe("rules that can never apply", () => {
  test("a target matching nothing available is a warning", () => {
    expect(found("rule r:\n  [+spread_glottis] -> [-spread_glottis]")).toEqual([["warning", "grammar/never-applies", "3:3"]]);
  });
  test("segments made by an earlier rule count (feeding)", () => {
    expect(found("rule make:\n  p -> [+spread_glottis]\nrule undo:\n  [+spread_glottis] -> [-spread_glottis]")).toEqual([]);
  });
  test("order matters: the feeding rule after is too late", () => {
    expect(found("rule undo:\n  [+spread_glottis] -> [-spread_glottis]\nrule make:\n  p -> [+spread_glottis]")).toEqual([
      ["warning", "grammar/never-applies", "3:3"],
    ]);
  });
  test("a literal segment target the inventory has but that a deletion removed stays available", () => {
    expect(found("rule del:\n  ə -> 0\nrule again:\n  ə -> a")).toEqual([]);
  });
  test("inserted segments become available", () => {
    expect(found("rule ins:\n  0 -> pʰ / s _\nrule r:\n  [+spread_glottis] -> [-spread_glottis]")).toEqual([]);
  });
  test("stressed nuclei count as available (they come from the lexicon and the stress step)", () => {
    expect(found("rule r:\n  [+syllabic +stress] -> [+nasal]")).toEqual([]);
  });
});

describe("conditions", () => {
  test("'nucleus' needs a target that is always a nucleus", () => {
    expect(found("rule r:\n  [+voice] -> [+nasal] / _ n where nucleus")).toEqual([["error", "grammar/nucleus-target", "3:36"]]);
  });
  test("stress conditions need a target that is never a nucleus", () => {
    const ds = checkText(HEAD + "rule r:\n  [+voice] -> [+nasal] / _ where stressed").diagnostics;
    expect(ds.map((d) => [d.code, at(d)])).toEqual([["grammar/stress-condition-on-nucleus", "3:34"]]);
    expect(ds[0]!.message).toContain("write +stress in a +syllabic target instead");
  });
  test("contradictory conditions are a warning", () => {
    expect(found("rule r:\n  t -> d / _ where syllable-initial, coda")).toEqual([["warning", "grammar/conditions-contradict", "3:12"]]);
  });
  test("syllable conditions without a syllabify step are a warning", () => {
    const ds = checkText("rule r:\n  t -> d / _ where coda").diagnostics;
    expect(ds.map((d) => [d.code, at(d)])).toEqual([["grammar/no-syllabify", "2:20"]]);
  });
});

describe("resource limits (each of these once exhausted memory or aborted V8)", () => {
  test("a subscript with an absurd bound is an error at the subscript, the number shown as written", () => {
    expect(found("class C = [-syllabic]\nrule r:\n  a -> ə / _ C₀⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹ i")).toEqual([["error", "grammar/subscript-too-large", "4:14"]]);
    expect(messages("class C = [-syllabic]\nrule r:\n  a -> ə / _ C₀⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹ i")[0]).toBe(
      "A repetition bound of 9,999,999,999 is more than the limit of 32; write '₀' alone for any number of repetitions.",
    );
    expect(messages(`class C = [-syllabic]\nrule r:\n  a -> ə / _ C_${"9".repeat(400)} i`)[0]).toMatch(/^A repetition bound of a number that large is more than/);
  });
  test("bounds up to the limit are fine; nested repetitions are limited by their written-out width", () => {
    expect(found("class C = [-syllabic]\nrule r:\n  a -> ə / _ C₀³² i")).toEqual([]);
    expect(found("class C = [-syllabic]\nrule r:\n  a -> ə / _ (C₀³²)₀³² i")).toEqual([["error", "grammar/pattern-too-wide", "4:14"]]);
    expect(found("class C = [-syllabic]\nrule r:\n  a -> ə / _ (C₀⁸)₀⁸ i")).toEqual([]);
  });
  test("a rule whose alpha variables combine in too many ways is an error at the rule", () => {
    const greek = "αβγδεζηθικλμν";
    // Thirteen feature variables over seven bundles: 2^13 = 8 192 combinations.
    const bundles = (n: number) => Array.from({ length: Math.ceil(n / 2) }, (_, k) => `[${greek[2 * k]}voice${2 * k + 1 < n ? ` ${greek[2 * k + 1]}nasal` : ""}]`).join(" ");
    const r = checkText(`${HEAD}rule many:\n  [-syllabic] -> [+voice] / _ ${bundles(13)}`).diagnostics.filter((d) => d.severity === "error");
    expect(r.map((d) => [d.code, at(d)])).toEqual([["grammar/too-many-alpha-combinations", "2:6"]]);
    expect(r[0]!.message).toMatch(/^Rule 'many' has 13 alpha variables \(α β .* ν\), whose values combine in 8,192 ways, more than the limit of 4,096;/);
    const fewer = bundles(12);
    expect(checkText(`${HEAD}rule ok:\n  [-syllabic] -> [+voice] / _ ${fewer}`).diagnostics.filter((d) => d.code === "grammar/too-many-alpha-combinations")).toEqual([]);
  });
});
