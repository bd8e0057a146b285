// Differential tests: compiled machines against the reference interpreter on random rules,
// random small grammars (rules, syllabify, stress) and random words over the tiny inventory.

import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { grammar, classDef, nodeDef, bun, syllabifyStep, stressStep, rule, seg, chBun, env, opt } from "../support/ast.js";
import { symsOf } from "../support/words.js";
import { compileGrammar, compileSteps } from "../../src/compile/index.js";
import { applyAll } from "../../src/fst/index.js";
import { applyGrammar, applyRuleDetailed, ruleContext, wordKey, type Sym } from "../../src/interp/index.js";
import { desugar, isBoundaryBlind } from "../../src/grammar/index.js";
import type { Grammar, Rule, Step } from "../../src/grammar/ast.js";
import { StrataError } from "../../src/diagnostics.js";
import { clusterListArb, heavyArb, joinModeArb, joinsField, ruleArb, stressArb, wordArb } from "./gen.js";
import { arbGrammar, arbWord } from "../support/arb-grammar.js";
import { fcSeed } from "../support/fc-seed.js";

// The run's seed (tests/support/fc-seed.ts: STRATA_FC_SEED replays one); written to stderr first so
// that even a run that dies can be replayed. CI uses a fixed seed: one fresh-clone CI run in several
// died out of memory on a random grammar not yet found again (see the closing note); local runs
// explore new seeds.
const SEED = fcSeed();
process.stderr.write(`compile/differential: fast-check seed ${SEED}\n`);

const extra = { classes: [classDef("V", [bun("+syllabic")])], nodes: [nodeDef("place", ["labial", "coronal"])] };
const interpOptsOf = (g: Grammar) => ({ desugar: (r: Rule) => desugar(r, { inventory: inv, classes: g.classes, nodes: g.nodes }), isBoundaryBlind: (r: Rule) => isBoundaryBlind(r), maxVariants: 2000 });
const desugarIn = (g: Grammar) => (r: Rule) => desugar(r, { inventory: inv, classes: g.classes, nodes: g.nodes });

/** Does the interpreter accept this rule (prepare without errors)? */
function interpretable(r0: Rule, g: Grammar, w: Sym[]): boolean {
  const r = desugarIn(g)(r0);
  try {
    applyRuleDetailed(r, { ...ruleContext(g, inv, r), boundaryBlind: isBoundaryBlind(r) }, w);
    return true;
  } catch (e) {
    if (e instanceof StrataError) return false;
    throw e;
  }
}

/** Every segment the words carry: the compiler's alphabet starts from them (segments no rule makes included). */
const segmentsOf = (words: readonly Sym[][]) => words.flat().flatMap((s) => (s.kind === "segment" ? [s.bundle] : []));

/** Random words, some with segments outside the inventory (a feature changed, as by a diacritic). */
const anyWordArb = fc.oneof({ weight: 2, arbitrary: wordArb }, { weight: 1, arbitrary: arbWord(inv, { dots: true, unseen: true }) });

