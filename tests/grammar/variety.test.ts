// Varieties defined as a base plus edits (DEVELOPERS.md, "Varieties"): each edit kind resolves to
// the grammar written out in full — the same steps, the same compiled machines; chains, the caches,
// and every error positioned at the edit that causes it.

import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { cacheKeyOf, compileGrammar, type Compiled } from "../../src/compile/index.js";
import { equivalent, serialise } from "../../src/fst/index.js";
import { loadGrammar, loadGrammarCached, type Grammar } from "../../src/grammar/index.js";
import { at, tempTree, TOY_DIACRITICS, TOY_SEGMENTS } from "./helpers.js";

const toy = { ".strata-root": "", "base/segments.csv": TOY_SEGMENTS, "base/diacritics.csv": TOY_DIACRITICS };

/** A small invented base grammar: every kind of step, classes, clusters and weight. */
const BASE = `inventory "segments.csv"
class N = [+nasal]
class Stop = p t
onsets = p t k pl
codas = n m s
heavy = [+syllabic] [-syllabic]
syllabify
stress from right 2 if heavy else 3
rule voicing:
  Stop -> [+voice] / [+syllabic] _ [+syllabic]
rule nasal-place:
  n -> [α place] / _ [-syllabic α place]
rule reduce optional prefer applied:
  a -> ə / _ [-syllabic] [+syllabic +stress]
rule lengthen:
  [+syllabic] -> [+long] / _ N
`;
const NODE = "node place = labial coronal dorsal\n";

/** Loads `files` (relative paths → text) under a fresh project root and returns the main grammar. */
function load(files: Record<string, string>, main: string): ReturnType<typeof loadGrammar> {
  const root = tempTree({ ...toy, ...files });
  return loadGrammar(join(root, main));
}

const errors = (r: ReturnType<typeof loadGrammar>): string[][] =>
  r.diagnostics.filter((d) => d.severity === "error").map((d) => [d.code, `${d.file.split("/").pop()}:${at(d)}`]);

/** A grammar without places: what must be equal between a variety and its written-out form. */
function placeless(g: Grammar): unknown {
  return JSON.parse(JSON.stringify({ ...g, file: "", files: [] }, (k, v) => (k === "span" ? undefined : v)));
}

function compiled(g: Grammar, r: ReturnType<typeof loadGrammar>): Compiled {
  const c = compileGrammar(g, r.inventory!);
  if (c.compiled === null) throw new Error(c.diagnostics.map((d) => d.message).join("\n"));
  return c.compiled;
}

