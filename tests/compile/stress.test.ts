// The hardest rules found so far, in shapes of our own: each must compile, or fail cleanly with a
// positioned `compile/too-large` naming the rule and the part responsible — never a stack trace,
// never an exhausted heap. Deadlines are given as compile options so a failure comes quickly;
// no timing is asserted (speed lives in the bench).

import { copyFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { compileGrammar, type CompileLimits } from "../../src/compile/index.js";
import { SymbolLowering, lowerRule } from "../../src/compile/cases.js";
import { Lowering } from "../../src/compile/lower.js";
import { buildRule } from "../../src/compile/rule.js";
import { computeAlphabet } from "../../src/compile/alphabet.js";
import { desugaredSteps } from "../../src/compile/index.js";
import { loadGrammar } from "../../src/grammar/index.js";
import type { Rule } from "../../src/grammar/ast.js";
import { EN_US } from "../inventory/helpers.js";

/** Loads a grammar over the en-us inventory; `checked` false keeps a grammar the checker refuses (to reach the compiler's own limits). */
function load(body: string, checked = true) {
  const dir = mkdtempSync(join(tmpdir(), "strata-stress-"));
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(join(dir, "grammar.strata"), `inventory "segments.csv"\nclass C = [-syllabic]\nsyllabify\n${body}\n`);
  const r = loadGrammar(dir);
  if (checked) expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  return { grammar: r.grammar!, inventory: r.inventory!, file: join(dir, "grammar.strata") };
}

/** Compiles; returns the diagnostics as [code, line:column, message]. */
function compile(body: string, limits: Partial<CompileLimits> = {}, checked = true) {
  const { grammar, inventory } = load(body, checked);
  const r = compileGrammar(grammar, inventory, { limits });
  return { ok: r.compiled !== null, ds: r.diagnostics.map((d) => [d.code, `${d.line}:${d.column}`, d.message] as const) };
}

const tooLarge = (ds: readonly (readonly [string, string, string])[], line: number, part: RegExp) => {
  expect(ds).toHaveLength(1);
  const [code, at, message] = ds[0]!;
  expect(code).toBe("compile/too-large");
  expect(at).toBe(`${line}:6`);
  expect(message).toMatch(/^Rule 'hard' cannot be compiled within the limits: /);
  expect(message).toMatch(part);
};

describe("hard rules finish or fail cleanly", () => {
  test("two alpha variables, a bounded repetition and 'where unstressed' (a determinisation blow-up): a clean time limit", () => {
    const r = compile("rule hard:\n  [-syllabic αvoice βnasal] -> [+spread_glottis] / _ C₀³ [αvoice βnasal] where unstressed", { deadlineMs: 1500 });
    expect(r.ok).toBe(false);
    tooLarge(r.ds, 4, /reached the time limit of 1\.5 s\./);
  });

  test("an optional rule with two environments of 13 unconstrained positions: a clean time limit", () => {
    const blanks = Array(13).fill("[]").join(" ");
    const r = compile(`rule hard optional:\n  t -> d / _ ${blanks}\n  / ${blanks} _`, { deadlineMs: 1500 });
    tooLarge(r.ds, 4, /reached the time limit of 1\.5 s\./);
  });

  test("the same rule with a small state limit on minimising: the states limit, naming the part", () => {
    const blanks = Array(13).fill("[]").join(" ");
    const r = compile(`rule hard optional:\n  t -> d / _ ${blanks}\n  / ${blanks} _`, { machineStates: 2000 });
    tooLarge(r.ds, 4, /minimising its machine \([\d,]+ states before\) reached more than 2,000 states\./);
  });

  test("22 alpha variables (refused by the checker) fail in the compiler before anything is enumerated", () => {
    const feats = ["voice", "nasal", "continuant", "sonorant", "labial", "coronal", "dorsal", "anterior", "distributed", "strident", "lateral",
      "round", "high", "low", "front", "back", "tense", "spread_glottis", "constricted_glottis", "approximant", "delayed_release", "labiodental"];
    const greek = "αβγδεζηθικλμνξοπρστυφχψω";
    const r = compile(`rule hard:\n  [-syllabic] -> [+voice] / _ [${feats.map((f, i) => `${greek[i]}${f}`).join(" ")}]`, {}, false);
    expect(r.ds).toHaveLength(1);
    expect(r.ds[0]!.slice(0, 2)).toEqual(["compile/too-large", "4:6"]);
    expect(r.ds[0]![2]).toMatch(/^Rule 'hard' cannot be compiled within the limits: its 22 alpha variables combine in more than 4,096 ways\./);
  });

  test("an absurd subscript (refused by the checker) fails in the compiler at the rule", () => {
    const r = compile("rule hard:\n  t -> d / _ C₀⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹ ə", {}, false);
    tooLarge(r.ds, 4, /the right context reached more than 20,000 states\./);
  });

  test("a context over its state limit names the side and the environment", () => {
    const r = compile("rule hard:\n  t -> d / _ ə\n  / C₀ [+syllabic] C₁₆ ə _", { contextStates: 10 });
    tooLarge(r.ds, 4, /the left context of environment 2 reached more than 10 states\./);
  });

  test("a rule over its alignment state limit says so", () => {
    const r = compile("rule hard:\n  [-syllabic αvoice] -> [+spread_glottis] / _ C₀³ [αvoice] where unstressed", { ruleStates: 50 });
    tooLarge(r.ds, 4, /the alignment construction reached more than 50 states\./);
  });

  test("a multi-symbol insertion with two environments compiles; its chains share states", () => {
    const body = "rule hard:\n  0 -> ə ʔ ə ʔ / [+syllabic] C₀³ _ C₀³ [+syllabic -stress]\n  / [+syllabic -stress] C₀² _";
    const r = compile(body, { ruleStates: 5000 });
    expect(r).toEqual({ ok: true, ds: [] });
    // The pair machine: an insertion before each of |Σ| symbols from one state costs |ins| + |Σ|
    // states, not |ins| · |Σ| (it used to be about 2 million states for a rule of this shape).
    const { grammar, inventory } = load(body);
    const low = new Lowering(grammar, inventory);
    const steps = desugaredSteps(grammar, inventory);
    const alphabet = computeAlphabet(inventory, low, steps);
    const rule = steps[1] as Rule;
    const lowered = lowerRule(new SymbolLowering(low, alphabet), rule, { blind: false, domain: alphabet.domains[1]! });
    const nfa = buildRule(lowered);
    const symbols = alphabet.size;
    expect(nfa.states).toBeLessThan(8 * symbols);
  });

  test("the shipped grammar compiles within the default limits", () => {
    const { grammar, inventory } = (() => {
      const r = loadGrammar(EN_US);
      return { grammar: r.grammar!, inventory: r.inventory! };
    })();
    const r = compileGrammar(grammar, inventory);
    expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(r.compiled).not.toBeNull();
  });
});
