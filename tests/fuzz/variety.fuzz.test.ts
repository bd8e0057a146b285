// Fuzzing the variety parser and the resolution of edits (parse-variety.ts, inherit.ts) with mutated
// copies of a variety of the shipped common.strata. Asserts: no exception, every diagnostic
// positioned inside the variety file.

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseGrammarText } from "../../src/grammar/parser.js";
import { parseVarietyFile } from "../../src/grammar/parse-variety.js";
import { applyVariety, plainOrigins } from "../../src/grammar/inherit.js";
import { expectPositionedInside, mutated } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/variety", 20261202);
const base = parseGrammarText(readFileSync(fileURLToPath(new URL("../../lexicons/en-us/common.strata", import.meta.url)), "utf8"), "common.strata").grammar;

/** Every kind of statement a variety has, over common.strata's steps. */
const VARIETY = `-- an invented variety of common.strata
base "common.strata"
omit schwa-deletion
replace dark-l left-to-right:
  l -> ɫ / _ C₀ $ where coda
adjust syllabic-l obligatory right-to-left
adjust dental-place union
add rule extra before syllabic-n optional:
  t -> ʔ / Vowel _ #
add rule extra-2 after extra:
  {t | d} -> ɾ / Vowel _ Vowel
add syllabify after extra-2
add stress from left 1 before dark-l
replace stress from right 3 if heavy else 2
class AlveolarStop = t
add class VoicelessStop = tʃ
add onsets = ʃt ʃp
remove codas = ŋɡz
heavy = [+syllabic +tense]
`;

describe("fuzz: the variety parser and its edits", () => {
  it("the unmutated variety parses and resolves without a diagnostic", () => {
    const v = parseVarietyFile(VARIETY, "variety.strata");
    expect(v.diagnostics).toEqual([]);
    const r = applyVariety(base, plainOrigins(base), v, ["common.strata", "variety.strata"]);
    expect(r.diagnostics).toEqual([]);
    expect(r.grammar.steps.map((s) => s.name)).toContain("syllabify-2");
  });

  it("mutations of a variety: positioned diagnostics, never an exception", () => {
    fc.assert(
      fc.property(mutated(VARIETY), (src) => {
        const v = parseVarietyFile(src, "variety.strata");
        expectPositionedInside(v.diagnostics, src, "variety.strata");
        const r = applyVariety(base, plainOrigins(base), v, ["common.strata", "variety.strata"]);
        expectPositionedInside(r.diagnostics, src, "variety.strata");
      }),
      { numRuns: 700 },
    );
  }, 300_000);
});