function checkGrammar(g: Grammar, words: Sym[][]): void {
  const res = compileGrammar(g, inv, { maxStates: 400, extraSegments: segmentsOf(words) });
  expect(res.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  const c = res.compiled!;
  for (const w of words) {
    const ids = c.encode(w)!;
    const v = c.variants(ids, 2000);
    // Past the cap only the preferred output is compared: the interpreter keeps up to the cap per
    // variant and step, which for optional rules applying everywhere is millions of words.
    const run = applyGrammar(g, inv, w, v.capped ? { ...interpOptsOf(g), maxVariants: 16 } : interpOptsOf(g));
    if (!run.capped && !v.capped) {
      const got = v.outputs.map((o) => wordKey(c.decode(o))).sort();
      const exp = run.outputs.map(wordKey).sort();
      expect(got, `word ${wordKey(w)}`).toEqual(exp);
    }
    const out: number[] = [];
    expect(c.preferred.run(ids, out)).toBe(true);
    expect(wordKey(c.decode(out)), `preferred of ${wordKey(w)}`).toBe(wordKey(run.preferred));
  }
}

describe("compiled rules agree with the interpreter", () => {
  it("one random rule: every output (sets) and the preferred output, per word", () => {
    fc.assert(
      fc.property(ruleArb, fc.array(anyWordArb, { minLength: 1, maxLength: 6 }), (r, words) => {
        const g = grammar([r], extra);
        if (!interpretable(r, g, words[0]!)) return;
        const extraSegments = segmentsOf(words);
        const steps = compileSteps(g, inv, { extraSegments });
        expect(steps.diagnostics).toEqual([]);
        const { alphabet, steps: [m] } = steps.result!;
        const rd = desugarIn(g)(r);
        const ctx = { ...ruleContext(g, inv, rd), boundaryBlind: isBoundaryBlind(rd) };
        const dec = compileGrammar(g, inv, { extraSegments }).compiled!;
        void alphabet;
        for (const w of words) {
          const exp = applyRuleDetailed(rd, ctx, w);
          const ids = dec.encode(w)!;
          const all = applyAll(m!.variants, ids, 10_000);
          // An optional insertion before each of 14 symbols has 2¹⁴ outputs: past the cap only the preferred one is compared.
          if (!all.capped) expect(all.outputs.map((o) => wordKey(dec.decode(o))).sort(), `word ${wordKey(w)}`).toEqual(exp.outputs.map(wordKey).sort());
          const pref = m!.preferred === null ? [ids] : applyAll(m!.preferred, ids, 10).outputs;
          expect(pref.length, `preferred of ${wordKey(w)} is one output`).toBe(1);
          expect(wordKey(dec.decode(pref[0]!))).toBe(wordKey(exp.preferred));
        }
      }),
      { numRuns: 250 },
    );
  });

  it("syllabify with random onset and coda lists and a random joins mode", () => {
    fc.assert(
      fc.property(clusterListArb, clusterListArb, joinModeArb, fc.array(wordArb, { minLength: 1, maxLength: 8 }), (onsets, codas, joins, words) => {
        checkGrammar(grammar([syllabifyStep()], { ...extra, onsets, codas, ...joinsField(joins, onsets, codas) }), words);
      }),
      { numRuns: 150 },
    );
  });

  it("default stress, fixed and weight-sensitive, after syllabify", () => {
    fc.assert(
      fc.property(stressArb, heavyArb, clusterListArb, fc.array(wordArb, { minLength: 1, maxLength: 8 }), (st, heavy, onsets, words) => {
        const steps: Step[] = [syllabifyStep(), stressStep(st.edge, st.position, st.otherwise)];
        checkGrammar(grammar(steps, { ...extra, onsets, heavy }), words);
      }),
      { numRuns: 150 },
    );
  });

  it("random grammars: rules, syllabify and stress in random order, whole cascade", () => {
    fc.assert(
      fc.property(
        fc.array(ruleArb, { minLength: 1, maxLength: 3 }), stressArb, heavyArb, clusterListArb, clusterListArb, joinModeArb,
        fc.array(anyWordArb, { minLength: 1, maxLength: 5 }), fc.nat(),
        (rules, st, heavy, onsets, codas, joins, words, seed) => {
          const named = rules.map((r, i) => ({ ...r, name: `r${i}` }));
          const g0 = grammar(named, extra);
          if (!named.every((r) => interpretable(r, g0, words[0]!))) return;
          const steps: Step[] = [...named];
          steps.splice(seed % (steps.length + 1), 0, syllabifyStep());
          steps.splice((seed >> 3) % (steps.length + 1), 0, stressStep(st.edge, st.position, st.otherwise));
          checkGrammar(grammar(steps, { ...extra, onsets, codas, heavy, ...joinsField(joins, onsets, codas) }), words);
        },
      ),
      { numRuns: 70 },
    );
  });

  it("the shared random grammars (tests/support) × random words, with and without '.'", () => {
    fc.assert(
      fc.property(arbGrammar(), fc.array(fc.oneof(arbWord(inv, { dots: true }), arbWord(inv), arbWord(inv, { unseen: true })), { minLength: 1, maxLength: 5 }), ({ grammar: g }, words) => {
        checkGrammar(g, words);
      }),
      { numRuns: 50 },
    );
    // About a minute on a quiet 2-core machine; twice that when the machine is shared.
  }, 300_000);
});

describe("a node variable bound only in an optional context element", () => {
  // Unbound on the match path, the interpreter gives it every place combination of the inventory's
  // segments; bound, the matched segment's — here tʷ, made by the first rule, whose place
  // [+labial +coronal] no inventory segment has.
  it("ranges over the inventory's combinations when unbound, and takes a derived one when bound", () => {
    const lab = rule("labialise", [seg("t")], [chBun("+labial")], [env([], [seg("n")])]);
    const assim = rule("assimilate", [seg("n")], [chBun("αplace")], [env([opt(bun("-syllabic αplace"))], [])]);
    const g = grammar([lab, assim], extra);
    const words = ["#tn#", "#atna#", "#an#", "#tan#", "#pn#"].map((w) => symsOf(w, inv));
    checkGrammar(g, words);
    const c = compileGrammar(g, inv).compiled!;
    const outs = c.variants(c.encode(words[0]!)!).outputs.map((o) => c.decode(o));
    // "tn": the bound path gives n the place of tʷ; the unbound one, each inventory combination.
    expect(outs.length).toBe(4);
  });
});
