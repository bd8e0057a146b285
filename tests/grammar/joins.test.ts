// The grammar language and joins: '+' in rule contexts, the `joins` statement, and their errors.

import { describe, expect, it } from "vitest";
import { parseGrammarText, namesJoin } from "../../src/grammar/index.js";
import { checkText, show } from "./helpers.js";

describe("'+' in rules", () => {
  it("parses as a join boundary in contexts, and the rule then names joins", () => {
    const { grammar, diagnostics } = checkText('inventory "segments.csv"\nrule r:\n  t -> d / + _ a\n');
    expect(diagnostics).toEqual([]);
    const r = grammar.steps[0]!;
    if (r.kind !== "rule") throw new Error("not a rule");
    expect(show(r.environments[0]!.left)).toBe("+");
    expect(namesJoin(r)).toBe(true);
    const plain = checkText('inventory "segments.csv"\nrule r:\n  t -> d / a _ a\n').grammar.steps[0]!;
    expect(plain.kind === "rule" && namesJoin(plain)).toBe(false);
  });

  it.each([
    ["rule r:\n  + -> a\n", "grammar/boundary-target", "2:3"],
    ["rule r:\n  a -> + / _ a\n", "grammar/boundary-in-change", "2:8"],
    ["rule r:\n  t -> d / + _ where stressed\n", "grammar/join-with-where", "2:22"],
    ["rule r:\n  t -> d / _ +voice\n", "grammar/syntax", "2:14"],
    ["class C = + | t\n", "grammar/bad-class-member", "1:11"],
  ])("%j → %s at %s", (body, code, at) => {
    const { diagnostics } = checkText(`inventory "segments.csv"\n${body}`);
    const d = diagnostics.find((x) => x.severity === "error");
    expect(d?.code).toBe(code);
    expect(`${d!.line - 1}:${d!.column}`).toBe(at);
  });
});

describe("the joins statement", () => {
  it.each([["through"], ["closed"], ["closed-before-consonant"]])("reads joins = %s", (mode) => {
    const { grammar, diagnostics } = checkText(`inventory "segments.csv"\nonsets = t\njoins = ${mode}\nsyllabify\n`);
    expect(diagnostics).toEqual([]);
    expect(grammar.joins).toBe(mode);
  });

  it("is absent by default (through)", () => {
    expect(checkText('inventory "segments.csv"\nsyllabify\n').grammar.joins).toBeUndefined();
  });

  it.each([
    ["joins = open\n", "grammar/syntax", "1:9"],
    ["joins = closed\njoins = through\n", "grammar/duplicate-declaration", "2:1"],
    ["codas = t\njoins = closed\n", "grammar/joins-without-onsets", "2:1"],
  ])("%j → %s at %s", (body, code, at) => {
    const parsed = parseGrammarText(`inventory "segments.csv"\n${body}`, "/toy/grammar.strata");
    const d = [...parsed.diagnostics].find((x) => x.severity === "error") ?? checkText(`inventory "segments.csv"\n${body}`).diagnostics.find((x) => x.severity === "error");
    expect(d?.code).toBe(code);
    expect(`${d!.line - 1}:${d!.column}`).toBe(at);
  });
});
