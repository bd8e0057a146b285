// Morpheme joins in the interpreter (and the same words through the compiled machines): how the
// syllabifier treats '+' under each `joins` mode, with the en-us onsets and codas; rules that name
// '+' and rules that do not; default stress across a join.

import { describe, expect, it } from "vitest";
import { fileURLToPath } from "node:url";
import { loadGrammar } from "../../src/grammar/index.js";
import type { Grammar, JoinMode } from "../../src/grammar/ast.js";
import { applyGrammar, resolveClusters, symsToIpa, syllabify, wordKey } from "../../src/interp/index.js";
import { compileGrammar } from "../../src/compile/index.js";
import { symsOf } from "../support/words.js";
import { bun, chBun, classDef, env, grammar, rule, seg, stressStep, syllabifyStep } from "../support/ast.js";
import { tinyInventory as tiny } from "../support/tiny-inventory.js";
import type { Element } from "../../src/grammar/ast.js";

const EN_US = fileURLToPath(new URL("../../lexicons/en-us/", import.meta.url));
const g = loadGrammar(EN_US);
if (g.grammar === undefined || g.inventory === undefined) throw new Error(g.diagnostics.map((d) => d.message).join("\n"));
const en = g.inventory;
const onsets = resolveClusters(g.grammar.onsets, en).list;
const codas = resolveClusters(g.grammar.codas, en).list;
const broad = (text: string, mode: JoinMode): string => symsToIpa(syllabify(symsOf(text, en), onsets, codas, en, mode).word, en, { syllables: true, joins: true });

describe("syllabification at a join, en-us onsets and codas", () => {
  // Maximal onsets within the declared lists (Kahn 1976; Selkirk 1984, from memory); the join modes
  // are this project's (DEVELOPERS.md, "Syllabification and its fallback").
  it.each<[string, JoinMode, string]>([
    ["mɪs+pleɪs", "through", "mɪ.s+pleɪs"],
    ["mɪs+pleɪs", "closed", "mɪs+.pleɪs"],
    ["mɪs+pleɪs", "closed-before-consonant", "mɪs+.pleɪs"],
    ["mɪspleɪs", "closed", "mɪ.spleɪs"],
    ["wɔk+ɪŋ", "through", "wɔ.k+ɪŋ"],
    ["wɔk+ɪŋ", "closed", "wɔk+.ɪŋ"],
    ["wɔk+ɪŋ", "closed-before-consonant", "wɔ.k+ɪŋ"],
    ["sɪks+tin", "closed-before-consonant", "sɪks+.tin"],
    ["ʌn+stɑp", "closed", "ʌn+.stɑp"],
    ["ʌ+n+stɑp", "closed-before-consonant", "ʌ+n+.stɑp"],
  ])("%s with joins = %s → %s", (word, mode, out) => {
    expect(broad(word, mode)).toBe(out);
  });

  it("never lets an onset cross a compound's '#'", () => {
    expect(broad("nɛt#wɝk", "through")).toBe("nɛt wɝk");
    expect(broad("nɛtwɝk", "through")).toBe("nɛ.twɝk");
  });
});

describe("rules and joins (interpreter = machines)", () => {
  const V: Element = bun("+syllabic");
  const extra = { classes: [classDef("V", [V])] };
  const check = (gr: Grammar, words: string[]): string[] => {
    const c = compileGrammar(gr, tiny).compiled!;
    return words.map((w) => {
      const sy = symsOf(w, tiny);
      const run = applyGrammar(gr, tiny, sy);
      const out: number[] = [];
      expect(c.preferred.run(c.encode(sy)!, out)).toBe(true);
      expect(wordKey(c.decode(out)), w).toBe(wordKey(run.preferred));
      return symsToIpa(run.preferred, tiny, { syllables: true, joins: true });
    });
  };

  it("a rule that names '+' sees joins: t → d only right after one", () => {
    const r = rule("voice", [seg("t")], [chBun("+voice")], [env([{ kind: "boundary", which: "join", span: seg("t").span }], [])]);
    expect(check(grammar([r], extra), ["#a+ta#", "#ata#", "#at+a#"])).toEqual(["a+da", "ata", "at+a"]);
  });

  it("a rule that does not name '+' reads through it: V _ V matches across a join", () => {
    const r = rule("voice", [seg("t")], [chBun("+voice")], [env([V], [V])]);
    expect(check(grammar([r], extra), ["#a+ta#", "#at+a#", "#a+t+a#"])).toEqual(["a+da", "ad+a", "a+d+a"]);
  });

  it("a deletion keeps the joins it spans; an insertion goes after a join it cannot see", () => {
    const del = rule("drop", [seg("t"), seg("k")], [], [env([V], [])]);
    const ins = rule("ins", [], [seg("n")], [env([seg("p")], [V])]);
    expect(check(grammar([del], extra), ["#at+ka#"])).toEqual(["a+a"]);
    expect(check(grammar([ins], extra), ["#ap+a#"])).toEqual(["ap+na"]);
  });

  it("default stress ignores joins: a syllable's weight is read without them", () => {
    const gr = grammar([syllabifyStep(), stressStep("right", 2, null)], { ...extra, onsets: null, codas: null });
    expect(check(gr, ["#pa+ta+ka#"])).toEqual(["pa+ˈta+.ka"]);
  });
});
