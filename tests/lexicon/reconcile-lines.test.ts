// reconcile() checks one input's lines on arrays indexed by line (findingsByLine) and, with an
// override file, on string tags of file and line (findingsByTag, the original way). Without an
// override file both must find the same missing, doubled, moved and stray lines, in the same
// order: here on random inputs and random read-backs (lines lost, doubled, shifted, invented, words
// changed, lines 0 and beyond the input).

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { findingsByLine, findingsByTag, reconcile, type InputRecords, type WrittenCounts } from "../../src/lexicon/reconcile.js";

const words = fc.constantFrom("a", "b", "tram", "é", "");

const scenario = fc
  .record({
    lines: fc.uniqueArray(fc.integer({ min: 2, max: 60 }), { maxLength: 30 }),
    wordsIn: fc.array(words, { minLength: 30, maxLength: 30 }),
    written: fc.array(fc.record({ pick: fc.nat(), extra: fc.integer({ min: 0, max: 70 }), invent: fc.boolean(), word: fc.option(words), reject: fc.boolean() }), { maxLength: 40 }),
  })
  .map(({ lines, wordsIn, written }) => {
    const sorted = [...lines].sort((a, b) => a - b);
    const input: InputRecords = { count: sorted.length, lines: sorted, words: sorted.map((_, i) => wordsIn[i]!) };
    const jsonlLines: number[] = [];
    const jsonlWords: string[] = [];
    const rejectLines: number[] = [];
    for (const x of written) {
      const line = x.invent || sorted.length === 0 ? x.extra : sorted[x.pick % sorted.length]!;
      if (x.reject) rejectLines.push(line);
      else {
        jsonlLines.push(line);
        const at = sorted.indexOf(line);
        jsonlWords.push(x.word ?? (at >= 0 ? input.words[at]! : "z"));
      }
    }
    const w: WrittenCounts = { jsonl: jsonlLines.length, jsonlLines, jsonlWords, jsonlFiles: jsonlLines.map(() => "lex.csv"), rejects: rejectLines.length, rejectLines, rejectFiles: rejectLines.map(() => "lex.csv") };
    return { input, w };
  });

describe("reconcile's line checks", () => {
  it("find the same lines on arrays as on tags (property)", () => {
    fc.assert(
      fc.property(scenario, ({ input, w }) => {
        expect(findingsByLine(input, w)).toEqual(findingsByTag(input, w, undefined));
      }),
      { numRuns: 2000 },
    );
  });

  it("leave a line that is not a whole number to the tags, which report it", () => {
    const input: InputRecords = { count: 1, lines: [2], words: ["a"] };
    const w: WrittenCounts = { jsonl: 0, jsonlLines: [], jsonlWords: [], rejects: 2, rejectLines: [2, Number("x")], rejectFiles: ["", ""] };
    expect(findingsByLine(input, w)).toBeUndefined();
    expect(reconcile("lex.csv", input, w).map((d) => d.message)).toEqual([
      expect.stringContaining("holds 0 entries, rejects.csv 2 rows"),
      expect.stringContaining("Entries or rejects name line NaN, which is not a record of the lexicon."),
    ]);
  });
});
