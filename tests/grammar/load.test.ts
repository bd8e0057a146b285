// Loader tests: includes (order, confinement to the grammar's folder, cycles, missing files),
// the inventory, literal splitting with the tokeniser, and the shipped en-us grammars.

import { symlinkSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import { at, rules, show, tempTree, TOY_DIACRITICS, TOY_SEGMENTS } from "./helpers.js";
import { EN_US } from "../inventory/helpers.js";

const inv = { "g/segments.csv": TOY_SEGMENTS, "g/diacritics.csv": TOY_DIACRITICS };
const errors = (ds: readonly { severity: string; code: string; line: number; column: number }[]) =>
  ds.filter((d) => d.severity === "error").map((d) => [d.code, at(d)]);

describe("includes", () => {
  test("a folder loads grammar.strata; included steps run where they are included", () => {
    const root = tempTree({
      ...inv,
      "g/grammar.strata": 'inventory "segments.csv"\nrule before:\n  a -> ə\ninclude "sub/common.strata"\nrule after:\n  ə -> i',
      "g/sub/common.strata": "class N = [+nasal]\nrule middle:\n  N -> [+voice]",
    });
    const r = loadGrammar(join(root, "g"));
    expect(r.diagnostics).toEqual([]);
    expect(r.inventory).toBeDefined();
    expect(rules(r.grammar!).map((x) => x.name)).toEqual(["before", "middle", "after"]);
    expect(r.grammar!.files).toEqual([join(root, "g", "grammar.strata"), join(root, "g", "sub", "common.strata")]);
    expect(r.grammar!.classes.map((c) => c.name)).toEqual(["N"]);
    expect(r.grammar!.inventory).toBe(join(root, "g", "segments.csv"));
  });

  test("an include path is relative to the including file; a file included twice is read once", () => {
    const root = tempTree({
      ...inv,
      "g/grammar.strata": 'inventory "segments.csv"\ninclude "a/one.strata"\ninclude "b.strata"',
      "g/a/one.strata": 'include "../b.strata"\nrule one:\n  a -> ə',
      "g/b.strata": "rule two:\n  i -> ə",
    });
    const r = loadGrammar(join(root, "g", "grammar.strata"));
    expect(r.diagnostics).toEqual([]);
    expect(rules(r.grammar!).map((x) => x.name)).toEqual(["two", "one"]);
  });

  test("an include outside the grammar's folder is an error at the include", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\ninclude "../outside.strata"', "outside.strata": "rule x:\n  a -> ə" });
    const r = loadGrammar(join(root, "g"));
    expect(errors(r.diagnostics)).toEqual([["grammar/include-outside", "2:9"]]);
    expect(rules(r.grammar!)).toEqual([]);
  });

  test("a symbolic link cannot lead an include out of the folder", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\ninclude "link.strata"', "outside.strata": "rule x:\n  a -> ə" });
    symlinkSync(join(root, "outside.strata"), join(root, "g", "link.strata"));
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/include-outside", "2:9"]]);
  });

  test("an absolute include path is confined too", () => {
    const root = tempTree({ ...inv, "outside.strata": "rule x:\n  a -> ə" });
    const main = tempTree({ ...inv, "g/grammar.strata": `inventory "segments.csv"\ninclude "${join(root, "outside.strata")}"` });
    expect(errors(loadGrammar(join(main, "g")).diagnostics)).toEqual([["grammar/include-outside", "2:9"]]);
  });

  test("a cycle is an error at the include that closes it, naming the chain", () => {
    const root = tempTree({
      ...inv,
      "g/grammar.strata": 'inventory "segments.csv"\ninclude "a.strata"',
      "g/a.strata": 'include "b.strata"',
      "g/b.strata": 'rule r:\n  a -> ə\ninclude "a.strata"',
    });
    const r = loadGrammar(join(root, "g"));
    const d = r.diagnostics.find((x) => x.code === "grammar/include-cycle")!;
    expect(d.file).toBe(join(root, "g", "b.strata"));
    expect(at(d)).toBe("3:9");
    expect(d.message).toBe("include cycle: a.strata → b.strata → a.strata");
    expect(rules(r.grammar!).map((x) => x.name)).toEqual(["r"]);
  });

  test("including itself is a cycle", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\ninclude "grammar.strata"' });
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/include-cycle", "2:9"]]);
  });

  test("a missing include is an error at the include", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\n\ninclude "nope.strata"' });
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/include-missing", "3:9"]]);
  });

  test("errors in included files carry the included file's name", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\ninclude "x.strata"', "g/x.strata": "rule r:\n  a -> [+nasel]" });
    const d = loadGrammar(join(root, "g")).diagnostics.find((x) => x.severity === "error")!;
    expect([d.file, d.code, at(d)]).toEqual([join(root, "g", "x.strata"), "grammar/unknown-feature", "2:9"]);
  });
});

