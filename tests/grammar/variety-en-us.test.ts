// Varieties on the shipped General American grammar: the careful variety written as edits of the
// casual one is the same grammar as careful.strata (same cache key, same derivations of the demo
// lexicon in the reference interpreter), and a variety in lexicons/demo/ may name ../en-us/ as its
// base under the shipped project root (lexicons/.strata-root) while escapes stay errors.

import { cpSync, existsSync, mkdtempSync, readFileSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, test } from "vitest";
import { cacheKeyOf } from "../../src/compile/index.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { tokenise } from "../../src/inventory/index.js";
import { applyGrammar, prepareGrammar, symsToIpa, wordFromTokens } from "../../src/interp/index.js";
import { at } from "./helpers.js";

const LEXICONS = fileURLToPath(new URL("../../lexicons/", import.meta.url));

/** A copy of the shipped lexicons/ folder (with its .strata-root) in a fresh temporary folder. */
function shippedCopy(): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-variety-"));
  cpSync(LEXICONS, join(dir, "lexicons"), { recursive: true });
  return join(dir, "lexicons");
}

const errors = (r: ReturnType<typeof loadGrammar>): string[][] =>
  r.diagnostics.filter((d) => d.severity === "error").map((d) => [d.code, `${d.file.split("/").pop()}:${at(d)}`]);

const CAREFUL_AS_EDITS = `-- careful speech: the casual grammar without its reductions
base "../en-us/grammar.strata"
omit flapping
omit glottal-stop
omit nasal-flap
omit nasal-flap-merger
`;

