// Words in and out: the lexicon reader's stress convention (wordFromTokens) and the IPA writer
// with syllable and stress marks (symsToIpa), on the en-us inventory.

import { describe, expect, it } from "vitest";
import { loadInventory, tokenise } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { resolveClusters, symsToIpa, syllabify, wordFromTokens } from "../../src/interp/index.js";
import { clusters } from "../support/ast.js";
import type { Sym } from "../../src/interp/index.js";

const loaded = loadInventory("lexicons/en-us/segments.csv");
if (loaded.inventory === undefined) throw new Error(loaded.diagnostics.map((d) => d.message).join("\n"));
const en: Inventory = loaded.inventory;
const si = en.featureIndex.get("stress") as number;
const pi = en.featureIndex.get("primary") as number;

function read(ipa: string): Sym[] {
  const t = tokenise(en, ipa);
  if (!t.ok) throw new Error(t.error.message);
  return wordFromTokens(t.tokens, en);
}
// A few English onsets and codas, from memory (Kahn 1976).
const onsets = resolveClusters(clusters("b t n k s ɹ st tɹ stɹ"), en).list;
const codas = resolveClusters(clusters("n t k s"), en).list;
const prosody = (w: Sym[]): string[] => w.map((s) => (s.kind === "boundary" ? (s.which === "word" ? "#" : ".") : `${s.bundle[si]}${s.bundle[pi]}`));

describe("wordFromTokens", () => {
  it("brackets with #, drops '.', and puts marks on the next nucleus; other nuclei [-stress -primary]", () => {
    expect(prosody(read("ˈæs.tɹəˌnɔt"))).toEqual(["#", "++", "00", "00", "00", "--", "00", "+-", "00", "#"]);
  });
  it("leaves every nucleus [0stress 0primary] when the entry has no mark", () => {
    expect(prosody(read("bʌtn̩"))).toEqual(["#", "00", "00", "00", "00", "#"]);
  });
  it("puts # between the words of a phrase", () => {
    expect(prosody(read("ˈnu#ˈjɔɹk"))).toEqual(["#", "00", "++", "#", "00", "++", "00", "00", "#"]);
  });
});

describe("symsToIpa", () => {
  // IPA Handbook 1999 (from memory): the stress mark is written before the stressed syllable,
  // and then no '.' is needed there.
  it("writes ˈ/ˌ at the start of stressed syllables in place of '.', and '.' elsewhere", () => {
    const w = syllabify(read("æstɹənɔt"), null, null, en).word;
    expect(symsToIpa(w, en, { syllables: true })).toBe("æ.stɹə.nɔt");
    const marked = syllabify(read("ˈæstɹəˌnɔt"), null, null, en).word;
    expect(symsToIpa(marked, en, { syllables: true })).toBe("ˈæ.stɹəˌnɔt");
  });
  it("drops edge #, writes a space for an inner #, and round-trips through the tokeniser", () => {
    expect(symsToIpa(read("ˈnu#ˈjɔɹk"), en, { syllables: false })).toBe("ˈnu ˈjɔɹk");
    for (const t of ["ˈbʌ.tn̩", "kənˈstɹeɪn", "ˈɛk.stɹə", "ˌæ.stɹəˈnɔ.tɪk"]) {
      const tok = tokenise(en, t);
      if (!tok.ok) throw new Error(t);
      const w = syllabify(wordFromTokens(tok.tokens, en), onsets, codas, en).word;
      expect(symsToIpa(w, en, { syllables: true })).toBe(t);
    }
  });
});
