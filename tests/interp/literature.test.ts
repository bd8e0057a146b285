// Worked examples of rule ordering and application from the phonological literature, run through
// the reference interpreter; each names its source beside it.

import { describe, expect, it } from "vitest";
import { loadInventory } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { parseGrammarText } from "../../src/grammar/index.js";
import type { Grammar } from "../../src/grammar/ast.js";
import { applyGrammar, wordKey } from "../../src/interp/index.js";
import type { Sym } from "../../src/interp/index.js";
import { tinyInventory } from "../support/tiny-inventory.js";
import { ipaOf, symsOf } from "../support/words.js";

const loaded = loadInventory("lexicons/en-us/segments.csv");
if (loaded.inventory === undefined) throw new Error(loaded.diagnostics.map((d) => d.message).join("\n"));
const en: Inventory = loaded.inventory;

function parse(text: string): Grammar {
  const r = parseGrammarText(text, "example.strata");
  const errors = r.diagnostics.filter((d) => d.severity === "error");
  if (errors.length > 0) throw new Error(errors.map((d) => `${d.line}:${d.column} ${d.message}`).join("\n"));
  return r.grammar;
}

function run(g: Grammar, inv: Inventory, text: string): Sym[] {
  const r = applyGrammar(g, inv, symsOf(text, inv));
  expect(r.diagnostics).toEqual([]);
  expect(r.outputs).toHaveLength(1);
  return r.outputs[0] as Sym[];
}

describe("writer / rider: raising before flapping (counterbleeding order)", () => {
  // From memory: Joos 1942 ("A phonological dilemma in Canadian English") and Chambers 1973
  // (Canadian Raising): the diphthong raises before a voiceless consonant, and flapping later
  // makes t and d alike, so "writer" and "rider" differ only in the vowel. In the other order
  // flapping bleeds raising (the flap is voiced) and the two words come out the same.
  const rules = {
    raising: "rule raising:\n  aɪ -> [-low] / _ [-voice -syllabic]\n",
    flapping: "rule flapping:\n  AlveolarStop -> ɾ / [+syllabic] _ [+syllabic -stress]\n",
  };
  const head = "class AlveolarStop = t d\n";
  const counterbleeding = parse(head + rules.raising + rules.flapping);
  const bleeding = parse(head + rules.flapping + rules.raising);
  const low = en.featureIndex.get("low") as number;
  const vowelLow = (w: Sym[]): string => {
    const v = w.find((s) => s.kind === "segment" && s.bundle[0] === "+");
    return v?.kind === "segment" ? (v.bundle[low] as string) : "?";
  };
  const flapOf = (w: Sym[]): string => ipaOf(w, en).replace(/[^ɾtd]/g, "");

  it("raising then flapping: both flap, only 'writer' has the raised vowel", () => {
    const writer = run(counterbleeding, en, "ˈɹaɪtɚ");
    const rider = run(counterbleeding, en, "ˈɹaɪdɚ");
    expect(flapOf(writer)).toBe("ɾ");
    expect(flapOf(rider)).toBe("ɾ");
    expect(vowelLow(writer)).toBe("-");
    expect(vowelLow(rider)).toBe("+");
    expect(wordKey(writer)).not.toBe(wordKey(rider));
  });
  it("flapping then raising: the flap bleeds raising and the words merge", () => {
    const writer = run(bleeding, en, "ˈɹaɪtɚ");
    const rider = run(bleeding, en, "ˈɹaɪdɚ");
    expect(ipaOf(writer, en)).toBe("ˈɹaɪɾɚ");
    expect(wordKey(writer)).toBe(wordKey(rider));
  });
  it("raising still applies where no flap follows ('write' vs 'ride')", () => {
    expect(vowelLow(run(counterbleeding, en, "ˈɹaɪt"))).toBe("-");
    expect(vowelLow(run(counterbleeding, en, "ˈɹaɪd"))).toBe("+");
  });
});

