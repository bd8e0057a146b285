// The shipped General American grammar compiled, against the reference interpreter, on a slice of
// real words from the open CMU Pronouncing Dictionary (npm `cmu-pronouncing-dictionary`, ISC):
// with their own stress marks, and with the marks removed (so the default-stress step acts).
// Also: composing in small blocks gives exactly what one machine gives.

import { beforeAll, describe, expect, test } from "vitest";
import { compileGrammar, type Compiled } from "../../src/compile/index.js";
import { formatDiagnostic } from "../../src/diagnostics.js";
import { applyGrammar, wordKey, type Sym } from "../../src/interp/index.js";
import { arpabetToIpa, cmuEntries, variety, wordOf } from "../lexicons/harness.js";

const v = variety("grammar.strata");
/** About 2 600 entries: every 50th from the 13th, a slice the lexicon tests do not use. */
const SLICE = cmuEntries().filter((_, i) => i % 50 === 13);

function words(): { label: string; word: Sym[] }[] {
  const out: { label: string; word: Sym[] }[] = [];
  SLICE.forEach(([w, arpa], i) => {
    let ipa: string;
    try {
      ipa = arpabetToIpa(arpa);
    } catch {
      return;
    }
    out.push({ label: `${w} /${ipa}/`, word: wordOf(v, ipa) });
    // Every fourth word also without marks: default stress assigns it.
    if (i % 4 === 0) {
      const bare = ipa.replace(/[ˈˌ]/g, "");
      out.push({ label: `${w} /${bare}/`, word: wordOf(v, bare) });
    }
  });
  return out;
}

function compile(maxStates?: number): Compiled {
  const r = compileGrammar(v.grammar, v.inventory, maxStates === undefined ? {} : { maxStates });
  if (r.compiled === null) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.compiled;
}

function preferredOf(c: Compiled, w: Sym[]): string {
  const ids = c.encode(w);
  if (ids === null) return "(outside the alphabet)";
  const out: number[] = [];
  return c.preferred.run(ids, out) ? wordKey(c.decode(out)) : "(rejected)";
}

function variantsOf(c: Compiled, w: Sym[]): string[] {
  const ids = c.encode(w);
  if (ids === null) return ["(outside the alphabet)"];
  return c.variants(ids, 64).outputs.map((o) => wordKey(c.decode(o))).sort();
}

describe("en-us grammar.strata compiled vs interpreted, CMU slice", () => {
  let one: Compiled;
  let blocks: Compiled;
  let list: { label: string; word: Sym[] }[];
  beforeAll(() => {
    one = compile();
    blocks = compile(120);
    list = words();
  });

  test("the slice is a few thousand words", () => {
    expect(list.length).toBeGreaterThan(3000);
  });

  test("preferred output and every variant agree with the interpreter", () => {
    const differ: string[] = [];
    for (const { label, word } of list) {
      const run = applyGrammar(v.prepared, v.inventory, word, { maxVariants: 64 });
      const want = wordKey(run.preferred);
      const got = preferredOf(one, word);
      if (got !== want) differ.push(`${label}: preferred compiled ${got}, interpreter ${want}`);
      const wantAll = run.outputs.map(wordKey).sort();
      const gotAll = variantsOf(one, word);
      if (gotAll.join(" | ") !== wantAll.join(" | ")) differ.push(`${label}: variants differ`);
      if (differ.length > 5) break;
    }
    expect(differ).toEqual([]);
  });

  test("a small block limit splits the cascade, with the same results", () => {
    expect(one.preferredSize.blocks.length).toBe(1);
    expect(blocks.preferredSize.blocks.length).toBeGreaterThan(1);
    // Blocks cover the steps in order, without gaps.
    const b = blocks.preferredSize.blocks;
    for (let k = 1; k < b.length; k++) expect(b[k]!.from).toBe(b[k - 1]!.to);
    const differ: string[] = [];
    for (const { label, word } of list.slice(0, 1500)) {
      if (preferredOf(one, word) !== preferredOf(blocks, word)) differ.push(`${label}: preferred`);
      if (variantsOf(one, word).join("|") !== variantsOf(blocks, word).join("|")) differ.push(`${label}: variants`);
      if (differ.length > 5) break;
    }
    expect(differ).toEqual([]);
  });
});
