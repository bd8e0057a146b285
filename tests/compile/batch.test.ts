// The batch run loop (typed arrays, many entries per call) against the one-entry run, on real
// words through the compiled en-us grammar and on random symbol strings (rejections included).

import fc from "fast-check";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { compileGrammar } from "../../src/compile/index.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { WORD_EDGE } from "../../src/interp/index.js";

const ROOT = resolve(__dirname, "../..");

describe("PreferredRunner.runBatch = run, entry by entry", () => {
  const g = loadGrammar(join(ROOT, "lexicons", "en-us", "grammar.strata"));
  if (g.grammar === undefined || g.inventory === undefined) throw new Error("en-us grammar does not load");
  const small = compileGrammar(g.grammar, g.inventory, { maxStates: 1 });
  const whole = compileGrammar(g.grammar, g.inventory);
  if (small.compiled === null || whole.compiled === null) throw new Error("en-us grammar does not compile");

  const pack = (words: readonly (readonly number[])[]) => {
    const at = new Int32Array(words.length + 1);
    words.forEach((w, i) => (at[i + 1] = at[i]! + w.length));
    const ids = new Int32Array(at[words.length]!);
    words.forEach((w, i) => ids.set(w, at[i]!));
    return { ids, at };
  };
  const check = (words: readonly (readonly number[])[]) => {
    for (const c of [whole.compiled!, small.compiled!]) {
      const { ids, at } = pack(words);
      const r = c.preferred.runBatch(ids, at);
      words.forEach((w, e) => {
        const one: number[] = [];
        const accepted = c.preferred.run(w, one);
        expect(r.ok[e]).toBe(accepted ? 1 : 0);
        expect(Array.from(r.out.subarray(r.outAt[e]!, r.outAt[e + 1]!))).toEqual(accepted ? one : []);
      });
    }
  };

  it("on every entry of the demo lexicon (one block, and one block per step)", async () => {
    const words: number[][] = [];
    for await (const item of readLexicon(join(ROOT, "lexicons", "demo", "lexicon.csv"), { inventory: g.inventory! })) {
      if (item.kind !== "row") continue;
      const ids = whole.compiled!.encode([WORD_EDGE, ...item.symbols, WORD_EDGE]);
      if (ids !== null) words.push(ids);
    }
    expect(words.length).toBeGreaterThan(300);
    check(words);
  });

  it("on random symbol strings, accepted or not", () => {
    const size = whole.compiled!.alphabet.size;
    fc.assert(
      fc.property(fc.array(fc.array(fc.integer({ min: 0, max: size + 2 }), { maxLength: 9 }).map((w) => [1, ...w, 1]), { maxLength: 30 }), (words) => {
        check(words);
      }),
      { numRuns: 150 },
    );
  });
});
