// Per-step blame skips a step's run on a word the step cannot change (MachineEngine.skipUnchanged,
// fst/untouched.ts). On random grammars (insertion, deletion, optional rules, syllabify, stress)
// and random words, the transcription with skipping is the one without: same forms, steps,
// derivation and variants.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { arbGrammar, arbInventory, arbWord } from "../support/arb-grammar.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { WORD_EDGE } from "../../src/interp/index.js";
import { fcSeed } from "../support/fc-seed.js";

describe("blame's step skipping", () => {
  it("changes nothing in a transcription (property)", () => {
    let words = 0;
    let changed = 0;
    fc.assert(
      fc.property(arbGrammar({ maxRules: 4 }), fc.array(arbWord(arbInventory, { maxLength: 5 }), { minLength: 1, maxLength: 12 }), ({ grammar }, ws) => {
        const { engine } = machineEngine(grammar, arbInventory, { maxVariants: 8 });
        const { engine: plain } = machineEngine(grammar, arbInventory, { maxVariants: 8 });
        if (engine === undefined || plain === undefined) return;
        plain.skipUnchanged = false;
        for (const w of ws) {
          const symbols = w[0] === WORD_EDGE ? w.slice(1, -1) : w;
          const got = engine.transcribeWord(symbols);
          expect(got).toEqual(plain.transcribeWord(symbols));
          words++;
          if ((got?.rules.length ?? 0) > 0) changed++;
        }
      }),
      { numRuns: 60, seed: fcSeed() },
    );
    // The check saw words that steps changed, not only words left alone.
    expect(changed).toBeGreaterThan(20);
    expect(words).toBeGreaterThan(100);
  }, 120_000);
});
