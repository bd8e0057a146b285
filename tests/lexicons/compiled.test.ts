// The shipped grammars compiled to transducers (src/compile) must give exactly what the reference
// interpreter gives, on the whole demo lexicon and on a CMU Pronouncing Dictionary sample.

import { beforeAll, describe, expect, test } from "vitest";
import { compileGrammar, type Compiled } from "../../src/compile/index.js";
import { formatDiagnostic } from "../../src/diagnostics.js";
import { applyGrammar, WORD_EDGE, type Sym } from "../../src/interp/index.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { DEMO, arpabetToIpa, cmuEntries, ipaOf, variety, wordOf, type Variety } from "./harness.js";

/** Every 250th CMU entry (about 540 words): a different slice from cmu-sample.test.ts. */
const SAMPLE = cmuEntries().filter((_, i) => i % 250 === 7);

async function demoWords(v: Variety): Promise<{ label: string; word: Sym[] }[]> {
  const out: { label: string; word: Sym[] }[] = [];
  for await (const item of readLexicon(DEMO + "lexicon.csv", { inventory: v.inventory })) {
    if (item.kind === "row") out.push({ label: `${item.word} /${item.pron}/`, word: [WORD_EDGE, ...item.symbols, WORD_EDGE] });
  }
  return out;
}

for (const file of ["grammar.strata", "careful.strata"] as const) {
  describe(`${file} compiled`, () => {
    const v = variety(file);
    let compiled: Compiled;
    let diagnostics: string[] = [];
    let words: { label: string; word: Sym[] }[] = [];
    beforeAll(async () => {
      const r = compileGrammar(v.grammar, v.inventory);
      if (r.compiled === null) throw new Error(`${file} does not compile:\n${r.diagnostics.map(formatDiagnostic).join("\n")}`);
      compiled = r.compiled;
      diagnostics = r.diagnostics.map(formatDiagnostic);
      words = [...(await demoWords(v)), ...SAMPLE.map(([w, arpa]) => ({ label: `${w} ${arpa}`, word: wordOf(v, arpabetToIpa(arpa)) }))];
    });

    test("compiles without diagnostics", () => {
      expect(diagnostics).toEqual([]);
    });

    test("preferred output agrees with the interpreter on every demo entry and sampled CMU word", () => {
      const differ: string[] = [];
      for (const { label, word } of words) {
        const want = ipaOf(v, applyGrammar(v.prepared, v.inventory, word).preferred);
        const ids = compiled.encode(word);
        const out: number[] = [];
        const got = ids === null ? "(not in the alphabet)" : compiled.preferred.run(ids, out) ? ipaOf(v, compiled.decode(out)) : "(rejected)";
        if (got !== want) differ.push(`${label}: compiled ${got}, interpreter ${want}`);
      }
      expect(differ).toEqual([]);
    });

    test("every variant agrees with the interpreter's variants", () => {
      const differ: string[] = [];
      for (const { label, word } of words) {
        const want = [...new Set(applyGrammar(v.prepared, v.inventory, word).outputs.map((o) => ipaOf(v, o)))].sort();
        const ids = compiled.encode(word);
        const got = ids === null ? ["(not in the alphabet)"] : [...new Set(compiled.variants(ids).outputs.map((o) => ipaOf(v, compiled.decode(o))))].sort();
        if (got.join(" | ") !== want.join(" | ")) differ.push(`${label}: compiled ${got.join(" | ")}, interpreter ${want.join(" | ")}`);
      }
      expect(differ).toEqual([]);
    });
  });
}
