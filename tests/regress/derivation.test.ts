// Derivations in the build: the compiled one-step-per-block runners (what `strata build` records)
// against the reference interpreter run step by step and against its own per-variant trace
// (`applyGrammar`'s changedBy), on every demo entry and a slice of the CMU dictionary; entry keys.

import { join, resolve } from "node:path";
import { tmpdir } from "node:os";
import { describe, expect, it } from "vitest";
import { loadEngine } from "../../src/cli/common.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { EntryKeys } from "../../src/lexicon/keys.js";
import { applyGrammar, WORD_EDGE, wordKey, symsToIpa } from "../../src/interp/index.js";
import { cmuSliceCsv } from "./support.js";

const ROOT = resolve(__dirname, "../..");
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");

async function compareOn(grammarFile: string, lexicon: string): Promise<number> {
  const loaded = loadEngine(join(ROOT, "lexicons", "en-us", grammarFile), { cacheDir: SHARED_CACHE });
  if (!("engine" in loaded)) throw new Error(JSON.stringify(loaded.diagnostics));
  const interp = new InterpreterEngine(loaded.grammar, loaded.inventory);
  let n = 0;
  for await (const item of readLexicon(lexicon, { inventory: loaded.inventory })) {
    if (item.kind !== "row") continue;
    const m = loaded.engine.transcribeWord(item.symbols)!;
    const i = interp.transcribeWord(item.symbols)!;
    // The preferred derivation: steps and forms, step by step.
    expect(m.derivation, item.word).toEqual(i.derivation);
    expect(m.rules).toEqual(m.derivation.map((d) => d.step));
    if (m.derivation.length > 0) expect(m.derivation.at(-1)!.form).toBe(m.narrow);
    // The interpreter's own trace of the whole grammar agrees on the steps of the preferred variant.
    const run = applyGrammar(loaded.grammar, loaded.inventory, [WORD_EDGE, ...item.symbols, WORD_EDGE]);
    const pref = run.variants.find((v) => wordKey(v.word) === wordKey(run.preferred))!;
    expect(m.rules).toEqual(run.preferredChangedBy);
    expect(m.variantSteps[0]).toEqual(run.preferredChangedBy);
    // Every other variant's steps, by variant text (where paths meet, both keep the one with fewer steps, then earlier ones).
    const traced = new Map(run.variants.map((v) => [symsToIpa(v.word, loaded.inventory, { syllables: true }), v.changedBy]));
    m.variants.forEach((v, k) => k > 0 && expect(m.variantSteps[k], `${item.word} ${v}`).toEqual(traced.get(v)));
    if (m.variants.length === 1) expect(pref.changedBy).toEqual(run.preferredChangedBy);
    n++;
  }
  return n;
}

describe("derivations recorded by the build", () => {
  it.each(["grammar.strata", "careful.strata"])("%s: machine and interpreter agree on every demo entry", async (g) => {
    expect(await compareOn(g, join(ROOT, "lexicons", "demo", "lexicon.csv"))).toBeGreaterThan(380);
  }, 120_000);

  it("agree on a slice of the CMU dictionary", async () => {
    expect(await compareOn("grammar.strata", cmuSliceCsv(400, 37))).toBe(400);
  }, 120_000);
});

describe("entry keys", () => {
  it("the id when the row has one, else word#index among that word's rows in file order", () => {
    const k = new EntryKeys();
    expect([k.next("tram"), k.next("bus", "b7"), k.next("tram"), k.next("bus"), k.next("tram", "")]).toEqual(["tram#1", "b7", "tram#2", "bus#2", "tram#3"]);
  });
});