describe("inventory and files", () => {
  test("no inventory statement", () => {
    const root = tempTree({ "g/grammar.strata": "rule r:\n  a -> b" });
    const r = loadGrammar(join(root, "g"));
    expect(errors(r.diagnostics)).toEqual([["grammar/no-inventory", "1:1"]]);
    expect(r.grammar).toBeDefined();
    expect(r.inventory).toBeUndefined();
  });
  test("an inventory file that does not exist is an error at the statement", () => {
    const root = tempTree({ "g/grammar.strata": '-- toy\ninventory "missing.csv"' });
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/inventory-missing", "2:11"]]);
  });
  test("a grammar path that does not exist", () => {
    const r = loadGrammar("/nonexistent/strata/grammar.strata");
    expect(errors(r.diagnostics)).toEqual([["grammar/unreadable", "1:1"]]);
    expect(r.grammar).toBeUndefined();
  });
});

describe("literal splitting", () => {
  const load = (body: string) => {
    const root = tempTree({ ...inv, "g/grammar.strata": `inventory "segments.csv"\n${body}` });
    return loadGrammar(join(root, "g"));
  };
  test("runs of IPA become single segments with their own columns", () => {
    const r = load("rule r:\n  st -> tʰ / ãː _");
    expect(r.diagnostics).toEqual([]);
    const rule = rules(r.grammar!)[0]!;
    expect(rule.target.map((e) => [e.kind === "segment" ? e.symbol : "?", e.span.column])).toEqual([["s", 3], ["t", 4]]);
    expect(rule.change).toMatchObject([{ kind: "segment", symbol: "tʰ", span: { column: 9, length: 2 } }]);
    expect(show(rule.environments[0]!.left)).toBe("ãː");
  });
  test("a subscript on a run binds to its last segment (st₀ is s t₀)", () => {
    const rule = rules(load("rule r:\n  a -> ə / st₀ _").grammar!)[0]!;
    expect(show(rule.environments[0]!.left)).toBe("s t_0");
  });
  test("clusters are split", () => {
    const g = load("onsets = p pl spl\ncodas = nt").grammar!;
    expect(g.onsets!.map((c) => c.segments)).toEqual([["p"], ["p", "l"], ["s", "p", "l"]]);
    expect(g.codas!.map((c) => c.segments)).toEqual([["n", "t"]]);
  });
  test("an unknown symbol is an error at its column", () => {
    const r = load("rule r:\n  a -> ə / xa _");
    expect(errors(r.diagnostics)).toEqual([["grammar/unknown-segment", "3:12"]]);
  });
  test("a class member must be one segment", () => {
    expect(errors(load("class K = p ta").diagnostics)).toEqual([["grammar/not-one-segment", "2:13"]]);
  });
  test("an unreadable cluster is an error", () => {
    expect(errors(load("onsets = p xl").diagnostics)).toEqual([["grammar/unknown-segment", "2:12"]]);
  });
});

describe("the shipped en-us grammars", () => {
  // Real data: the en-us grammar files written by the grammar authors must load without errors.
  test.each(["grammar.strata", "careful.strata"])("%s loads and checks without errors", (f) => {
    const r = loadGrammar(join(EN_US, f));
    expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(rules(r.grammar!).length).toBeGreaterThan(3);
    expect(r.grammar!.steps.some((s) => s.kind === "syllabify")).toBe(true);
  });
});
