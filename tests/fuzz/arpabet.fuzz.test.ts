// Fuzzing the ARPAbet import with mutated dictionary text (real CMU lines, the JSON form, comments)
// and mutated mapping tables. Asserts: no exception, each case within a bound, every line is a row,
// a reject, a comment or a blank (counted independently), every reject positioned inside the file.

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { dictionary } from "cmu-pronouncing-dictionary";
import { importArpabetText, loadArpabetTable, parseArpabetTable } from "../../src/lexicon/arpabet.js";
import { expectPositionedInside, mutated, ownLines } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/arpabet", 20261203);
const table = loadArpabetTable().table!;
const TABLE_PATH = fileURLToPath(new URL("../../lexicons/en-us/arpabet.csv", import.meta.url));
const TABLE_TEXT = readFileSync(TABLE_PATH, "utf8");

// Real CMU Pronouncing Dictionary entries (npm cmu-pronouncing-dictionary), in both line forms.
const words = Object.keys(dictionary).slice(1000, 1012);
const PLAIN = [";;; fuzz base", ...words.map((w, i) => `${w.toUpperCase()}${i === 3 ? "(2)" : ""}  ${dictionary[w]}${i === 5 ? " # a note" : ""}`), ""].join("\n");
const JSONISH = ["{", ...words.map((w) => `  ${JSON.stringify(w)}: ${JSON.stringify(dictionary[w])},`), "}", ""].join("\r\n");

describe("fuzz: the ARPAbet import", () => {
  for (const [name, base] of [["CMU lines", PLAIN], ["the JSON form", JSONISH]] as const) {
    it(`mutations of ${name}: every line accounted for, every reject positioned`, () => {
      fc.assert(
        fc.property(mutated(base), (text) => {
          const r = importArpabetText(text, table, { file: "dict.txt" });
          expect(r.lines).toBe(ownLines(text).length);
          expect(r.rows.length + r.rejects.length + r.comments + r.blanks).toBe(r.lines);
          expectPositionedInside(r.rejects, text, "dict.txt");
          for (const row of r.rows) expect(row.line >= 1 && row.line <= r.lines).toBe(true);
        }),
        { numRuns: 1500 },
      );
    }, 300_000);
  }

  it("mutations of the mapping table: a table or positioned diagnostics, never an exception", () => {
    fc.assert(
      fc.property(mutated(TABLE_TEXT), (text) => {
        const r = parseArpabetTable(text, "arpabet.csv");
        expectPositionedInside(r.diagnostics, text, "arpabet.csv");
        expect(r.table !== undefined || r.diagnostics.some((d) => d.severity === "error")).toBe(true);
      }),
      { numRuns: 1000 },
    );
  }, 300_000);
});
