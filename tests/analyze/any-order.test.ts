// The analyses run a later step before an earlier one (the counter relations, swaps), so the
// alphabet they compile over must hold what the steps make in any order. A regression found by
// tests/analyze/brute-force.test.ts (seed 931284770): voicing every consonant, then labialising
// t. Labialised t ([---++], tʷ) is made only after voicing, so the alphabet of the grammar as
// written lacks voiced labialised t (dʷ); the voicing machine, short of an image for tʷ, left it
// as it was, and the analysis said voicing counterbleeds labialisation (tʷ would escape voicing).
// In the interpreter voicing changes tʷ: no counterbleeding, only bleeding (d is no longer t).

import { describe, it, expect } from "vitest";
import { tinyBundle, tinyInventory as inv } from "../support/tiny-inventory.js";
import { ARB_CLASSES, ARB_HEAVY, ARB_NODES } from "../support/arb-grammar.js";
import { bun, chBun, cls, grammar, rule, seg } from "../support/ast.js";
import type { Grammar } from "../../src/grammar/ast.js";
import { applyGrammar, wordKey, WORD_EDGE, type Sym } from "../../src/interp/index.js";
import { bundleKey, type Bundle } from "../../src/inventory/types.js";
import { accepts } from "../../src/analyze/dfa.js";
import { analyseInteractions } from "../../src/analyze/interactions.js";
import { compileSteps, desugaredSteps, FIRST_SEGMENT, type Alphabet } from "../../src/compile/index.js";
import { computeAlphabet } from "../../src/compile/alphabet.js";
import { Lowering } from "../../src/compile/lower.js";

const g: Grammar = grammar([
  rule("r1", [cls("C")], [chBun("+voice")], []),
  rule("r2", [seg("t")], [chBun("+labial")], []),
], { nodes: ARB_NODES, classes: ARB_CLASSES, heavy: ARB_HEAVY });

const decode = (a: Alphabet, ids: readonly number[]): Sym[] =>
  ids.map((id): Sym => (id === 1 ? WORD_EDGE : { kind: "segment", bundle: a.segments[id - FIRST_SEGMENT]!.bundle }));
const word = (...b: Bundle[]): Sym[] => [WORD_EDGE, ...b.map((bundle): Sym => ({ kind: "segment", bundle })), WORD_EDGE];
/** Does rule k of `g` alone change `x` in the interpreter? */
const changes = (k: number, x: Sym[]): boolean => wordKey(applyGrammar({ ...g, steps: [g.steps[k]!] }, inv, x).preferred) !== wordKey(x);
const only = (k: number, x: Sym[]): Sym[] => applyGrammar({ ...g, steps: [g.steps[k]!] }, inv, x).preferred;

describe("the analysis alphabet, closed under the steps in any order", () => {
  it("voicing every consonant bleeds labialising t and does not counterbleed it", () => {
    const { report } = analyseInteractions(g, inv);
    const p = report!.pairs.find((q) => q.a === 0 && q.b === 1)!;
    const a = report!.machines.alphabet;
    expect(p.relations.counterbleeds).toEqual({ decided: true, value: null });
    const bleeds = p.relations.bleeds;
    expect(bleeds.decided && bleeds.value !== null).toBe(true);
    if (!bleeds.decided || bleeds.value === null) return;
    const x = decode(a, bleeds.value.input);
    expect(wordKey(x)).toBe(wordKey(word(tinyBundle("t"))));
    // The interpreter agrees: r1 changes #t# and r2 does (bleeding); r2 first gives #tʷ#, which r1 still changes.
    expect(changes(1, x) && !changes(1, only(0, x))).toBe(true);
    const labialised = only(1, x);
    expect(changes(0, x) && changes(0, labialised)).toBe(true);
    // The machines agree on the form r2 makes: it lies in r1's change domain.
    const tw = a.byKey.get(bundleKey(labialised[1]!.kind === "segment" ? labialised[1]!.bundle : []))!;
    expect(accepts(report!.domainDfas[0]!, [1, tw, 1])).toBe(true);
  });

  it("holds the compiler's alphabet as a prefix, then the symbols only another order makes", () => {
    const steps = desugaredSteps(g, inv);
    const low = new Lowering(g, inv);
    const asWritten = computeAlphabet(inv, low, steps);
    const anyOrder = computeAlphabet(inv, low, steps, [], { everyOrder: true });
    expect(compileSteps(g, inv).result!.alphabet.segments.map((s) => s.key)).toEqual(asWritten.segments.map((s) => s.key));
    expect(anyOrder.segments.slice(0, asWritten.segments.length).map((s) => s.key)).toEqual(asWritten.segments.map((s) => s.key));
    // Voiced labialised t ([-+-++]): r1 after r2 only. The tiny inventory writes it dʷ (U+02B7, its 'labialised' diacritic).
    const extra = anyOrder.segments.slice(asWritten.segments.length);
    expect(extra.map((s) => s.bundle.slice(0, 5).join(""))).toEqual(["-+-++"]);
    expect(extra[0]!.text).toBe("d\u02B7");
    // It reaches no step of the grammar as written.
    expect(anyOrder.domains.every((d) => d[extra[0]!.id] === 0)).toBe(true);
  });

  it("changes nothing for a grammar whose steps make nothing new in another order", () => {
    const h = grammar([rule("voice", [seg("t")], [chBun("+voice")], []), rule("nasal", [bun("+voice -syllabic +coronal")], [chBun("+nasal")], [])], { nodes: ARB_NODES, classes: ARB_CLASSES });
    const steps = desugaredSteps(h, inv);
    const low = new Lowering(h, inv);
    expect(computeAlphabet(inv, low, steps, [], { everyOrder: true }).segments.map((s) => s.key)).toEqual(computeAlphabet(inv, low, steps).segments.map((s) => s.key));
  });
});
