import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { grammar, classDef, nodeDef, bun } from "../support/ast.js";
import { Lowering } from "../../src/compile/lower.js";
import { computeAlphabet } from "../../src/compile/alphabet.js";
import { SymbolLowering, lowerRule } from "../../src/compile/cases.js";
import { buildRule } from "../../src/compile/rule.js";
import { pairNfaToFst, finishMachine } from "../../src/compile/machine.js";
import { applyAll } from "../../src/fst/frozen.js";
import { applyRuleDetailed, ruleContext, type Sym } from "../../src/interp/index.js";
import { desugar, isBoundaryBlind } from "../../src/grammar/index.js";
import { bundleKey } from "../../src/inventory/types.js";
import type { Rule } from "../../src/grammar/ast.js";
import { ruleArb, wordArb } from "./gen.js";
import { StrataError } from "../../src/diagnostics.js";

const extra = { classes: [classDef("V", [bun("+syllabic")])], nodes: [nodeDef("place", ["labial", "coronal"])] };

function check(r0: Rule, words: Sym[][]): void {
  const r = desugar(r0);
  const g = grammar([r], extra);
  const low = new Lowering(g, inv);
  const blind = isBoundaryBlind(r);
  const ctx = { ...ruleContext(g, inv, r), boundaryBlind: blind };
  let interp: (w: Sym[]) => Sym[][];
  try {
    applyRuleDetailed(r, ctx, words[0]!);
    interp = (w) => applyRuleDetailed(r, ctx, w).outputs;
  } catch (e) {
    if (e instanceof StrataError) return;
    throw e;
  }
  const alpha = computeAlphabet(g, inv, low, [r]);
  const sl = new SymbolLowering(low, alpha);
  const lr = lowerRule(sl, r, { blind, domain: alpha.domains[0]! });
  const m = finishMachine(pairNfaToFst(buildRule(lr)));
  const enc = (w: Sym[]) => w.map((s) => s.kind === "boundary" ? (s.which === "word" ? 1 : 2) : alpha.byKey.get(bundleKey(s.bundle))!);
  for (const w of words) {
    const got = applyAll(m, enc(w), 1000).outputs.map((o) => o.join(" ")).sort();
    const exp = interp(w).map((o) => enc(o).join(" ")).sort();
    expect(got, `word ${enc(w).join(" ")}`).toEqual(exp);
  }
}

describe("scratch", () => {
  it("random rules agree with the interpreter", () => {
    fc.assert(fc.property(ruleArb, fc.array(wordArb, { minLength: 1, maxLength: 8 }), (r, ws) => check(r, ws)), { numRuns: 2000 });
  });
});
