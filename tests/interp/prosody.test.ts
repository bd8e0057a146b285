// Syllabification (Maximal Onset Principle within declared onsets and codas) and default stress,
// on real English words with the en-us inventory and on the tiny inventory, plus properties.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { loadInventory } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { assignStress, prepareGrammar, resolveClusters, syllabify, symsToIpa, wordKey } from "../../src/interp/index.js";
import type { Sym } from "../../src/interp/index.js";
import { tinyInventory } from "../support/tiny-inventory.js";
import { bun, clusters, grammar, seq, stressStep } from "../support/ast.js";
import { ipaOf, symsOf } from "../support/words.js";
import { arbWord } from "../support/arb-grammar.js";

const loaded = loadInventory("lexicons/en-us/segments.csv");
if (loaded.inventory === undefined) throw new Error(loaded.diagnostics.map((d) => d.message).join("\n"));
const en: Inventory = loaded.inventory;

// English onsets, from memory: Kahn 1976 and Selkirk 1984 (single consonants except ŋ; stop and
// fricative + liquid or glide, with tl dl θl excluded; s + voiceless stop or nasal; s + stop + liquid).
const EN_ONSETS = clusters(
  "p b t d k ɡ f v θ ð s z ʃ ʒ h t+ʃ d+ʒ m n l ɹ w j " +
  "pl bl kl ɡl fl sl pɹ bɹ tɹ dɹ kɹ ɡɹ fɹ θɹ ʃɹ pj bj kj ɡj mj fj vj hj tw dw kw ɡw sw θw " +
  "sp st sk sm sn spl skl spɹ stɹ skɹ skw",
);
// English codas, from memory (Selkirk 1984): singles except h w j, and the clusters needed here.
const EN_CODAS = clusters("p b t d k ɡ f v θ ð s z ʃ ʒ m n ŋ l ɹ mp nt nd ns ŋk ŋθ lp lt ld ɹt ɹd ɹn st kst ks ps ts");
const enOn = resolveClusters(EN_ONSETS, en).list;
const enCo = resolveClusters(EN_CODAS, en).list;

function syl(text: string): { ipa: string; lints: string[] } {
  const r = syllabify(symsOf(text, en), enOn, enCo, en);
  return { ipa: ipaOf(r.word, en), lints: r.problems.map((p) => `${p.code} ${p.message}`) };
}

describe("syllabification of English words by the Maximal Onset Principle", () => {
  it("declared clusters all read in the en-us inventory", () => {
    expect(resolveClusters(EN_ONSETS, en).unknown).toEqual([]);
    expect(resolveClusters(EN_CODAS, en).unknown).toEqual([]);
  });
  // From memory: Kahn 1976 and Selkirk 1984 — the onset takes the longest legal cluster.
  it("extra → ɛk.stɹə (k cannot begin an onset with stɹ)", () => expect(syl("ɛkstɹə")).toEqual({ ipa: "ɛk.stɹə", lints: [] }));
  it("astronaut → æ.stɹə.nɔt", () => expect(syl("æstɹənɔt")).toEqual({ ipa: "æ.stɹə.nɔt", lints: [] }));
  it("constrain → kən.stɹeɪn", () => expect(syl("kənstɹeɪn")).toEqual({ ipa: "kən.stɹeɪn", lints: [] }));
  it("athlete → æθ.lit (θl is not an English onset)", () => expect(syl("æθlit")).toEqual({ ipa: "æθ.lit", lints: [] }));
  it("singer → sɪŋ.ɚ (ŋ is never an onset, so the second syllable has none)", () => expect(syl("sɪŋɚ")).toEqual({ ipa: "sɪŋ.ɚ", lints: [] }));
  it("a diphthong is one nucleus and a syllabic consonant another: lighten → laɪ.tn̩ (t is a legal onset)", () => {
    expect(syl("laɪtn̩")).toEqual({ ipa: "laɪ.tn̩", lints: [] });
  });
  it("removes boundaries already there and puts them back (resyllabification)", () => {
    expect(syl("ɛks.tɹə")).toEqual({ ipa: "ɛk.stɹə", lints: [] });
  });
  it("keeps stress marks in place of '.' when writing", () => {
    const r = syllabify(symsOf("ˈæstɹəˌnɔt", en), enOn, enCo, en);
    expect(symsToIpa(r.word, en, { syllables: true })).toBe("ˈæ.stɹəˌnɔt");
    expect(symsToIpa(r.word, en, { syllables: false })).toBe("ˈæstɹəˌnɔt");
  });
  it("syllabifies each word of a phrase on its own", () => {
    expect(syl("ɛkstɹə#æstɹə").ipa).toBe("ɛk.stɹə æ.stɹə");
  });
});

describe("words the declared clusters cannot syllabify are reported, never a crash", () => {
  it("an illegal word-final coda is kept and reported with the cluster", () => {
    const r = syl("tɛkst");
    expect(r.ipa).toBe("tɛkst");
    expect(r.lints).toEqual([]); // kst is declared
    const bad = syl("tɛlkθ");
    expect(bad.ipa).toBe("tɛlkθ");
    expect(bad.lints).toEqual(["interp/illegal-coda word-final cluster is not a declared coda: 'lkθ'"]);
  });
  it("an illegal word-initial onset is kept and reported", () => {
    const r = syl("tlɪk");
    expect(r.ipa).toBe("tlɪk");
    expect(r.lints).toEqual(["interp/illegal-onset word-initial cluster is not a declared onset: 'tl'"]);
  });
  it("medially: the longest legal onset anyway, reporting the coda left behind", () => {
    const r = syl("ælkθɹə");
    expect(r.ipa).toBe("ælk.θɹə");
    expect(r.lints).toEqual(["interp/illegal-coda no legal split: the coda left by the longest legal onset is not declared: 'lk'"]);
  });
  it("medially, when no consonant starts a legal onset: before the last consonant", () => {
    // ŋ is not an onset and ŋŋ not a coda
    const r = syl("æŋŋə");
    expect(r.ipa).toBe("æŋ.ŋə");
    expect(r.lints).toHaveLength(1);
    expect(r.lints[0]).toMatch(/^interp\/no-legal-split .*'ŋŋ'$/);
  });
  it("a word without a nucleus gets no boundaries and a lint", () => {
    const r = syl("pst");
    expect(r.ipa).toBe("pst");
    expect(r.lints[0]).toMatch(/^interp\/no-nucleus/);
  });
});

