// The non-rhotic variety (lexicons/en-us-nonrhotic/grammar.strata: General American + the low-back merger +
// r dropping with linking r, approximating Eastern New England) on CMU Pronouncing Dictionary words,
// each fact with its source beside it, checked with the reference interpreter and through the real build.

import { beforeAll, describe, expect, test } from "vitest";
import { cmu, derive, grammarAt } from "./harness.js";
import { NON_RHOTIC, buildNarrow, type Row } from "./variety-build.js";

const nonRhotic = () => grammarAt(NON_RHOTIC);

/** [CMU headword or `#`-joined phrase, expected narrow form, source] */
type Fact = readonly [string, string, string];

const WELLS1 = "Wells 1982, Accents of English, vol. 1, R dropping (from memory)";
const BREAKING = "Wells 1982 vol. 1, pre-R breaking; Giegerich 1992 (from memory)";
const LINKING = "Wells 1982 vol. 1, linking r; Giegerich 1992 (from memory)";
const ENE = "Wells 1982 vol. 3, New England (from memory)";

const FACTS: readonly Fact[] = [
  // no /ɹ/ before a pause or a consonant; START is [aː] in Eastern New England
  ["car", "ˈkʰaː", ENE],
  ["card", "ˈkʰaːd", ENE],
  ["park", "ˈpʰaːk", ENE],
  // /ɹ/ kept before a vowel of the same word
  ["carry", "ˈkʰæ.ɹi", WELLS1],
  ["sorry", "ˈsɑ.ɹi", WELLS1],
  // NEAR, SQUARE, CURE: centring diphthongs
  ["near", "ˈnɪə", BREAKING],
  ["beer", "ˈbɪə", BREAKING],
  ["square", "ˈskwɛə", BREAKING],
  ["cure", "ˈkʰj̊ʊə", BREAKING],
  ["poor", "ˈpʰʊə", BREAKING],
  // NORTH/FORCE long ɔː; NURSE ɜː; lettER ə
  ["four", "ˈfɔː", WELLS1],
  ["horse", "ˈhɔːs", WELLS1],
  ["nurse", "ˈnɜːs", WELLS1],
  ["bird", "ˈbɜːd", WELLS1],
  ["better", "ˈbɛ.ɾə", WELLS1],
  // r-coloured vowel + vowel: the r is pronounced (inside the word)
  ["furry", "ˈfɜː.ɹi", LINKING],
  ["stirring", "ˈstɜː.ɹɪ̃ŋ", LINKING],
  // linking r across the words of a phrase; none before a consonant-initial word
  ["far#away", "ˈfaːɹ əˈweɪ", LINKING],
  ["better#off", "ˈbɛ.ɾəɹ ˈɑf", LINKING],
  ["far#too", "ˈfaː ˈtʰu", LINKING],
  // homophones of non-rhotic accents
  ["tuna", "ˈtʰu.nə", WELLS1],
  ["tuner", "ˈtʰu.nə", WELLS1],
  ["formally", "ˈfɔː.mə.li", WELLS1],
  ["formerly", "ˈfɔː.mə.li", WELLS1],
  // START stays apart from LOT (length and quality), THOUGHT merges with LOT
  ["cart", "ˈkʰaːt", ENE],
  ["cot", "ˈkʰɑt", ENE],
  ["caught", "ˈkʰɑt", ENE],
];

const broad = (entry: string): string => entry.split("#").map(cmu).join("#");

describe("the non-rhotic grammar", () => {
  test("loads without errors or warnings", () => {
    expect(nonRhotic().diagnostics).toEqual([]);
  });
});

describe("r dropping, pre-R breaking and linking r (reference interpreter)", () => {
  test.each(FACTS.map((f) => [...f]))("%s → %s (%s)", (entry, want) => {
    expect(derive(nonRhotic(), broad(entry)).preferred).toBe(want);
  });
  test("intrusive r is an optional variant, not the preferred form", () => {
    // Wells 1982 vol. 1 and vol. 3, New England (from memory): "idea of" with an intrusive r in casual speech
    // ("of" as its weak form /əv/, as phrases of the demo lexicon write function words)
    const r = derive(nonRhotic(), cmu("idea") + "#əv");
    expect(r.preferred).toBe("aɪˈdi.ə əv");
    expect(r.all).toEqual(["aɪˈdi.ə əv", "aɪˈdi.əɹ əv"]);
  });
  test("father and farther: homophones in the accent, not here (the base does not tell PALM from LOT)", () => {
    // Wells 1982 vol. 3, New England (from memory): father = farther [ˈfaːðə]. The General American base
    // writes PALM ("father") with the LOT vowel ɑ, so only farther gets the START vowel; README, "Left out".
    // (Both are long: the base lengthens the vowel before the voiced ð.)
    expect(derive(nonRhotic(), cmu("farther")).preferred).toBe("ˈfaː.ðə");
    expect(derive(nonRhotic(), cmu("father")).preferred).toBe("ˈfɑː.ðə");
  });
});

describe("through the real build", () => {
  let built: Map<string, string>;
  beforeAll(async () => {
    const rows: Row[] = FACTS.map(([entry], i) => ({ id: `n${i}`, word: entry.replace("#", " "), pron: broad(entry) }));
    built = await buildNarrow(NON_RHOTIC, "non-rhotic", rows);
  }, 240_000);
  test("every fact holds in the built lexicon.tsv", () => {
    // the sources of each row are in the table above
    expect(FACTS.map(([entry], i) => [entry, built.get(`n${i}`)])).toEqual(FACTS.map(([entry, want]) => [entry, want]));
  });
});
