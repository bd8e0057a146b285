// The careful-speech variety (lexicons/en-us/careful.strata): the shared rules without the /t d/
// reductions; it must differ from the casual grammar exactly where flapping or glottalisation apply.

import { describe, expect, test } from "vitest";
import { cmu, derive, variety } from "./harness.js";

const careful = () => variety("careful.strata");
const general = () => variety("grammar.strata");
const narrow = (word: string): string => derive(careful(), cmu(word)).preferred;

describe("careful speech", () => {
  test("loads without errors or warnings, and shares every step of the casual grammar but the reductions", () => {
    expect(careful().diagnostics).toEqual([]);
    const casualSteps = general().grammar.steps.map((s) => s.name);
    const carefulSteps = careful().grammar.steps.map((s) => s.name);
    const reductions = ["flapping", "glottal-stop", "nasal-flap", "nasal-flap-merger"];
    expect(carefulSteps).toEqual(casualSteps.filter((n) => !reductions.includes(n)));
  });

  test("no flap: t and d stay stops between vowels", () => {
    // Common practice, no source: careful (read) General American keeps t in "water", d in "rider"
    expect(narrow("water")).toBe("ˈwɔ.tɚ");
    expect(narrow("rider")).toBe("ˈɹaːɪ.dɚ");
    // and writer/rider stay distinct
    expect(narrow("writer")).not.toBe(narrow("rider"));
  });

  test("no glottal stop: button has one form, with syllabic n", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): careful "button" bʌtn̩ with a nasally released t
    expect(derive(careful(), cmu("button")).all).toEqual(["ˈbʌ.tn̩"]);
  });

  test("syllabic l stays optional", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "bottle" bɑtɫ̩, or with schwa
    expect(derive(careful(), cmu("bottle")).all).toEqual(["ˈbɑ.təɫ", "ˈbɑ.tɫ̩"]);
  });

  test("the shared coarticulation rules still apply", () => {
    // Kahn 1976; Ladefoged & Johnson, ch. 3 (from memory): aspiration, devoicing, nasalisation, dental t
    expect(narrow("play")).toBe("ˈpʰl̥eɪ");
    expect(narrow("tenth")).toBe("ˈtʰɛ̃n̪θ");
    expect(narrow("spin")).toBe("ˈspɪ̃n");
    expect(narrow("feel")).toBe("ˈfiɫ");
  });

  test("words with no flap or glottal-stop site come out the same in both varieties", () => {
    // Follows from the file split (careful = common + coarticulation): no rule differs but the two dropped
    for (const w of ["plastic", "constrain", "extra", "milk", "twin", "bead", "eighth", "many"]) {
      expect(narrow(w), w).toBe(derive(general(), cmu(w)).preferred);
    }
  });
});
