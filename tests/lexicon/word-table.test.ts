// The word table (src/lexicon/word-table.ts) against a plain Map numbering words in order of first
// appearance: the same number for every word, whatever order the words come in.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { WordTable } from "../../src/lexicon/word-table.js";
import { LexemeBook } from "../../src/lexicon/lexemes.js";

const model = (words: readonly string[]): number[] => {
  const seen = new Map<string, number>();
  return words.map((w) => {
    let n = seen.get(w);
    if (n === undefined) seen.set(w, (n = seen.size));
    return n;
  });
};

describe("WordTable", () => {
  it("numbers words as a map does, sorted, mostly sorted or not at all", () => {
    const word = fc.oneof(fc.constantFrom("a", "b", "ab", "b#", "tram", "Tram", "zoo", "é", "", "a b", "\u{1F600}"), fc.string({ maxLength: 4 }));
    const words = fc.oneof(
      fc.array(word, { maxLength: 60 }),
      fc.array(word, { maxLength: 60 }).map((w) => [...w].sort()),
      // Sorted runs with a few words out of order, as lexicons are.
      fc.tuple(fc.array(word, { maxLength: 60 }), fc.array(word, { maxLength: 5 }), fc.nat()).map(([w, odd, at]) => {
        const s = [...w].sort();
        s.splice(at % (s.length + 1), 0, ...odd);
        return s;
      }),
    );
    fc.assert(
      fc.property(words, (ws) => {
        const t = new WordTable();
        expect(ws.map((w) => t.numberOf(w))).toEqual(model(ws));
        expect(t.size).toBe(new Set(ws).size);
        // Asked again, in any order, every word keeps its number.
        expect([...ws].reverse().map((w) => t.numberOf(w))).toEqual(model(ws).reverse());
      }),
    );
  });

  it("grows past its first typed arrays (many and long words)", () => {
    const t = new WordTable();
    const words = Array.from({ length: 40_000 }, (_, i) => `w${String(i).padStart(6, "0")}${"x".repeat(i % 7)}`);
    words.forEach((w, i) => expect(t.numberOf(w)).toBe(i));
    expect(t.numberOf("a")).toBe(40_000);
    expect(t.numberOf(words[12_345]!)).toBe(12_345);
    expect(t.size).toBe(40_001);
  });

  it("is what a run's lexeme books number their words with", () => {
    const book = new LexemeBook();
    expect(book.words).toBeInstanceOf(WordTable);
    expect(["b", "a", "c", "b", "a"].map((w) => book.words.numberOf(w))).toEqual([0, 1, 2, 0, 1]);
  });
});