describe("feeding, bleeding and their counter-orders", () => {
  // From memory: Kiparsky 1968 ("Linguistic universals and linguistic change") names the four
  // orders: A feeds B when A creates inputs to B; A bleeds B when A removes them; the reverse
  // orders are counterfeeding and counterbleeding. Abstract rules over the tiny inventory.
  const raise = "rule raise:\n  a -> i / _ t\n";
  const voiceAfterI = "rule voice:\n  t -> d / i _\n";
  it("feeding: raising creates the i that voicing needs", () => {
    expect(ipaOf(run(parse(raise + voiceAfterI), tinyInventory, "pat"), tinyInventory)).toBe("pid");
  });
  it("counterfeeding: in the other order voicing has already passed", () => {
    expect(ipaOf(run(parse(voiceAfterI + raise), tinyInventory, "pat"), tinyInventory)).toBe("pit");
  });
  const apocope = "rule apocope:\n  a -> ∅ / [-syllabic] _ #\n";
  const voiceBeforeA = "rule voice:\n  t -> d / _ a\n";
  it("bleeding: dropping the final vowel removes the context of voicing", () => {
    expect(ipaOf(run(parse(apocope + voiceBeforeA), tinyInventory, "pita"), tinyInventory)).toBe("pit");
  });
  it("counterbleeding: voicing applies first, then the vowel goes anyway", () => {
    expect(ipaOf(run(parse(voiceBeforeA + apocope), tinyInventory, "pita"), tinyInventory)).toBe("pid");
  });
});

describe("simultaneous versus iterative application", () => {
  // From memory: Johnson 1972 and Kaplan & Kay 1994 — a rule whose output creates new contexts
  // applies once per input site when simultaneous, but iterates when applied directionally;
  // a self-bleeding rule applied left to right gives the alternating "every other one" pattern.
  const alt = (mode: string) => parse(`rule alternate ${mode}:\n  a -> i / a _\n`);
  it("simultaneous: every a after an a in the input changes", () => {
    expect(ipaOf(run(alt("simultaneous"), tinyInventory, "aaaa"), tinyInventory)).toBe("aiii");
  });
  it("left-to-right: a changed vowel no longer conditions the next, so the change alternates", () => {
    expect(ipaOf(run(alt("left-to-right"), tinyInventory, "aaaa"), tinyInventory)).toBe("aiai");
  });
  it("right-to-left: the right context is read from the output, here the same as simultaneous", () => {
    expect(ipaOf(run(alt("right-to-left"), tinyInventory, "aaaa"), tinyInventory)).toBe("aiii");
  });
});

describe("variants through a grammar", () => {
  it("an optional rule gives every variant, keeps the preferred one, and names who changed what", () => {
    const g = parse("rule lenite optional prefer unapplied:\n  t -> d / a _ a\nrule raise:\n  a -> i / _ #\n");
    const r = applyGrammar(g, tinyInventory, symsOf("atata", tinyInventory));
    expect(r.outputs.map((w) => ipaOf(w, tinyInventory)).sort()).toEqual(["adadi", "adati", "atadi", "atati"]);
    expect(ipaOf(r.preferred, tinyInventory)).toBe("atati");
    expect(r.trace).toEqual([{ step: "lenite", changed: true }, { step: "raise", changed: true }]);
    const byIpa = new Map(r.variants.map((v) => [ipaOf(v.word, tinyInventory), v.changedBy]));
    expect(byIpa.get("atati")).toEqual(["raise"]);
    expect(byIpa.get("adadi")).toEqual(["lenite", "raise"]);
    expect(r.capped).toBe(false);
  });
  it("caps the variants, keeping the preferred one, and says so", () => {
    const g = parse("rule lenite optional prefer unapplied:\n  t -> d\n");
    const r = applyGrammar(g, tinyInventory, symsOf("tttttt", tinyInventory), { maxVariants: 5 });
    expect(r.outputs).toHaveLength(5);
    expect(r.capped).toBe(true);
    expect(r.outputs.map(wordKey)).toContain(wordKey(r.preferred));
    expect(ipaOf(r.preferred, tinyInventory)).toBe("tttttt");
  });
});
