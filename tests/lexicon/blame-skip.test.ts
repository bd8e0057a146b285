// Per-step blame skips a step's run on a word the step cannot change, and the variant trace skips
// merging paths a step left alone (MachineEngine.skipUnchanged, fst/untouched.ts). On random
// grammars (insertion, deletion, optional rules, syllabify, stress) and random words, the
// transcription with the shortcuts is the one without: same forms, steps, derivation, variants and
// each variant's steps; and the variants are the reference interpreter's. (Which steps a variant
// is credited with when two paths meet in it is the trace's own rule, fewer steps then earlier
// ones; the interpreter may credit the other path, so steps are not compared with it here:
// tests/regress/derivation.test.ts compares them on real entries.)

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { arbGrammar, arbInventory, arbWord } from "../support/arb-grammar.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { WORD_EDGE } from "../../src/interp/index.js";
import { fcSeed } from "../support/fc-seed.js";

describe("blame's step skipping", () => {
  it("changes nothing in a transcription (property)", () => {
    let words = 0;
    let changed = 0;
    let several = 0;
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
          if ((got?.variants.length ?? 0) > 1) several++;
        }
      }),
      { numRuns: 60, seed: fcSeed() },
    );
    // The check saw words that steps changed, not only words left alone.
    expect(changed).toBeGreaterThan(20);
    expect(several).toBeGreaterThan(10);
    expect(words).toBeGreaterThan(100);
  }, 120_000);
});

describe("the variant trace", () => {
  it("gives the variants the reference interpreter gives (property)", () => {
    let traced = 0;
    fc.assert(
      fc.property(arbGrammar({ maxRules: 4 }), fc.array(arbWord(arbInventory, { maxLength: 5 }), { minLength: 1, maxLength: 12 }), ({ grammar }, ws) => {
        const { engine } = machineEngine(grammar, arbInventory, { maxVariants: 64 });
        if (engine === undefined) return;
        const interp = new InterpreterEngine(grammar, arbInventory, 64);
        for (const w of ws) {
          const symbols = w[0] === WORD_EDGE ? w.slice(1, -1) : w;
          const m = engine.transcribeWord(symbols);
          const i = interp.transcribeWord(symbols);
          if (m === undefined || i === undefined || m.capped === true || i.capped === true || m.ambiguous === true) continue;
          expect(new Set(m.variants)).toEqual(new Set(i.variants));
          if (m.variants.length > 1) traced++;
        }
      }),
      { numRuns: 30, seed: fcSeed() },
    );
    // Words with several variants were traced, not only single ones.
    expect(traced).toBeGreaterThan(5);
  }, 120_000);
});
