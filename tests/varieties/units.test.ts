// The pieces of the comparison of varieties on their own: which steps differ (added, edited, moved,
// fingerprints missing), the normalisation of narrow forms, and the hashing of homophone sets against
// a plain enumeration of all pairs on random small lexicons (fast-check; seed printed, fixed under CI).

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { homophonesHereOnly, normalForm } from "../../src/varieties/homophones.js";
import type { VarietyEntry } from "../../src/varieties/load.js";
import { stepDifference } from "../../src/varieties/steps.js";
import type { VarietyRecord } from "../../src/regress/record.js";
import { mergerPairsByEnumeration } from "./support.js";

const record = (name: string, steps: [string, string][], inventory = "inv"): VarietyRecord => ({
  name, lang: "en-US", grammar: { files: [] }, inventory: { sha256: inventory, files: [] }, steps: steps.map(([s]) => s), stepHashes: steps.map(([, h]) => h),
});

describe("steps that differ", () => {
  it("tells a step left out, an edited step and a moved step apart", () => {
    const a = record("a", [["syllabify", "1"], ["stress", "2"], ["dark", "7"], ["flap", "3"], ["aspirate", "4"], ["nasal", "5"], ["lateral", "8"]]);
    const b = record("b", [["syllabify", "1"], ["stress", "2"], ["aspirate", "4x"], ["nasal", "5"], ["lateral", "8"], ["dark", "7"], ["raise", "6"]]);
    const d = stepDifference(a, b);
    expect(d.a.map((s) => [s.step, s.change])).toEqual([["dark", "moved"], ["flap", "only-here"], ["aspirate", "edited"]]);
    expect(d.b.map((s) => [s.step, s.change])).toEqual([["aspirate", "edited"], ["dark", "moved"], ["raise", "only-here"]]);
    expect([d.fingerprints, d.inventoryDiffers]).toEqual([true, false]);
  });

  it("compares by name alone when a build has no fingerprints, and reports other inventories", () => {
    const a = { ...record("a", [["flap", "1"]]), stepHashes: undefined };
    const b = record("b", [["flap", "2"]], "other");
    const d = stepDifference(a, b);
    expect([d.a, d.b, d.fingerprints, d.inventoryDiffers]).toEqual([[], [], false, true]);
  });
});

describe("normal forms", () => {
  it("drop syllable breaks, joins and tie bars; keep stress, length, diacritics and the space between words", () => {
    // Stress is contrastive in English (ˈɪnsaɪt insight, ɪnˈsaɪt incite): common practice, no source.
    expect(normalForm("ˈɪn.saɪt")).not.toBe(normalForm("ɪn.ˈsaɪt"));
    expect(normalForm("ˈlæ.ɾɚ")).toBe(normalForm("ˈlæɾ.ɚ"));
    expect(normalForm("ˈlæː.ɾɚ")).not.toBe(normalForm("ˈlæ.ɾɚ"));
    expect(normalForm("ˈt͡ʃɪp")).toBe(normalForm("ˈtʃɪp"));
    expect(normalForm("ˈfʊt+bɔl")).toBe(normalForm("ˈfʊtbɔl"));
    expect(normalForm("ˈpʰɑɹk ˈweɪ")).not.toBe(normalForm("ˈpʰɑɹkˈweɪ"));
    expect(normalForm("e\u0301")).toBe(normalForm("\u00e9"));
  });
});

describe("homophone sets by hashing = by enumerating all pairs", () => {
  const entry = (key: string, broad: string, narrow: string): VarietyEntry => ({ key, word: key, broad, narrow, pron: broad, file: "x.csv", steps: [], forms: "" });
  // Small alphabets, so that homophones are frequent.
  const form = fc.array(fc.constantFrom("a", "b", ".", "ˈ"), { minLength: 1, maxLength: 3 }).map((x) => x.join(""));
  const lexicon = fc.array(fc.tuple(form, form, form), { maxLength: 14 });
  it("every pair the enumeration finds is in one set, in two groups; every set's pairs across groups are such pairs", () => {
    fc.assert(
      fc.property(lexicon, (rows) => {
        const here = new Map<string, VarietyEntry>(), there = new Map<string, VarietyEntry>();
        rows.forEach(([broad, n1, n2], i) => {
          here.set(`k${i}`, entry(`k${i}`, broad, n1));
          there.set(`k${i}`, entry(`k${i}`, broad, n2));
        });
        const sets = homophonesHereOnly([...here.keys()], here, there);
        const found = new Set<string>();
        for (const s of sets) {
          expect(s.groups.length).toBeGreaterThanOrEqual(2);
          s.groups.forEach((g1, i) => s.groups.slice(i + 1).forEach((g2) => {
            for (const x of g1.entries) for (const y of g2.entries) if (normalForm(x.broad) !== normalForm(y.broad)) found.add([x.key, y.key].sort().join("|"));
          }));
        }
        expect(found).toEqual(mergerPairsByEnumeration(here, there));
      }),
      { numRuns: 500 },
    );
  });
});
