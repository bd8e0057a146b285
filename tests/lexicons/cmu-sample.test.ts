// Real-data run of the shipped grammars over a fixed sample of the CMU Pronouncing Dictionary
// (npm `cmu-pronouncing-dictionary`, ISC): what each rule promises must hold on every sampled word.

import { beforeAll, describe, expect, test } from "vitest";
import { isSegment, isSyllableEdge, isWordEdge, type Sym } from "../../src/interp/index.js";
import { arpabetToIpa, cmuEntries, derive, ipaOf, variety, type Variety } from "./harness.js";

/** Every 100th entry (1,352 words; the dictionary uses only the 39 phonemes of arpabet.csv). */
const SAMPLE = cmuEntries().filter((_, i) => i % 100 === 0);

interface Checked {
  readonly word: string;
  /** How many primary stresses (ARPAbet digit 1) the dictionary entry has. */
  readonly primaries: number;
  readonly outputs: readonly Sym[][];
  readonly lints: number;
}

function runSample(v: Variety): Checked[] {
  return SAMPLE.map(([word, arpa]) => {
    const run = derive(v, arpabetToIpa(arpa)).run;
    return { word, primaries: (arpa.split("#")[0]!.match(/1/g) ?? []).length, outputs: run.outputs, lints: run.lints.length };
  });
}

/** Feature test on a symbol: is it a segment whose feature `f` has value `v`? */
const has = (v: Variety, s: Sym | undefined, f: string, val: "+" | "-"): boolean =>
  s !== undefined && isSegment(s) && s.bundle[v.inventory.featureIndex.get(f)!] === val;

/** The symbols with the syllable boundaries left out (positions inside one word). */
const segmentsOnly = (w: readonly Sym[]): Sym[] => w.filter((s) => !isSyllableEdge(s));

describe("the casual grammar on a CMU sample", () => {
  const v = variety("grammar.strata");
  let results: Checked[] = [];
  beforeAll(() => {
    results = runSample(v);
  });

  test("every output is writable in IPA (no '?')", () => {
    const bad = results.flatMap((r) => r.outputs.map((o) => ipaOf(v, o)).filter((t) => t.includes("?")).map((t) => `${r.word} ${t}`));
    expect(bad).toEqual([]);
  });

  test("fewer than 2% of the words need a syllabification fallback (measured: about 0.6% of all CMU words)", () => {
    // The onset and coda lists come from Kahn 1976, Giegerich 1992, Hammond 1999 (from memory); the
    // words they do not cover are mostly foreign names in the CMU dictionary ("csaszar", "fahrenkopf").
    const linted = results.filter((r) => r.lints > 0).length;
    expect(linted / results.length).toBeLessThan(0.02);
  });

  test("no aspirated stop right after s (Ladefoged & Johnson ch. 3, from memory)", () => {
    const bad: string[] = [];
    let seen = 0;
    for (const r of results)
      for (const o of r.outputs) {
        o.forEach((s, i) => {
          if (has(v, s, "spread_glottis", "+") && has(v, s, "continuant", "-")) seen++;
          if (has(v, s, "spread_glottis", "+") && has(v, s, "continuant", "-") && has(v, o[i - 1], "strident", "+") && has(v, o[i - 1], "continuant", "+")) bad.push(`${r.word} ${ipaOf(v, o)}`);
        });
      }
    expect(seen).toBeGreaterThan(300);
    expect(bad).toEqual([]);
  });

  test("a flap is always followed by an unstressed nucleus (Kahn 1976, from memory)", () => {
    const bad: string[] = [];
    let seen = 0;
    for (const r of results)
      for (const o of r.outputs) {
        const w = segmentsOnly(o);
        w.forEach((s, i) => {
          if (!has(v, s, "tap", "+")) return;
          seen++;
          const next = w[i + 1];
          if (!has(v, next, "syllabic", "+") || !has(v, next, "stress", "-")) bad.push(`${r.word} ${ipaOf(v, o)}`);
        });
      }
    expect(seen).toBeGreaterThan(50);
    expect(bad).toEqual([]);
  });

  test("clear l only in onsets, dark ɫ only in codas or as a nucleus (Giegerich 1992 ch. 9, from memory)", () => {
    const bad: string[] = [];
    let dark = 0;
    for (const r of results)
      for (const o of r.outputs)
        o.forEach((s, i) => {
          if (!has(v, s, "lateral", "+")) return;
          if (has(v, s, "dorsal", "+")) dark++;
          const next = o[i + 1];
          const nextIsNucleus = has(v, next, "syllabic", "+");
          const isDark = has(v, s, "dorsal", "+");
          // clear l must be followed by the nucleus of its own syllable (nothing between: an onset l is last in its onset)
          if (!isDark && !nextIsNucleus) bad.push(`${r.word}: clear l in a coda: ${ipaOf(v, o)}`);
          // dark ɫ that is not itself syllabic never stands right before a nucleus of its own syllable
          if (isDark && has(v, s, "syllabic", "-") && nextIsNucleus) bad.push(`${r.word}: dark l in an onset: ${ipaOf(v, o)}`);
        });
    expect(dark).toBeGreaterThan(50);
    expect(bad).toEqual([]);
  });

  test("a nasalised vowel is always followed by a nasal consonant of its syllable, or by a nasal flap (Ladefoged & Johnson ch. 4, from memory)", () => {
    const bad: string[] = [];
    let seen = 0;
    for (const r of results)
      for (const o of r.outputs)
        o.forEach((s, i) => {
          if (has(v, s, "syllabic", "+") && has(v, s, "consonantal", "-") && has(v, s, "nasal", "+")) {
            seen++;
            const next = o[i + 1];
            const after = o[i + 2];
            // the nasal flap of "winter" ˈwɪ̃.ɾ̃ɚ starts the next syllable (lexicons/en-us/nasal-flap.strata)
            const nasalFlapNext = next !== undefined && isSyllableEdge(next) && has(v, after, "nasal", "+") && has(v, after, "tap", "+");
            if (!(has(v, next, "nasal", "+") && has(v, next, "syllabic", "-")) && !nasalFlapNext) bad.push(`${r.word} ${ipaOf(v, o)}`);
          }
        });
    expect(seen).toBeGreaterThan(300);
    expect(bad).toEqual([]);
  });

  test("no rule adds or loses a primary stress (as many as the dictionary entry marks)", () => {
    const bad = results.filter((r) => r.outputs.some((o) => o.filter((s) => has(v, s, "primary", "+")).length !== r.primaries)).map((r) => r.word);
    expect(bad).toEqual([]);
  });

  test("word edges are kept: each output starts and ends with #", () => {
    const bad = results.filter((r) => r.outputs.some((o) => !isWordEdge(o[0]!) || !isWordEdge(o[o.length - 1]!))).map((r) => r.word);
    expect(bad).toEqual([]);
  });
});

describe("the careful grammar on the same sample", () => {
  const v = variety("careful.strata");
  let results: Checked[] = [];
  beforeAll(() => {
    results = runSample(v);
  });

  test("has no flap and no glottal stop anywhere (they live only in reductions.strata)", () => {
    const bad: string[] = [];
    for (const r of results)
      for (const o of r.outputs) {
        const t = ipaOf(v, o);
        if (t.includes("ɾ") || t.includes("ʔ")) bad.push(`${r.word} ${t}`);
      }
    expect(bad).toEqual([]);
  });
});