/** Both grammars load cleanly, resolve to the same grammar, and compile to equivalent machines. */
function expectSameAsWrittenOut(variety: string, writtenOut: string): void {
  const root = tempTree({ ...toy, "base/grammar.strata": NODE + BASE, "base/variety.strata": variety, "base/full.strata": writtenOut });
  const v = loadGrammar(join(root, "base/variety.strata"));
  const w = loadGrammar(join(root, "base/full.strata"));
  expect(v.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  expect(w.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  expect(placeless(v.grammar!)).toEqual(placeless(w.grammar!));
  expect(cacheKeyOf(v.grammar!, v.inventory!, 50_000)).toBe(cacheKeyOf(w.grammar!, w.inventory!, 50_000));
  const a = compiled(v.grammar!, v);
  const b = compiled(w.grammar!, w);
  expect(a.alphabet.segments.map((s) => s.text)).toEqual(b.alphabet.segments.map((s) => s.text));
  // The preferred cascade is functional: equivalence of transducers. The variants cascade may give
  // several outputs per input, where equivalence is not decidable in general: the same machine, byte for byte.
  expect(a.preferredBlocks.length).toBe(b.preferredBlocks.length);
  a.preferredBlocks.forEach((blk, i) => expect(equivalent(blk.machine, b.preferredBlocks[i]!.machine)).toBe(true));
  expect(a.variantBlocks.map((blk) => Buffer.from(serialise(blk.machine)).toString("hex"))).toEqual(b.variantBlocks.map((blk) => Buffer.from(serialise(blk.machine)).toString("hex")));
}

/** The base with `edit` applied to its text (the written-out reference). */
const full = (edit: (text: string) => string): string => edit(NODE + BASE);

describe("a variety compiles to the same machine as the grammar written out in full", () => {
  test("omitting a rule", () => {
    expectSameAsWrittenOut('base "grammar.strata"\nomit nasal-place\n', full((t) => t.replace(/rule nasal-place:\n.*\n/, "")));
  });

  test("replacing a rule's body keeps its options", () => {
    expectSameAsWrittenOut(
      'base "grammar.strata"\nreplace reduce:\n  a -> ə / _ [-syllabic] [+syllabic]\n',
      full((t) => t.replace("a -> ə / _ [-syllabic] [+syllabic +stress]", "a -> ə / _ [-syllabic] [+syllabic]")),
    );
  });

  test("replacing a rule with new options", () => {
    expectSameAsWrittenOut(
      'base "grammar.strata"\nreplace voicing optional prefer unapplied left-to-right:\n  t -> d / a _ a\n',
      full((t) => t.replace("rule voicing:\n  Stop -> [+voice] / [+syllabic] _ [+syllabic]", "rule voicing optional left-to-right prefer unapplied:\n  t -> d / a _ a")),
    );
  });

  test("adjusting options: obligatory ↔ optional, the preferred variant, direction", () => {
    expectSameAsWrittenOut(
      'base "grammar.strata"\nadjust reduce obligatory\nadjust voicing optional prefer unapplied\nadjust lengthen right-to-left\n',
      full((t) => t.replace("rule reduce optional prefer applied:", "rule reduce:").replace("rule voicing:", "rule voicing optional prefer unapplied:").replace("rule lengthen:", "rule lengthen right-to-left:")),
    );
  });

  test("adding rules before and after base rules, and after another added rule", () => {
    expectSameAsWrittenOut(
      `base "grammar.strata"
add rule first-raise before voicing:
  a -> i / _ n
add rule second-raise after first-raise optional:
  ə -> i / _ m
add rule final after lengthen:
  k -> t / _ #
add rule early after syllabify:
  s -> t / a _ a
`,
      full((t) =>
        t
          .replace("rule voicing:", "rule first-raise:\n  a -> i / _ n\nrule second-raise optional:\n  ə -> i / _ m\nrule voicing:")
          .replace("stress from right", "rule early:\n  s -> t / a _ a\nstress from right")
          .concat("rule final:\n  k -> t / _ #\n"),
      ),
    );
  });

  test("changing classes, onsets, codas, weight and the stress step", () => {
    expectSameAsWrittenOut(
      `base "grammar.strata"
class Stop = p
add class N = l
class Liquid = l
add onsets = tl kl
remove codas = s
heavy = [+syllabic +long]
replace stress from left 1
`,
      full((t) =>
        t
          .replace("class Stop = p t", "class Stop = p")
          .replace("class N = [+nasal]", "class N = [+nasal] l")
          .replace("onsets = p t k pl", "onsets = p t k pl tl kl")
          .replace("codas = n m s", "codas = n m")
          .replace("heavy = [+syllabic] [-syllabic]", "heavy = [+syllabic +long]")
          .replace("stress from right 2 if heavy else 3", "stress from left 1")
          .replace("rule voicing:", "class Liquid = l\nrule voicing:"),
      ),
    );
  });

  test("a chain: a variety of a variety", () => {
    const root = tempTree({
      ...toy,
      "base/grammar.strata": NODE + BASE,
      "mid/mid.strata": 'base "../base/grammar.strata"\nomit reduce\nadd rule mid-rule after voicing:\n  i -> ə / _ #\n',
      "top/top.strata": 'base "../mid/mid.strata"\nadjust mid-rule optional\nadd rule top-rule before mid-rule:\n  a -> i / # _\n',
      "base/full.strata": full((t) => t.replace(/rule reduce optional prefer applied:\n.*\n/, "").replace("rule nasal-place:", "rule top-rule:\n  a -> i / # _\nrule mid-rule optional:\n  i -> ə / _ #\nrule nasal-place:")),
    });
    const v = loadGrammar(join(root, "top/top.strata"));
    const w = loadGrammar(join(root, "base/full.strata"));
    expect(errors(v)).toEqual([]);
    expect(placeless(v.grammar!)).toEqual(placeless(w.grammar!));
    expect(v.grammar!.files.map((f) => f.slice(root.length))).toEqual(["/top/top.strata", "/mid/mid.strata", "/base/grammar.strata"]);
    const origin = Object.fromEntries(v.variety!.origins.map((o) => [o.name, o]));
    expect(origin["mid-rule"]!.added).toBe(true);
    expect(origin["mid-rule"]!.defined.file).toBe(join(root, "mid/mid.strata"));
    expect(origin["mid-rule"]!.edits.map((e) => [e.kind, e.at.file.slice(root.length), e.at.line])).toEqual([["adjusted", "/top/top.strata", 2]]);
    expect(origin["voicing"]!.defined).toEqual({ file: join(root, "base/grammar.strata"), line: 10 });
  });
});

describe("caches see every file of the chain", () => {
  test("an edit of the base file reaches a variety loaded through the grammar cache", () => {
    const root = tempTree({ ...toy, "base/grammar.strata": NODE + BASE, "v/v.strata": 'base "../base/grammar.strata"\nomit reduce\n' });
    const cache = join(root, "cache");
    const first = loadGrammarCached(join(root, "v/v.strata"), cache);
    expect(errors(first)).toEqual([]);
    expect(first.grammar!.files).toContain(join(root, "base/grammar.strata"));
    expect(loadGrammarCached(join(root, "v/v.strata"), cache).grammar!.steps.map((s) => s.name)).toEqual(first.grammar!.steps.map((s) => s.name));
    writeFileSync(join(root, "base/grammar.strata"), NODE + BASE.replace("rule lengthen:", "rule longer:"));
    const again = loadGrammarCached(join(root, "v/v.strata"), cache);
    expect(again.grammar!.steps.map((s) => s.name)).toContain("longer");
    expect(cacheKeyOf(again.grammar!, again.inventory!, 50_000)).not.toBe(cacheKeyOf(first.grammar!, first.inventory!, 50_000));
  });
});

describe("errors in a variety are positioned at the edit", () => {
  const base = { "base/grammar.strata": NODE + BASE };
  const v = (text: string) => load({ ...base, "base/v.strata": 'base "grammar.strata"\n' + text }, "base/v.strata");

  test("unknown rule names in edits and anchors", () => {
    expect(errors(v("omit voicng\nadjust nasal optional\nadd rule x after lenghten:\n  a -> i\n"))).toEqual([
      ["grammar/unknown-step", "v.strata:2:6"],
      ["grammar/unknown-step", "v.strata:3:8"],
      ["grammar/unknown-step", "v.strata:4:18"],
    ]);
    expect(v("omit voicng\n").diagnostics[0]!.message).toContain("did you mean 'voicing'");
    const own = v("add rule x after voicing:\n  a -> i\nadjust x optional\n");
    expect(errors(own)).toEqual([["grammar/unknown-step", "v.strata:4:8"]]);
    expect(own.diagnostics[0]!.message).toContain("added by this variety");
  });

  test("two edits of one rule", () => {
    expect(errors(v("omit voicing\nadjust voicing optional\nreplace voicing:\n  a -> i\n"))).toEqual([
      ["grammar/duplicate-edit", "v.strata:3:8"],
      ["grammar/duplicate-edit", "v.strata:4:9"],
    ]);
  });

  test("two new rules at one place with no order between them", () => {
    expect(errors(v("add rule x after voicing:\n  a -> i\nadd rule y after voicing:\n  a -> ə\n"))).toEqual([["grammar/ambiguous-order", "v.strata:4:18"]]);
    // `after voicing` and `before nasal-place` are the same place.
    expect(errors(v("add rule x after voicing:\n  a -> i\nadd rule y before nasal-place:\n  a -> ə\n"))).toEqual([["grammar/ambiguous-order", "v.strata:4:19"]]);
    // Omitting the step between them makes two places one.
    expect(errors(v("omit nasal-place\nadd rule x after voicing:\n  a -> i\nadd rule y before reduce:\n  a -> ə\n"))).toEqual([["grammar/ambiguous-order", "v.strata:5:19"]]);
    expect(errors(v("add rule x after voicing:\n  a -> i\nadd rule y after x:\n  a -> ə\n"))).toEqual([]);
  });

  test("anchors on an omitted step, anchors in a cycle, a name already taken", () => {
    expect(errors(v("omit voicing\nadd rule x after voicing:\n  a -> i\n"))).toEqual([["grammar/anchor-omitted", "v.strata:3:18"]]);
    expect(errors(v("add rule x after y:\n  a -> i\nadd rule y after x:\n  a -> ə\n")).map((e) => e[0])).toEqual(["grammar/anchor-cycle", "grammar/anchor-cycle"]);
    expect(errors(v("add rule voicing after reduce:\n  a -> i\n"))).toEqual([["grammar/duplicate-rule", "v.strata:2:10"]]);
  });

  test("a new rule must say where it goes; ordinary step statements point to the edits", () => {
    expect(errors(v("add rule x:\n  a -> i\n"))).toEqual([["grammar/no-placement", "v.strata:2:10"]]);
    const r = v("rule x:\n  a -> i\n");
    expect(errors(r)).toEqual([["grammar/unknown-statement", "v.strata:2:1"]]);
    expect(r.diagnostics[0]!.message).toContain("add rule … before NAME");
  });

  test("a base that names the variety again is a cycle", () => {
    const r = load({ "a.strata": 'base "b.strata"\n', "b.strata": 'base "c.strata"\n', "c.strata": 'base "a.strata"\n' }, "a.strata");
    expect(errors(r)).toEqual([["grammar/base-cycle", "c.strata:1:6"]]);
    expect(r.diagnostics[0]!.message).toContain("a.strata → b.strata → c.strata → a.strata");
  });

  test("a missing base, and `base` that is not first", () => {
    expect(errors(load({ "a.strata": 'base "nowhere.strata"\n' }, "a.strata"))).toEqual([["grammar/base-missing", "a.strata:1:6"]]);
    expect(errors(v('base "grammar.strata"\n'))).toEqual([["grammar/base-not-first", "v.strata:2:1"]]);
  });

  test("a declaration made twice in the variety; members and clusters for lists that are not there", () => {
    expect(errors(v("onsets = p t\nonsets = k\nclass Stop = p\nclass Stop = t\n"))).toEqual([
      ["grammar/duplicate-declaration", "v.strata:3:1"],
      ["grammar/duplicate-name", "v.strata:5:7"],
    ]);
    expect(errors(v("add class Nasal = m\nremove codas = ŋ\n"))).toEqual([
      ["grammar/unknown-class", "v.strata:2:11"],
      ["grammar/unknown-cluster", "v.strata:3:16"],
    ]);
    const noLists = load({ "base/grammar.strata": 'inventory "segments.csv"\nrule x:\n  a -> i\n', "base/v.strata": 'base "grammar.strata"\nadd onsets = p\n' }, "base/v.strata");
    expect(errors(noLists)).toEqual([["grammar/no-list", "v.strata:2:5"]]);
  });

  test("a base given as a grammar folder reads its grammar.strata", () => {
    const r = load({ "base/grammar.strata": NODE + BASE, "v/v.strata": 'base "../base"\nomit reduce\n' }, "v/v.strata");
    expect(errors(r)).toEqual([]);
    expect(r.grammar!.steps.map((s) => s.name)).not.toContain("reduce");
  });

  test("'prefer' on a rule an edit leaves obligatory is a warning", () => {
    const r = v("adjust voicing prefer unapplied\nadjust reduce obligatory\n");
    expect(errors(r)).toEqual([]);
    expect(r.diagnostics.filter((d) => d.severity === "warning").map((d) => [d.code, at(d)])).toEqual([["grammar/prefer-obligatory", "2:1"]]);
  });

  test("a stress step replaced by a rule, options on a syllabify step", () => {
    expect(errors(v("replace stress:\n  a -> i\nadjust syllabify optional\n"))).toEqual([
      ["grammar/edit-kind", "v.strata:2:9"],
      ["grammar/edit-kind", "v.strata:4:8"],
    ]);
  });
});
