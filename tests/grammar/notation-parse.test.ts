// The new environment notation round-trips through text: every generated grammar (tests/support),
// written as `.strata` text with `unless`, `mirrored` and `longest-first`, parses back to the same
// rules (spans aside).

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseGrammarText } from "../../src/grammar/index.js";
import { arbGrammar } from "../support/arb-grammar.js";

const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 882545925 : Date.now() % 2 ** 31));
process.stderr.write(`grammar/notation-parse: fast-check seed ${SEED}\n`);

const GREEK: Record<string, string> = { alpha: "α", beta: "β", gamma: "γ", delta: "δ" };
/** Spans dropped; ASCII variable names as the parser stores them (Greek). */
const noSpans = (x: unknown): unknown =>
  JSON.parse(JSON.stringify(x, (k, v) => (k === "span" ? undefined : k === "variable" && typeof v === "string" ? (GREEK[v] ?? v) : v)));

describe("grammar text round trip", () => {
  it("generated rules parse back to themselves", () => {
    fc.assert(
      fc.property(arbGrammar(), ({ grammar, text }) => {
        const parsed = parseGrammarText(text, "arb.strata");
        expect(parsed.diagnostics).toEqual([]);
        expect(noSpans(parsed.grammar.steps.filter((s) => s.kind === "rule"))).toEqual(noSpans(grammar.steps.filter((s) => s.kind === "rule")));
      }),
      { numRuns: 200, seed: SEED },
    );
  });
});
