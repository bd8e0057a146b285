// The hardest rules found so far, in shapes of our own. The shapes whose construction used to blow
// up (src/compile/README.md, "Bounded construction") must now compile within the default limits and
// agree with the interpreter on sample words; with a limit set below what they need they fail
// cleanly with a positioned `compile/too-large` naming the rule and the part responsible — never a
// stack trace, never an exhausted heap. No timing is asserted (speed lives in the bench).

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
import { applyGrammar, wordKey } from "../../src/interp/index.js";
import type { Grammar } from "../../src/grammar/ast.js";
import type { Inventory } from "../../src/inventory/types.js";
import { EN_US } from "../inventory/helpers.js";
import { cmuEntries, arpabetToIpa } from "../lexicons/harness.js";
import { symsOf } from "../support/words.js";

/** Loads a grammar over the en-us inventory; `checked` false keeps a grammar the checker refuses (to reach the compiler's own limits). */
function load(body: string, checked = true, head = "syllabify") {
  const dir = mkdtempSync(join(tmpdir(), "strata-stress-"));
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(join(dir, "grammar.strata"), `inventory "segments.csv"\nclass C = [-syllabic]\nclass V = [+syllabic]\n${head}\n${body}\n`);
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

const ALPHA_REPEAT = "rule hard:\n  [-syllabic αvoice βnasal] -> [+spread_glottis] / _ C₀³ [αvoice βnasal] where unstressed";
const LONG_BLANKS = `rule hard optional:\n  t -> d / _ ${Array(13).fill("[]").join(" ")}\n  / ${Array(13).fill("[]").join(" ")} _`;
const INSERTION = "rule hard:\n  0 -> ə ʔ ə ʔ / [+syllabic] C₀³ _ C₀³ [+syllabic -stress]\n  / [+syllabic -stress] C₀² _";

/** Sample words: a slice of the CMU Pronouncing Dictionary (npm `cmu-pronouncing-dictionary`) with clusters, and a few of our own. */
const SAMPLES: readonly string[] = [
  ...cmuEntries().filter((_, i) => i % 997 === 5).flatMap(([, arpa]) => { try { return [arpabetToIpa(arpa)]; } catch { return []; } }),
  "ˈtɛksts", "ˈækstɹə", "ˈpʰɛmpt", "ənˈmæskt", "ˈstɹɛŋkθs", "ˈɪnstɹəmənt", "ˈbʌndlzd", "ˈæ", "ˈskɹiːm",
];

/** Compiles `body` within the default limits, then: machine = interpreter on every sample word (preferred output and every variant). */
function agrees(body: string): void {
  const { grammar, inventory } = load(body);
  const words = SAMPLES.map((text) => ({ text, w: symsOf(text, inventory) }));
  // Segments of the words that only the rule makes (pʰ) must be read too: the machines start from them.
  const extraSegments = words.flatMap(({ w }) => w.flatMap((s) => (s.kind === "segment" ? [s.bundle] : [])));
  const r = compileGrammar(grammar, inventory, { extraSegments });
  expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  const c = r.compiled!;
  let compared = 0;
  for (const { text, w } of words) {
    const ids = c.encode(w);
    if (ids === null) continue;
    const run = applyGrammar(grammar as Grammar, inventory as Inventory, w, { maxVariants: 64 });
    const out: number[] = [];
    expect(c.preferred.run(ids, out), text).toBe(true);
    expect(wordKey(c.decode(out)), `preferred of ${text}`).toBe(wordKey(run.preferred));
    const v = c.variants(ids, 64);
    if (!run.capped && !v.capped) expect(v.outputs.map((o) => wordKey(c.decode(o))).sort(), text).toEqual(run.outputs.map(wordKey).sort());
    compared++;
  }
  expect(compared).toBeGreaterThan(SAMPLES.length / 2);
}

describe("hard rules finish or fail cleanly", () => {
  test("two alpha variables, a bounded repetition and 'where unstressed': compiles and agrees with the interpreter", () => {
    agrees(ALPHA_REPEAT);
  });

  test("the same rule with a deadline it cannot meet: a clean time limit", () => {
    const r = compile(ALPHA_REPEAT, { deadlineMs: 50 });
    expect(r.ok).toBe(false);
    tooLarge(r.ds, 5, /reached the time limit of 50 ms\./);
  });

  test("an optional rule with two environments of 13 unconstrained positions: compiles and agrees with the interpreter", () => {
    agrees(LONG_BLANKS);
  });

  test("the same rule with a small limit on its step machine: the states limit, naming the part", () => {
    const r = compile(LONG_BLANKS, { machineStates: 40 });
    tooLarge(r.ds, 5, /checking its preferred variant has one output reached more than 40 states\./);
  });

  test("a multi-symbol insertion with two environments: compiles and agrees with the interpreter", () => {
    agrees(INSERTION);
  });

  test("an optional two-segment insertion everywhere, then an optional right-to-left rule everywhere: compiles and agrees", () => {
    // The shape of a random grammar that once did not finish (every gap may take 'd d', every
    // consonant may become d): many variants per word, so short words, and the preferred output on longer ones.
    const head = "onsets = p t k b d n s l ɹ\ncodas = p t k n s l ɹ\nheavy = V C\nsyllabify\nstress from left 2 if heavy else 1";
    const body = "rule r1 left-to-right:\n  k -> [-coronal -voice]\nrule r2 optional:\n  0 -> d d\nrule r3 optional right-to-left prefer unapplied:\n  [-syllabic] -> d";
    const { grammar, inventory } = load(body, true, head);
    const r = compileGrammar(grammar, inventory);
    expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    const c = r.compiled!;
    for (const text of ["ə", "tə", "ək", "ɪn", "ski", "ˈbæt", "ˈkætəl", "ˈstɹɪŋk", "əˈbaʊt", "ˈænəmənt"]) {
      const w = symsOf(text, inventory);
      const ids = c.encode(w)!;
      const few = applyGrammar(grammar, inventory, w, { maxVariants: 4 });
      const out: number[] = [];
      expect(c.preferred.run(ids, out)).toBe(true);
      expect(wordKey(c.decode(out)), `preferred of ${text}`).toBe(wordKey(few.preferred));
      if (text.length > 3) continue;
      const all = applyGrammar(grammar, inventory, w, { maxVariants: 4000 });
      const v = c.variants(ids, 4000);
      expect(all.capped || v.capped, text).toBe(false);
      expect(v.outputs.map((o) => wordKey(c.decode(o))).sort(), text).toEqual(all.outputs.map(wordKey).sort());
    }
  });

  test("22 alpha variables (refused by the checker) fail in the compiler before anything is enumerated", () => {
    const feats = ["voice", "nasal", "continuant", "sonorant", "labial", "coronal", "dorsal", "anterior", "distributed", "strident", "lateral",
      "round", "high", "low", "front", "back", "tense", "spread_glottis", "constricted_glottis", "approximant", "delayed_release", "labiodental"];
    const greek = "αβγδεζηθικλμνξοπρστυφχψω";
    const r = compile(`rule hard:\n  [-syllabic] -> [+voice] / _ [${feats.map((f, i) => `${greek[i]}${f}`).join(" ")}]`, {}, false);
    expect(r.ds).toHaveLength(1);
    expect(r.ds[0]!.slice(0, 2)).toEqual(["compile/too-large", "5:6"]);
    expect(r.ds[0]![2]).toMatch(/^Rule 'hard' cannot be compiled within the limits: its 22 alpha variables combine in more than 4,096 ways\./);
  });

  test("an absurd subscript (refused by the checker) fails in the compiler at the rule", () => {
    const r = compile("rule hard:\n  t -> d / _ C₀⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹ ə", {}, false);
    tooLarge(r.ds, 5, /the right context reached more than 20,000 states\./);
  });

  test("a context over its state limit names the side and the environment", () => {
    const r = compile("rule hard:\n  t -> d / _ ə\n  / C₀ [+syllabic] C₁₆ ə _", { contextStates: 10 });
    tooLarge(r.ds, 5, /the left context of environment 2 reached more than 10 states\./);
  });

  test("a rule over its alignment state limit says so", () => {
    const r = compile("rule hard:\n  [-syllabic αvoice] -> [+spread_glottis] / _ C₀³ [αvoice] where unstressed", { ruleStates: 50 });
    tooLarge(r.ds, 5, /the alignment construction reached more than 50 states\./);
  });

  test("a multi-symbol insertion: its chains share states", () => {
    // The pair machine: an insertion before each of |Σ| symbols from one state costs |ins| + |Σ|
    // states, not |ins| · |Σ| (it used to be about 2 million states for a rule of this shape).
    const { grammar, inventory } = load(INSERTION);
    const low = new Lowering(grammar, inventory);
    const steps = desugaredSteps(grammar, inventory);
    const alphabet = computeAlphabet(inventory, low, steps);
    const rule = steps[1] as Rule;
    const lowered = lowerRule(new SymbolLowering(low, alphabet), rule, { blind: false, domain: alphabet.domains[1]! });
    const nfa = buildRule(lowered);
    expect(nfa.states).toBeLessThan(8 * alphabet.size);
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
