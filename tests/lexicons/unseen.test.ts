// Segments the inventory and its diacritics can write but no rule of the grammar makes (a voiceless
// nasal, a long unstressed vowel, a nasalised or labialised consonant written in the broad form):
// the machine engine accepts them (its alphabet is widened from the word) and gives exactly what
// the reference interpreter gives (issue: no `run/outside-alphabet` for a writable segment).

import { describe, expect, test } from "vitest";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { variety, wordOf } from "./harness.js";

describe("segments no rule makes, through the machine engine (en-us grammar)", () => {
  const v = variety("grammar.strata");
  const built = machineEngine(v.grammar, v.inventory, { blame: false });
  const machine = built.engine!;
  const oracle = new InterpreterEngine(v.grammar, v.inventory, 16, true);
  // Invented words; each has at least one segment outside the compiled alphabet.
  // The second word needs no new segment: the widened engine is reused, not rebuilt.
  const words = ["ˈsm̥oʊkʷiːn̥", "ˈkʷiːn̥"];

  test("the plain compiled alphabet lacks them", () => {
    expect(built.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    const outside = words.filter((w) => machine.encode(wordOf(v, w).slice(1, -1)) === undefined);
    expect(outside).toEqual(words);
  });

  test("the engine transcribes them as the interpreter does", () => {
    for (const w of words) {
      const symbols = wordOf(v, w).slice(1, -1);
      const got = machine.transcribeWord(symbols);
      const want = oracle.transcribeWord(symbols);
      expect(got, w).toBeDefined();
      expect({ narrow: got!.narrow, broad: got!.broad, variants: got!.variants }, w).toEqual({ narrow: want!.narrow, broad: want!.broad, variants: want!.variants });
    }
  });
});