describe("syllabification properties (tiny inventory)", () => {
  const on = resolveClusters(clusters("p t k b d n pn tn kn"), tinyInventory).list;
  const co = resolveClusters(clusters("p t k n nt"), tinyInventory).list;
  const nucleus = (s: Sym): boolean => s.kind === "segment" && s.bundle[0] === "+";
  it("every syllable has exactly one nucleus (words with one), and deleting '.' gives the input back", () => {
    fc.assert(
      fc.property(arbWord(tinyInventory, { dots: true, maxLength: 8 }), (w) => {
        const r = syllabify(w, on, co, tinyInventory);
        const undotted = (x: readonly Sym[]): string => wordKey(x.filter((s) => !(s.kind === "boundary" && s.which === "syllable")));
        expect(undotted(r.word)).toBe(undotted(w));
        // Split into syllables at '.' and '#'.
        let current: Sym[] = [];
        let wordHasNucleus = false;
        const words: { syllables: Sym[][]; nuclei: number }[] = [];
        let sylls: Sym[][] = [];
        for (const s of [...r.word]) {
          if (s.kind === "boundary") {
            sylls.push(current);
            current = [];
            if (s.which === "word") {
              words.push({ syllables: sylls.filter((x) => x.length > 0), nuclei: wordHasNucleus ? 1 : 0 });
              sylls = [];
              wordHasNucleus = false;
            }
          } else {
            current.push(s);
            if (nucleus(s)) wordHasNucleus = true;
          }
        }
        for (const word of words) {
          if (word.nuclei === 0) expect(word.syllables.length).toBeLessThanOrEqual(1);
          else for (const sy of word.syllables) expect(sy.filter(nucleus)).toHaveLength(1);
        }
      }),
      { numRuns: 300 },
    );
  });
  it("is idempotent", () => {
    fc.assert(
      fc.property(arbWord(tinyInventory, { dots: true }), (w) => {
        const once = syllabify(w, on, co, tinyInventory).word;
        expect(wordKey(syllabify(once, on, co, tinyInventory).word)).toBe(wordKey(once));
      }),
      { numRuns: 200 },
    );
  });
  it("with nothing declared, every consonant between nuclei goes to the onset", () => {
    expect(ipaOf(syllabify(symsOf("aptkina", tinyInventory), null, null, tinyInventory).word, tinyInventory)).toBe("a.ptki.na");
  });
});

describe("default stress", () => {
  const inv = tinyInventory;
  const heavy = prepareGrammar(grammar([stressStep("right", 2, 3)], { heavy: [seq(bun("+syllabic"), bun("-syllabic"))] }), inv);
  const heavyPats = heavy.steps[0]?.kind === "stress" ? heavy.steps[0].heavy : [];
  const stress = (text: string, edge: "left" | "right", position: number, otherwise: number | null = null): string =>
    ipaOf(assignStress(symsOf(text, inv), { edge, position, otherwise }, heavyPats, inv), inv);

  // From memory: the Latin stress rule (penult if heavy, else antepenult; W. S. Allen, Vox Latina) —
  // here "heavy" is a closed rhyme, V followed by a consonant in its syllable.
  it("weight-sensitive: the penult if heavy, else the antepenult", () => {
    expect(stress("pa.tan.ta", "right", 2, 3)).toBe("paˈtan.ta");
    expect(stress("pa.ta.ta", "right", 2, 3)).toBe("ˈpa.ta.ta");
    expect(stress("pa.ta.pa.ta", "right", 2, 3)).toBe("paˈta.pa.ta");
  });
  it("takes the nearest existing syllable in words too short for the position", () => {
    expect(stress("pa.ta", "right", 2, 3)).toBe("ˈpa.ta");
    expect(stress("pa", "right", 2, 3)).toBe("ˈpa");
    expect(stress("pa.ta", "left", 3)).toBe("paˈta");
  });
  it("fixed position from either edge", () => {
    expect(stress("pa.ta.ki", "left", 1)).toBe("ˈpa.ta.ki");
    expect(stress("pa.ta.ki", "left", 2)).toBe("paˈta.ki");
    expect(stress("pa.ta.ki", "right", 1)).toBe("pa.taˈki");
  });
  it("acts only on words whose nuclei are all unassigned; each word of a phrase on its own", () => {
    expect(stress("ˈpa.ta.ki", "right", 1)).toBe("ˈpa.ta.ki");
    expect(stress("pa.ta#ki.pa", "right", 1)).toBe("paˈta kiˈpa");
  });
  it("sets the others [-stress -primary]", () => {
    const w = assignStress(symsOf("pa.ta.ki", inv), { edge: "left", position: 1, otherwise: null }, [], inv);
    const prosody = w.filter((s) => s.kind === "segment" && s.bundle[0] === "+").map((s) => (s.kind === "segment" ? s.bundle.slice(5).join("") : ""));
    expect(prosody).toEqual(["++", "--", "--"]);
  });
});
