// Property tests of the interpreter on random grammars and words: it never fails on valid input,
// and the algebraic facts the semantics imply hold (transparency, mirror image, optionality).

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import type { Element, Environment, Pattern, ProsodicCondition, Rule } from "../../src/grammar/ast.js";
import { checkGrammar } from "../../src/grammar/index.js";
import { applyGrammar, applyRule, applyRuleDetailed, isBoundaryBlind, syllabify, wordKey } from "../../src/interp/index.js";
import type { RuleContext, Sym } from "../../src/interp/index.js";
import { ARB_CLASSES, ARB_NODES, arbGrammar, arbWord } from "../support/arb-grammar.js";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { clusters } from "../support/ast.js";
import { resolveClusters } from "../../src/interp/index.js";

const classes = new Map(ARB_CLASSES.map((c) => [c.name, c] as const));
const nodes = new Map(ARB_NODES.map((n) => [n.name, n] as const));
const ctxFor = (r: Rule, conditions: "desugared" | "direct" = "desugared"): RuleContext => ({ inv, classes, nodes, boundaryBlind: isBoundaryBlind(r), conditions });
const rules = arbGrammar({ maxRules: 1, prosody: false }).map((g) => g.grammar.steps[0] as Rule);
const isDot = (s: Sym): boolean => s.kind === "boundary" && s.which === "syllable";
const undotted = (w: readonly Sym[]): string => wordKey(w.filter((s) => !isDot(s)));

describe("the interpreter on random grammars", () => {
  it("runs every generated grammar without diagnostics; the preferred output is one of the outputs", () => {
    fc.assert(
      fc.property(arbGrammar(), arbWord(inv), ({ grammar }, w) => {
        const r = applyGrammar(grammar, inv, w, { maxVariants: 8 });
        expect(r.diagnostics).toEqual([]);
        expect(r.outputs.length).toBeGreaterThan(0);
        expect(r.outputs.length).toBeLessThanOrEqual(8);
        expect(r.outputs.map(wordKey)).toContain(wordKey(r.preferred));
        expect(r.trace.map((t) => t.step)).toEqual(grammar.steps.map((s) => s.name));
        for (const o of r.outputs) {
          expect(o[0]).toEqual({ kind: "boundary", which: "word" });
          expect(o[o.length - 1]).toEqual({ kind: "boundary", which: "word" });
        }
      }),
      { numRuns: 300 },
    );
  });

  it("boundary-blind rules ignore '.': removing the dots before or after gives the same words", () => {
    fc.assert(
      fc.property(rules.filter((r) => isBoundaryBlind(r)), arbWord(inv, { dots: true }), (r, w) => {
        const withDots = applyRule(r, ctxFor(r), w).map(undotted).sort();
        const without = applyRule(r, ctxFor(r), w.filter((s) => !isDot(s))).map(undotted).sort();
        expect([...new Set(withDots)]).toEqual([...new Set(without)]);
      }),
      { numRuns: 300 },
    );
  });

  it("right-to-left is the mirror image of left-to-right (rules with a target)", () => {
    fc.assert(
      fc.property(rules.filter((r) => r.target.length > 0), arbWord(inv, { dots: true }), (r0, w) => {
        const r2l: Rule = { ...r0, mode: "right-to-left" };
        const l2r = mirrorRule({ ...r0, mode: "left-to-right" });
        const direct = applyRule(r2l, ctxFor(r2l), w).map(wordKey).sort();
        const mirrored = applyRule(l2r, ctxFor(l2r), [...w].reverse()).map((o) => wordKey([...o].reverse())).sort();
        expect(direct).toEqual(mirrored);
      }),
      { numRuns: 300 },
    );
  });

  it("an optional rule has every output of its obligatory form; its preferred variants are the obligatory output and the input", () => {
    fc.assert(
      fc.property(rules, arbWord(inv, { dots: true }), (r0, w) => {
        const obligatory: Rule = { ...r0, optional: false, prefer: "applied" };
        const applied: Rule = { ...r0, optional: true, prefer: "applied" };
        const unapplied: Rule = { ...r0, optional: true, prefer: "unapplied" };
        const ob = applyRuleDetailed(obligatory, ctxFor(obligatory), w);
        const opt = applyRuleDetailed(applied, ctxFor(applied), w);
        const optKeys = new Set(opt.outputs.map(wordKey));
        for (const o of ob.outputs) expect(optKeys.has(wordKey(o))).toBe(true);
        expect(wordKey(opt.preferred)).toBe(wordKey(ob.preferred));
        expect(wordKey(applyRuleDetailed(unapplied, ctxFor(unapplied), w).preferred)).toBe(wordKey(w));
        expect(optKeys.has(wordKey(w))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it("the front end's desugaring agrees with the conditions read one by one (DEVELOPERS.md table) on syllabified words", () => {
    // Only on syllabified words: on a string without '.', "the syllable of the target" is not
    // defined, and the two readings may differ there (the checker warns about such grammars).
    const on = resolveClusters(clusters("p t k b d n pn tn kn"), inv).list;
    const co = resolveClusters(clusters("p t k n nt"), inv).list;
    const withConditions = rules.filter((r) => r.environments.some((e) => e.conditions.length > 0));
    fc.assert(
      fc.property(withConditions, arbWord(inv, { maxLength: 6 }), (r, w0) => {
        const w = syllabify(w0, on, co, inv).word;
        const a = applyRule(r, ctxFor(r, "desugared"), w).map(wordKey);
        const b = applyRule(r, ctxFor(r, "direct"), w).map(wordKey);
        expect(a).toEqual(b);
      }),
      { numRuns: 400 },
    );
  });

  it("generated grammars pass the grammar checker without errors", () => {
    fc.assert(
      fc.property(arbGrammar(), ({ grammar }) => {
        expect(checkGrammar(grammar, inv).filter((d) => d.severity === "error")).toEqual([]);
      }),
      { numRuns: 200 },
    );
  });
});

// ---- mirror images of rules, for the right-to-left property ----

const MIRROR: Record<ProsodicCondition, ProsodicCondition> = {
  onset: "coda", coda: "onset", "syllable-initial": "syllable-final", "syllable-final": "syllable-initial",
  "word-initial": "word-final", "word-final": "word-initial", nucleus: "nucleus", stressed: "stressed", unstressed: "unstressed", primary: "primary",
};

function mirrorPattern(p: Pattern): Pattern {
  switch (p.kind) {
    case "element": return p;
    case "sequence": return { ...p, items: [...p.items].reverse().map(mirrorPattern) };
    case "optional": return { ...p, body: mirrorPattern(p.body) };
    case "choice": return { ...p, options: p.options.map(mirrorPattern) };
    case "repeat": return { ...p, body: mirrorPattern(p.body) };
  }
}

function mirrorRule(r: Rule): Rule {
  const mirrorEnv = (e: Environment): Environment => ({
    ...e, left: mirrorPattern(e.right), right: mirrorPattern(e.left), conditions: e.conditions.map((c) => ({ ...c, condition: MIRROR[c.condition] })),
  });
  const unless = r.unless?.map(mirrorEnv);
  return { ...r, target: [...r.target].reverse() as Element[], change: [...r.change].reverse(), environments: r.environments.map(mirrorEnv), ...(unless ? { unless } : {}) };
}
