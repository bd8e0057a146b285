// Worked examples: the application modes on small words, and the nasal-assimilation cascade of
// Kaplan & Kay 1994 (from memory: "kaNpat" → "kampat" → "kammat"), with the composed machine
// checked against step-by-step application on every short word.

import { describe, expect, it } from "vitest";
import { compileGrammar, compileSteps, type Compiled } from "../../src/compile/index.js";
import { applyAll } from "../../src/fst/index.js";
import type { Rule } from "../../src/grammar/ast.js";
import type { Bundle, Diacritic, FeatureValue, Inventory, Segment } from "../../src/inventory/types.js";
import { PROSODIC_FEATURES } from "../../src/inventory/types.js";
import { WORD_EDGE, applyGrammar, wordKey, type Sym } from "../../src/interp/index.js";
import { desugar, isBoundaryBlind } from "../../src/grammar/index.js";
import { bun, chSeg, env, grammar, rule, seg, SB, WB } from "../support/ast.js";
import { tinyInventory } from "../support/tiny-inventory.js";
import { ipaOf, symsOf } from "../support/words.js";

/** Runs the preferred cascade and lists every variant, as IPA without '#'. */
function run(c: Compiled, inv: Inventory, text: string): { preferred: string; all: string[] } {
  const ids = c.encode(symsOf(text, inv))!;
  const out: number[] = [];
  expect(c.preferred.run(ids, out)).toBe(true);
  return { preferred: ipaOf(c.decode(out), inv), all: c.variants(ids).outputs.map((o) => ipaOf(c.decode(o), inv)).sort() };
}

function compiled(rules: Rule[], inv: Inventory = tinyInventory): Compiled {
  const r = compileGrammar(grammar(rules), inv);
  expect(r.diagnostics).toEqual([]);
  return r.compiled!;
}

describe("application modes (DEVELOPERS.md, Application)", () => {
  // a → i / i _ : the left context is read from the input (simultaneous, right-to-left) or from
  // the output written so far (left-to-right), so left-to-right application feeds itself.
  const spread = (mode: Rule["mode"]): Rule => rule("spread", [seg("a")], [chSeg("i")], [env([seg("i")], [])], { mode });
  it("left context: left-to-right feeds, simultaneous and right-to-left do not", () => {
    expect(run(compiled([spread("left-to-right")]), tinyInventory, "#iaaa#").preferred).toBe("iiii");
    expect(run(compiled([spread("simultaneous")]), tinyInventory, "#iaaa#").preferred).toBe("iiaa");
    expect(run(compiled([spread("right-to-left")]), tinyInventory, "#iaaa#").preferred).toBe("iiaa");
  });

  const back = (mode: Rule["mode"]): Rule => rule("back", [seg("a")], [chSeg("i")], [env([], [seg("i")])], { mode });
  it("right context: right-to-left feeds, the other modes do not", () => {
    expect(run(compiled([back("right-to-left")]), tinyInventory, "#aaai#").preferred).toBe("iiii");
    expect(run(compiled([back("simultaneous")]), tinyInventory, "#aaai#").preferred).toBe("aaii");
    expect(run(compiled([back("left-to-right")]), tinyInventory, "#aaai#").preferred).toBe("aaii");
  });

  it("overlapping two-segment targets: the leftmost wins (from the right: the rightmost)", () => {
    const r = (mode: Rule["mode"]): Rule => rule("aa", [seg("a"), seg("a")], [chSeg("i"), chSeg("i")], [], { mode });
    expect(run(compiled([r("simultaneous")]), tinyInventory, "#aaa#").preferred).toBe("iia");
    expect(run(compiled([r("right-to-left")]), tinyInventory, "#aaa#").preferred).toBe("aii");
  });

  it("an optional rule gives every variant; the preferred one applies everywhere (or nowhere)", () => {
    const opt = (prefer: "applied" | "unapplied"): Rule => rule("nas", [seg("a")], [chSeg("n")], [env([], [seg("p")])], { optional: true, prefer });
    const applied = run(compiled([opt("applied")]), tinyInventory, "#apap#");
    expect(applied.all).toEqual(["apap", "apnp", "npap", "npnp"]);
    expect(applied.preferred).toBe("npnp");
    expect(run(compiled([opt("unapplied")]), tinyInventory, "#apap#").preferred).toBe("apap");
  });

  it("insertion and deletion", () => {
    const epenthesis = rule("ep", [], [chSeg("i")], [env([bun("-syllabic")], [bun("-syllabic")])]);
    expect(run(compiled([epenthesis]), tinyInventory, "#aptka#").preferred).toBe("apitika");
    const deletion = rule("del", [seg("t")], [], [env([], [WB])]);
    expect(run(compiled([deletion]), tinyInventory, "#pat#").preferred).toBe("pa");
  });
});

// ---- Kaplan & Kay 1994 (from memory): N → m / _ p, then p → m / m _ -----------------------

