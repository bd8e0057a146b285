// The Canadian variety (lexicons/en-ca/grammar.strata: General American + Canadian raising + the
// low-back merger) on CMU Pronouncing Dictionary words, each fact with its source beside it, checked
// with the reference interpreter and through the real `strata build`.

import { beforeAll, describe, expect, test } from "vitest";
import { analyseInteractions, RELATIONS } from "../../src/analyze/interactions.js";
import { cmu, derive, grammarAt, variety } from "./harness.js";
import { CANADIAN, buildNarrow, type Row } from "./variety-build.js";

const canadian = () => grammarAt(CANADIAN);

/** [CMU headword or `#`-joined phrase, expected narrow form, source] */
type Fact = readonly [string, string, string];

const JOOS = "Joos 1942 (from memory)";
const CHAMBERS = "Chambers 1973 (from memory)";
const ANAE = "Labov, Ash & Boberg 2006, Atlas of North American English, Canada (from memory)";

const RAISING: readonly Fact[] = [
  // writer vs rider: raising before the /t/ that later flaps (counterbleeding), none before /d/
  ["writer", "ˈɹʌɪ.ɾɚ", JOOS],
  ["rider", "ˈɹaːɪ.ɾɚ", JOOS],
  // type vs tide; knife vs knives; house (noun) vs housing; out, about vs loud
  ["type", "ˈtʰʌɪp", CHAMBERS],
  ["tide", "ˈtʰaːɪd", CHAMBERS],
  ["knife", "ˈnʌɪf", CHAMBERS],
  ["knives", "ˈnaːɪvz", CHAMBERS],
  ["house", "ˈhʌʊs", CHAMBERS],
  ["housing", "ˈhaːʊ.zɪ̃ŋ", CHAMBERS],
  ["about", "əˈbʌʊt", CHAMBERS],
  ["loud", "ˈlaːʊd", CHAMBERS],
  ["ice", "ˈʌɪs", CHAMBERS],
  ["eyes", "ˈaːɪz", CHAMBERS],
  // the raised vowel survives flapping in a derived form too ("fighting" vs "hiding")
  ["fighting", "ˈfʌɪ.ɾɪ̃ŋ", CHAMBERS],
  ["hiding", "ˈhaːɪ.ɾɪ̃ŋ", CHAMBERS],
  // not before a voiced consonant or at the end of the word
  ["high", "ˈhaɪ", CHAMBERS],
  ["how", "ˈhaʊ", CHAMBERS],
];

const MERGER: readonly Fact[] = [
  // THOUGHT = LOT: caught = cot, dawn = Don
  ["caught", "ˈkʰɑt", ANAE],
  ["cot", "ˈkʰɑt", ANAE],
  ["dawn", "ˈdɑ̃n", ANAE],
  ["don", "ˈdɑ̃n", ANAE],
  // not before r (NORTH/FORCE), not the diphthong of CHOICE
  ["story", "ˈstɔ.ɹi", ANAE],
  ["four", "ˈfɔɹ", ANAE],
  ["boy", "ˈbɔɪ", ANAE],
];

/** Words of a phrase are not one word: raising stays inside the word ("high school"). */
const PHRASE: Fact = ["high#school", "ˈhaɪ ˈskuɫ", CHAMBERS];

const broad = (entry: string): string => entry.split("#").map(cmu).join("#");

describe("the Canadian grammar", () => {
  test("loads without errors or warnings, with raising and the merger before flapping", () => {
    expect(canadian().diagnostics).toEqual([]);
    const steps = canadian().grammar.steps.map((s) => s.name);
    // Joos 1942; Chambers 1973 (from memory): raising precedes flapping
    expect(steps.indexOf("canadian-raising")).toBeLessThan(steps.indexOf("flapping"));
    expect(steps.indexOf("canadian-raising")).toBeGreaterThan(-1);
    // every other step is General American's, in its order
    expect(steps.filter((s) => s !== "canadian-raising" && s !== "low-back-merger")).toEqual(variety("grammar.strata").grammar.steps.map((s) => s.name));
  });
});

describe.each([
  ["Canadian raising", RAISING],
  ["the low-back merger", MERGER],
  ["words of a phrase", [PHRASE]],
])("%s (reference interpreter)", (_, facts) => {
  test.each(facts.map((f) => [...f]))("%s → %s (%s)", (entry, want) => {
    expect(derive(canadian(), broad(entry)).preferred).toBe(want);
  });
});

describe("through the real build", () => {
  const facts = [...RAISING, ...MERGER, PHRASE];
  let built: Map<string, string>;
  beforeAll(async () => {
    const rows: Row[] = facts.map(([entry], i) => ({ id: `c${i}`, word: entry.replace("#", " "), pron: broad(entry) }));
    built = await buildNarrow(CANADIAN, "canadian", rows);
  }, 240_000);
  test("every fact holds in the built lexicon.tsv", () => {
    // the sources of each row are in the tables above
    expect(facts.map(([entry], i) => [entry, built.get(`c${i}`)])).toEqual(facts.map(([entry, want]) => [entry, want]));
  });
  test("writer and rider stay apart; caught and cot merge (the pairs a comparison of varieties lists)", () => {
    const at = (entry: string): string | undefined => built.get(`c${facts.findIndex(([e]) => e === entry)}`);
    // Joos 1942 (from memory): in General American writer and rider differ only in length; here also in the nucleus
    expect(at("writer")).not.toBe(at("rider"));
    // Labov, Ash & Boberg 2006 (from memory): the low-back merger makes caught and cot homophones
    expect(at("caught")).toBe(at("cot"));
  });
});

describe("the exact interaction analysis of the Canadian grammar (strata interactions)", () => {
  test("raising counterbleeds flapping and the glottal stop; the merger interacts with nothing", () => {
    const v = canadian();
    const r = analyseInteractions(v.grammar, v.inventory);
    expect(r.diagnostics).toEqual([]);
    const name = (i: number): string => r.report!.steps[i]!.name;
    const ours = (i: number): boolean => name(i) === "canadian-raising" || name(i) === "low-back-merger";
    const involving = r.report!.pairs
      .filter((p) => ours(p.a) || ours(p.b))
      .flatMap((p) => RELATIONS.filter((k) => p.relations[k].decided && p.relations[k].value !== null).map((k) => [name(p.a), k, name(p.b)]));
    // every pair decided (no analysis gave up on a limit)
    expect(r.report!.pairs.filter((p) => (ours(p.a) || ours(p.b)) && RELATIONS.some((k) => !p.relations[k].decided))).toEqual([]);
    // Joos 1942; Chambers 1973 (from memory): the raised vowel survives the flap ("writer") and, by the
    // same order, the glottal stop before syllabic n ("frighten")
    expect(involving).toEqual([
      ["canadian-raising", "counterbleeds", "flapping"],
      ["canadian-raising", "counterbleeds", "glottal-stop"],
    ]);
  }, 600_000);
});
