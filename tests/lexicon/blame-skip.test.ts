// Per-step blame skips a step's run on a word the step cannot change, the variant trace skips
// merging paths a step left alone, and it starts where blame's walk stood when the variant screen
// first failed (MachineEngine.skipUnchanged, fst/untouched.ts, VariantTracer.trace). On random
// grammars (insertion, deletion, optional rules, syllabify, stress) and random words, the
// transcription with the shortcuts is the one without: same forms, steps, derivation, variants and
// each variant's steps; and the variants, the preferred variant's steps and every other variant's
// steps are the reference interpreter's. Where two paths meet in one word, both keep the steps of
// the path with fewer steps, then of the one whose steps come earlier; the preferred variant keeps
// its own path's steps.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { arbGrammar, arbInventory, arbWord } from "../support/arb-grammar.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { WORD_EDGE, type Word } from "../../src/interp/index.js";
import { parseGrammarText } from "../../src/grammar/index.js";
import type { Transcription } from "../../src/lexicon/engine.js";
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
  it("gives the variants, and the steps behind each, that the reference interpreter gives (property)", () => {
    let traced = 0;
    let credited = 0;
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
          expect(m.rules).toEqual(i.rules);
          expect(m.variantSteps[0]).toEqual(i.variantSteps[0]);
          // Each other variant's steps, by its text (where no two of the interpreter's words render alike).
          if (new Set(i.variants).size === i.variants.length) {
            const steps = new Map(i.variants.map((v, k) => [v, i.variantSteps[k]]));
            m.variants.forEach((v, k) => expect(m.variantSteps[k], `${symbols.join(" ")} → ${v}`).toEqual(steps.get(v)));
          }
          if (m.variants.length > 1) traced++;
          if (m.variantSteps.slice(1).some((st) => st.length > 0)) credited++;
        }
      }),
      { numRuns: 30, seed: fcSeed() },
    );
    // Words with several variants were traced, not only single ones.
    expect(traced).toBeGreaterThan(5);
    expect(credited).toBeGreaterThan(5);
  }, 120_000);
});

describe("steps credited, worked examples", () => {
  /** Both engines' transcription of the tiny inventory's symbols `word` under grammar text `text`. */
  const both = (text: string, word: readonly string[]): [Transcription, Transcription] => {
    const { grammar, diagnostics } = parseGrammarText(text, "example.strata");
    expect(diagnostics).toEqual([]);
    const { engine } = machineEngine(grammar, arbInventory, { maxVariants: 16 });
    const symbols: Word = word.map((s) => ({ kind: "segment", bundle: arbInventory.segments.find((x) => x.symbol === s)!.bundle }));
    return [engine!.transcribeWord(symbols)!, new InterpreterEngine(grammar, arbInventory, 16).transcribeWord(symbols)!];
  };

  it.each([["a", "i"], ["i", "a"]])("two paths meeting in one variant (%s, %s): the one with fewer steps, then the earlier ones", (x, y) => {
    // From 'n': r1 may give x, r2 may give y (both optional, unapplied when preferred), and r3 turns
    // y into x; so x is reached by [r1] and by [r2, r3], and is credited with [r1] whichever of the
    // two paths the search meets first (one of the two orders of x and y puts [r2, r3] first).
    const text = `rule r1 optional prefer unapplied:\n  n -> ${x}\n\nrule r2 optional prefer unapplied:\n  n -> ${y}\n\nrule r3:\n  ${y} -> ${x}\n`;
    for (const t of both(text, ["n"])) {
      expect(t.variants).toEqual(["n", x]);
      expect(t.rules).toEqual([]);
      expect(t.variantSteps).toEqual([[], ["r1"]]);
    }
  });

  it("two rules without context in a row: each change is credited to its own step", () => {
    // Each rule's machine has one state, so composing the two would also give one state: the
    // per-step compilation keeps them apart, or r2's change would be credited to r1.
    const text = "rule r1:\n  a -> i\n\nrule r2:\n  n -> d\n";
    for (const t of both(text, ["n", "a"])) {
      expect(t.rules).toEqual(["r1", "r2"]);
      expect(t.derivation.map((d) => d.step)).toEqual(["r1", "r2"]);
      expect(t.variantSteps).toEqual([["r1", "r2"]]);
    }
  });
});
