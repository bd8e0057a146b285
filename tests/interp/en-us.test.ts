// The reference interpreter on the shipped en-us grammar and real words of the open CMU
// Pronouncing Dictionary: it runs every word without failing, and a few outcomes of the trade hold.

import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadGrammar } from "../../src/grammar/index.js";
import { tokenise } from "../../src/inventory/index.js";
import { convertArpabet, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { WORD_EDGE, applyGrammar, prepareGrammar, symsToIpa, wordFromTokens } from "../../src/interp/index.js";

const loaded = loadGrammar("lexicons/en-us/grammar.strata");
const table = loadArpabetTable().table;

describe("en-us grammar × CMU Pronouncing Dictionary words (interpreter only)", () => {
  it("loads", () => {
    expect(loaded.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(loaded.grammar).toBeDefined();
    expect(table).toBeDefined();
  });
  const grammar = loaded.grammar;
  const inv = loaded.inventory;
  if (grammar === undefined || inv === undefined || table === undefined) return;
  const prepared = prepareGrammar(grammar, inv);
  const narrow = (arpabet: string): string => {
    const c = convertArpabet(arpabet, table);
    if (!c.ok) throw new Error(c.reason);
    const t = tokenise(inv, c.pron);
    if (!t.ok) throw new Error(t.error.message);
    const r = applyGrammar(prepared, inv, wordFromTokens(t.tokens, inv));
    return symsToIpa(r.preferred, inv, { syllables: true });
  };

  it("resolves every rule of the grammar", () => {
    expect(prepared.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  });

  it("runs a deterministic sample of 400 dictionary words without failing; every output is bracketed and writable", () => {
    // The open CMU Pronouncing Dictionary (npm cmu-pronouncing-dictionary): every 300th entry.
    const entries = Object.entries(dictionary as Record<string, string>).filter((_, i) => i % 300 === 0).slice(0, 400);
    let lints = 0;
    for (const [word, arpabet] of entries) {
      const c = convertArpabet(arpabet, table);
      if (!c.ok) continue;
      const t = tokenise(inv, c.pron);
      expect(t.ok, word).toBe(true);
      if (!t.ok) continue;
      const r = applyGrammar(prepared, inv, wordFromTokens(t.tokens, inv));
      lints += r.lints.length;
      expect(r.outputs.length, word).toBeGreaterThan(0);
      for (const o of r.outputs) {
        expect(symsToIpa(o, inv, { syllables: true }), word).not.toContain("?");
        expect([o[0], o[o.length - 1]], word).toEqual([WORD_EDGE, WORD_EDGE]);
      }
    }
    // Most real words syllabify under the declared clusters.
    expect(lints).toBeLessThan(entries.length / 10);
  });

  // Common practice, no source: General American aspirates voiceless stops at the start of a
  // stressed syllable and not after s.
  it("aspirates the p of 'pin' but not of 'spin'", () => {
    expect(narrow("P IH1 N")).toContain("pʰ");
    expect(narrow("S P IH1 N")).not.toContain("pʰ");
  });

  // From memory: Ladefoged & Johnson, A Course in Phonetics, ch. 3 — t flaps between a vowel and
  // an unstressed vowel in American English; and Kahn 1976 (from memory) for the syllable breaks.
  it("flaps the t of 'butter' and syllabifies 'astronaut' and 'constrain' by maximal onsets", () => {
    expect(narrow("B AH1 T ER0")).toBe("ˈbʌ.ɾɚ");
    expect(narrow("AE1 S T R AH0 N AO2 T")).toBe("ˈæ.stɹəˌnɔt");
    expect(narrow("K AH0 N S T R EY1 N").normalize("NFD").replace(/[\u0303ʰ]/gu, "")).toBe("kənˈstɹeɪn");
  });
});
