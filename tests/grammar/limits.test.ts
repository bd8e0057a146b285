// Parser limits: deep nesting and very long statements are reported at their place with the
// limit named, never as a stack overflow (issue 15, item 10).

import { describe, expect, test } from "vitest";
import { parseGrammarText } from "../../src/grammar/index.js";
import { MAX_ELEMENTS, MAX_NESTING } from "../../src/grammar/parse-patterns.js";

const only = (text: string) => {
  const r = parseGrammarText(text, "g.strata");
  return r.diagnostics.map((d) => `${d.line}:${d.column} ${d.code} ${d.message}`);
};

describe("parser limits", () => {
  test("2,000 nested brackets: an error at the first bracket past the limit", () => {
    const prefix = "rule r:\n  a -> b / ";
    const text = `${prefix}${"(".repeat(2000)}c${")".repeat(2000)} _\n`;
    expect(only(text)).toEqual([
      `2:${prefix.length - 8 + MAX_NESTING + 1} grammar/too-deep groups '( )' and '{ }' may be nested at most ${MAX_NESTING} deep`,
    ]);
  });

  test("nesting just within the limit parses", () => {
    const text = `rule r:\n  a -> b / ${"{".repeat(MAX_NESTING)}c${"}".repeat(MAX_NESTING)} _\n`;
    expect(only(text)).toEqual([]);
  });

  test("a 90,000-segment context (spaced): an error at the element past the limit", () => {
    const prefix = "rule r:\n  a -> b / ";
    const text = `${prefix}${"c ".repeat(90_000)}_\n`;
    const col = prefix.length - 8 + 2 * MAX_ELEMENTS - 2 * 2 + 1; // a and b are elements 1 and 2
    expect(only(text)).toEqual([`2:${col} grammar/too-long a statement may hold at most ${MAX_ELEMENTS} elements; split the rule or use a class or a repetition`]);
  });

  test("a 90,000-letter run counts each letter", () => {
    const text = `rule r:\n  a -> b / ${"c".repeat(90_000)} _\n`;
    const d = only(text);
    expect(d).toHaveLength(1);
    expect(d[0]).toMatch(/^2:\d+ grammar\/too-long /);
  });

  test("the statement after an over-long one is still read", () => {
    const text = `rule r:\n  a -> b / ${"c ".repeat(20_000)}_\nrule s:\n  a -> b / c _\n`;
    const r = parseGrammarText(text, "g.strata");
    expect(r.diagnostics.map((d) => d.code)).toEqual(["grammar/too-long"]);
    expect(r.grammar.steps.map((s) => s.name)).toEqual(["s"]);
  });
});