describe("varieties of the shipped grammar", () => {
  test("the shipped lexicons folder is a project root", () => {
    expect(existsSync(join(LEXICONS, ".strata-root"))).toBe(true);
  });

  test("careful speech as edits of the casual grammar is careful.strata (same cache key, same derivations)", () => {
    const lex = shippedCopy();
    writeFileSync(join(lex, "demo", "careful-edits.strata"), CAREFUL_AS_EDITS);
    const v = loadGrammar(join(lex, "demo", "careful-edits.strata"));
    const c = loadGrammar(join(lex, "en-us", "careful.strata"));
    expect(errors(v)).toEqual([]);
    expect(v.grammar!.steps.map((s) => s.name)).toEqual(c.grammar!.steps.map((s) => s.name));
    expect(cacheKeyOf(v.grammar!, v.inventory!, 50_000)).toBe(cacheKeyOf(c.grammar!, c.inventory!, 50_000));
    // The interpreter on every demo entry: the same outputs, in the same order.
    const pv = prepareGrammar(v.grammar!, v.inventory!);
    const pc = prepareGrammar(c.grammar!, c.inventory!);
    const rows = readFileSync(join(lex, "demo", "lexicon.csv"), "utf8").split("\n").slice(1).filter((l) => l.length > 0);
    let compared = 0;
    for (const row of rows.slice(0, 120)) {
      const pron = row.split(",")[1]!;
      const t = tokenise(v.inventory!, pron);
      if (!t.ok) continue;
      const word = wordFromTokens(t.tokens, v.inventory!);
      const a = applyGrammar(pv, v.inventory!, word).outputs.map((o) => symsToIpa(o, v.inventory!, {}));
      const b = applyGrammar(pc, c.inventory!, word).outputs.map((o) => symsToIpa(o, c.inventory!, {}));
      expect(a, pron).toEqual(b);
      compared++;
    }
    expect(compared).toBeGreaterThan(100);
  });

  test("a declaration the base makes (joins) is replaced by the variety's", () => {
    const lex = shippedCopy();
    writeFileSync(join(lex, "demo", "joins.strata"), 'base "../en-us/grammar.strata"\njoins = closed\n');
    const v = loadGrammar(join(lex, "demo", "joins.strata"));
    expect(errors(v)).toEqual([]);
    expect(loadGrammar(join(lex, "en-us", "grammar.strata")).grammar!.joins).toBe("closed-before-consonant");
    expect(v.grammar!.joins).toBe("closed");
  });

  test("an added rule runs where it is placed (interpreter)", () => {
    const lex = shippedCopy();
    // An invented demo edit: flapping made to apply to /t/ only.
    writeFileSync(join(lex, "demo", "t-only.strata"), 'base "../en-us/grammar.strata"\nreplace flapping:\n  t -> ɾ / Vowel (ɹ) _ [+syllabic -stress -nasal]\n');
    const v = loadGrammar(join(lex, "demo", "t-only.strata"));
    expect(errors(v)).toEqual([]);
    const p = prepareGrammar(v.grammar!, v.inventory!);
    const narrow = (ipa: string): string => {
      const t = tokenise(v.inventory!, ipa);
      if (!t.ok) throw new Error(ipa);
      return symsToIpa(applyGrammar(p, v.inventory!, wordFromTokens(t.tokens, v.inventory!)).preferred, v.inventory!, {});
    };
    expect(narrow("ˈwɔtɚ")).toContain("ɾ"); // t flaps (common practice, no source)
    expect(narrow("ˈɹaɪdɚ")).toContain("d"); // d no longer does
  });

  test("a variety cannot name a base outside the project root, neither by path nor by symbolic link", () => {
    const lex = shippedCopy();
    const outside = join(lex, "..", "outside.strata");
    writeFileSync(outside, 'base "lexicons/en-us/grammar.strata"\n');
    writeFileSync(join(lex, "demo", "escape.strata"), 'base "../../outside.strata"\n');
    expect(errors(loadGrammar(join(lex, "demo", "escape.strata")))).toEqual([["grammar/base-outside", "escape.strata:1:6"]]);
    symlinkSync(outside, join(lex, "demo", "link.strata"));
    writeFileSync(join(lex, "demo", "via-link.strata"), 'base "link.strata"\n');
    expect(errors(loadGrammar(join(lex, "demo", "via-link.strata")))).toEqual([["grammar/base-outside", "via-link.strata:1:6"]]);
    writeFileSync(join(lex, "demo", "abs.strata"), `base "${outside}"\n`);
    expect(errors(loadGrammar(join(lex, "demo", "abs.strata")))).toEqual([["grammar/base-outside", "abs.strata:1:6"]]);
  });

  test("an inventory a variety names outside the root is an error at its declaration", () => {
    const lex = shippedCopy();
    writeFileSync(join(lex, "..", "segments.csv"), readFileSync(join(lex, "en-us", "segments.csv")));
    writeFileSync(join(lex, "demo", "inv.strata"), 'base "../en-us/grammar.strata"\ninventory "../../segments.csv"\n');
    expect(errors(loadGrammar(join(lex, "demo", "inv.strata")))).toEqual([["grammar/file-outside", "inv.strata:2:11"]]);
  });

  test("a narrower root named by the caller confines the base to it", () => {
    const lex = shippedCopy();
    writeFileSync(join(lex, "demo", "careful-edits.strata"), CAREFUL_AS_EDITS);
    const r = loadGrammar(join(lex, "demo", "careful-edits.strata"), { root: join(lex, "demo") });
    expect(errors(r)).toEqual([["grammar/base-outside", "careful-edits.strata:2:6"]]);
    // A root that does not hold the grammar itself is an error too.
    expect(errors(loadGrammar(join(lex, "en-us", "grammar.strata"), { root: join(lex, "demo") })).map((e) => e[0])).toEqual(["grammar/file-outside"]);
  });

  test("without a .strata-root above it, a grammar's folder is its root (includes stay inside)", () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-variety-"));
    cpSync(join(LEXICONS, "en-us"), join(dir, "en-us"), { recursive: true });
    writeFileSync(join(dir, "en-us", "up.strata"), 'base "../en-us/grammar.strata"\n');
    expect(errors(loadGrammar(join(dir, "en-us", "up.strata")))).toEqual([]);
    writeFileSync(join(dir, "other.strata"), 'inventory "en-us/segments.csv"\n');
    writeFileSync(join(dir, "en-us", "out.strata"), 'base "../other.strata"\n');
    expect(errors(loadGrammar(join(dir, "en-us", "out.strata")))).toEqual([["grammar/base-outside", "out.strata:1:6"]]);
  });
});
