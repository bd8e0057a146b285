// Fuzzing the grammar parser (parseGrammarText) with mutated copies of the shipped en-us grammar files.
// Asserts: no exception, every diagnostic positioned inside the file.

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, it } from "vitest";
import fc from "fast-check";
import { parseGrammarText } from "../../src/grammar/parser.js";
import { expectPositionedInside, mutated } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/grammar", 20261206);
const text = (name: string): string => readFileSync(fileURLToPath(new URL(`../../lexicons/en-us/${name}`, import.meta.url)), "utf8");

describe("fuzz: the grammar parser", () => {
  for (const name of ["common.strata", "reductions.strata", "coarticulation.strata"]) {
    it(`mutations of ${name}: positioned diagnostics, never an exception`, () => {
      fc.assert(
        fc.property(mutated(text(name)), (src) => {
          const r = parseGrammarText(src, name);
          expectPositionedInside(r.diagnostics, src, name);
        }),
        { numRuns: 700 },
      );
    }, 300_000);
  }
});