const FEATURES = ["syllabic", "nasal", "labial", "coronal", "dorsal", ...PROSODIC_FEATURES] as const;
const ROWS: readonly (readonly [string, string])[] = [
  ["k", "----+"], ["a", "+----"], ["p", "--+--"], ["t", "---+-"], ["m", "-++--"], ["n", "-+-+-"], ["N", "-+000"],
];
const segments: Segment[] = ROWS.map(([symbol, v], i) => ({ symbol, bundle: [...(v.split("") as FeatureValue[]), "0", "0"] as Bundle, line: i + 2 }));
const kk: Inventory = {
  file: "kaplan-kay.csv",
  features: FEATURES,
  featureIndex: new Map(FEATURES.map((f, i) => [f, i] as const)),
  segments,
  diacritics: [] as Diacritic[],
};

describe("Kaplan & Kay 1994 nasal assimilation cascade (from memory)", () => {
  const r1 = rule("assimilate", [seg("N")], [chSeg("m")], [env([], [seg("p")])]);
  const r2 = rule("nasalise", [seg("p")], [chSeg("m")], [env([seg("m")], [])]);
  const c = compiled([r1, r2], kk);

  it("kaNpat → kampat → kammat", () => {
    expect(run(compiled([r1], kk), kk, "#kaNpat#").preferred).toBe("kampat");
    expect(run(c, kk, "#kaNpat#").preferred).toBe("kammat");
  });

  it("the composed machine equals applying the two rule machines in turn, on every word of up to 5 symbols", () => {
    const steps = compileSteps(grammar([r1, r2]), kk).result!;
    const symbols: Sym[] = ["k", "a", "p", "t", "m", "N"].map((s) => ({ kind: "segment", bundle: segments.find((x) => x.symbol === s)!.bundle }));
    let words: Sym[][] = [[]];
    let checked = 0;
    for (let len = 0; len <= 5; len++) {
      for (const body of words) {
        const ids = c.encode([WORD_EDGE, ...body, WORD_EDGE])!;
        const stepwise = steps.steps.reduce((cur, s) => cur.flatMap((w) => applyAll(s.variants, w).outputs), [ids]);
        const out: number[] = [];
        expect(c.preferred.run(ids, out)).toBe(true);
        expect([out]).toEqual(stepwise);
        checked++;
      }
      words = words.flatMap((w) => symbols.map((s) => [...w, s]));
    }
    expect(checked).toBe(1 + 6 + 36 + 216 + 1296 + 7776);
  });
});

describe("literal changes of another length than the target (coalescence, breaking)", () => {
  const g = (r: Rule) => grammar([r]);
  it("agree with the interpreter, boundary-blind or not, in every mode", () => {
    const rules: Rule[] = [];
    for (const mode of ["simultaneous", "left-to-right", "right-to-left"] as const) {
      // a i → e-like coalescence into one segment (here: 'i'), and a → a i breaking.
      rules.push(rule(`coalesce-${mode}`, [seg("a"), seg("i")], [chSeg("i")], [], { mode }));
      rules.push(rule(`break-${mode}`, [seg("a")], [chSeg("a"), chSeg("i")], [env([], [seg("t")])], { mode }));
      rules.push(rule(`three-${mode}`, [seg("p"), seg("a"), seg("t")], [chSeg("t"), chSeg("a")], [], { mode, optional: true }));
      // Sees boundaries ('$' in the context): '.' inside the target blocks it.
      rules.push(rule(`coalesce-initial-${mode}`, [seg("a"), seg("i")], [chSeg("i")], [env([SB], [])], { mode }));
    }
    const words = ["#paita#", "#ai.ai#", "#a.it#", "#pa.tat#", "#atai#", "#p.at#"];
    for (const r of rules) {
      const c = compiled([r]);
      for (const w of words) {
        const sym = symsOf(w, tinyInventory);
        const want = applyGrammar(g(r), tinyInventory, sym, { desugar: (x: Rule) => desugar(x, { inventory: tinyInventory, classes: [] }), isBoundaryBlind: (x: Rule) => isBoundaryBlind(x) });
        const ids = c.encode(sym)!;
        const got = c.variants(ids).outputs.map((o) => wordKey(c.decode(o))).sort();
        expect(got, `${r.name} on ${w}`).toEqual(want.outputs.map(wordKey).sort());
        const out: number[] = [];
        expect(c.preferred.run(ids, out)).toBe(true);
        expect(wordKey(c.decode(out)), `${r.name} on ${w} (preferred)`).toBe(wordKey(want.preferred));
      }
    }
  });
});

describe("edge cases", () => {
  it("a grammar without steps is the identity", () => {
    const c = compiled([]);
    expect(c.preferredSize.blocks).toEqual([]);
    const r = run(c, tinyInventory, "#pa.ta#");
    expect(r.preferred).toBe("pa.ta");
    expect(r.all).toEqual(["pa.ta"]);
  });

  it("a word with a segment outside the alphabet is not encoded (null), never a crash", () => {
    const c = compiled([]);
    expect(c.encode([WORD_EDGE, { kind: "segment", bundle: ["+", "+", "+", "+", "+", "0", "0"] }, WORD_EDGE])).toBeNull();
  });
});
