// Output checks of the bench's hand-written regular-expression cascade: it must give exactly what
// Strata's reference interpreter gives for the same en-us rules (bench/subset.ts cuts them from the
// shipped grammar), on textbook words and on a CMU Pronouncing Dictionary sample.

import { describe, expect, test } from "vitest";
import { formatDiagnostic } from "../../src/diagnostics.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { applyGrammar, prepareGrammar, symsToIpa, type Sym } from "../../src/interp/index.js";
import { cascadeSteps, regexCascade, REGEX_RULES } from "../../bench/regex-cascade.js";
import { SUBSET_RULES, cutGrammar, prosodyGrammar, subsetGrammar } from "../../bench/subset.js";
import { cmu, cmuEntries, EN_US, arpabetToIpa, variety, wordOf } from "../lexicons/harness.js";

const v = variety("grammar.strata");
const prosody = prepareGrammar(prosodyGrammar(v.grammar), v.inventory);
const subset = prepareGrammar(subsetGrammar(v.grammar), v.inventory);
const ipa = (w: readonly Sym[]): string => symsToIpa(w, v.inventory, { syllables: true });
/** The syllabified, stressed broad form (the cascade's input) and Strata's narrow form for the subset rules. */
const both = (broadIpa: string): { broad: string; strata: string } => {
  const w = wordOf(v, broadIpa);
  return { broad: ipa(applyGrammar(prosody, v.inventory, w).preferred), strata: ipa(applyGrammar(subset, v.inventory, w).preferred) };
};

describe("the subset grammar", () => {
  test("holds exactly the cascade's rules, in the en-us order, after syllabify and stress", () => {
    expect(REGEX_RULES).toEqual(SUBSET_RULES);
    const g = subsetGrammar(v.grammar);
    expect(g.steps.map((s) => s.name)).toEqual(["syllabify", "stress", ...SUBSET_RULES]);
    const order = v.grammar.steps.map((s) => s.name);
    expect(SUBSET_RULES.map((r) => order.indexOf(r))).toEqual([...SUBSET_RULES.map((r) => order.indexOf(r))].sort((a, b) => a - b));
  });

  test("a rule the en-us grammar lacks is an error, not a silent gap", () => {
    expect(() => cutGrammar(v.grammar, ["no-such-rule"])).toThrow(/no-such-rule/);
  });

  test("loads from the shipped folder without errors", () => {
    const r = loadGrammar(EN_US + "grammar.strata");
    expect(r.diagnostics.filter((d) => d.severity === "error").map(formatDiagnostic)).toEqual([]);
  });
});

describe("regex cascade on textbook words (CMU pronunciations)", () => {
  // Expected narrow forms follow the en-us rule comments; each names its source there:
  // Kahn 1976; Ladefoged & Johnson, A Course in Phonetics, ch. 3–4 (from memory).
  const cases: [string, string][] = [
    ["water", "ˈwɔ.ɾɚ"], // flapping after a vowel, before an unstressed vowel
    ["party", "ˈpʰɑɹ.ɾi"], // flapping after vowel + ɹ; aspiration word-initially
    ["attack", "əˈtʰæk"], // no flap before a stressed vowel; aspiration at a stressed onset
    ["spin", "ˈspɪ̃n"], // no aspiration after s; nasalisation before a tautosyllabic nasal
    ["play", "ˈpʰl̥eɪ"], // approximant devoicing after an aspirated stop
    ["twin", "ˈtʰw̥ɪ̃n"],
    ["feel", "ˈfiɫ"], // dark l in the coda
    ["leaf", "ˈlif"], // clear l in the onset
    ["many", "ˈmɛ.ni"], // no nasalisation across a syllable boundary
  ];
  for (const [word, want] of cases) {
    test(`${word} → ${want}`, () => {
      const { broad, strata } = both(cmu(word));
      expect(strata).toBe(want);
      expect(regexCascade(broad)).toBe(want);
    });
  }
});

describe("regex cascade = Strata on a CMU Pronouncing Dictionary sample", () => {
  test("every 100th entry (about 1,350 words) gives the same narrow IPA", () => {
    const differ: string[] = [];
    const entries = cmuEntries().filter((_, i) => i % 100 === 3);
    for (const [word, arpa] of entries) {
      const { broad, strata } = both(arpabetToIpa(arpa));
      const got = regexCascade(broad);
      if (got !== strata) differ.push(`${word}: /${broad}/ regex [${got}] Strata [${strata}]`);
    }
    expect(entries.length).toBeGreaterThan(1300);
    expect(differ).toEqual([]);
  });

  test("the check can fail: a cascade that leaves out one rule differs on the sample", () => {
    // Dropping nasalisation (the last pass) must be caught by the comparison.
    const noNasal = (b: string): string => regexCascade(b).normalize("NFD").replace(/\u0303/g, "").normalize("NFC");
    let caught = 0;
    for (const [, arpa] of cmuEntries().filter((_, i) => i % 500 === 3)) {
      const { broad, strata } = both(arpabetToIpa(arpa));
      if (noNasal(broad) !== strata) caught++;
    }
    expect(caught).toBeGreaterThan(0);
  });
});

describe("the cascade one rule at a time (the three-format script's derivations)", () => {
  // Each prefix of the cascade is the en-us grammar cut to the same rules, so the form after each
  // step is what Strata's interpreter gives for that prefix.
  const prefixes = REGEX_RULES.map((_, k) => prepareGrammar(cutGrammar(v.grammar, REGEX_RULES.slice(0, k + 1)), v.inventory));
  test("the form after rule k is the interpreter's for the first k rules, on every 500th CMU entry", () => {
    const differ: string[] = [];
    const entries = cmuEntries().filter((_, i) => i % 500 === 7);
    for (const [word, arpa] of entries) {
      const w = wordOf(v, arpabetToIpa(arpa));
      const broad = ipa(applyGrammar(prosody, v.inventory, w).preferred);
      const steps = cascadeSteps(broad);
      expect(steps).toHaveLength(REGEX_RULES.length);
      expect(steps[steps.length - 1]).toBe(regexCascade(broad));
      prefixes.forEach((g, k) => {
        const want = ipa(applyGrammar(g, v.inventory, w).preferred);
        if (steps[k] !== want) differ.push(`${word} after ${REGEX_RULES[k]}: regex [${steps[k]}] Strata [${want}]`);
      });
    }
    expect(entries.length).toBeGreaterThan(250);
    expect(differ).toEqual([]);
  });
});
