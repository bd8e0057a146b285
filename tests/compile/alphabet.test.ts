// The alphabet a grammar compiles over: the inventory's segments with their prosodic variants,
// closed under the rules' changes, in a deterministic order, with an error for an unwritable one.

import { describe, expect, it } from "vitest";
import { computeAlphabet, FIRST_SEGMENT, SYLL, WORD } from "../../src/compile/alphabet.js";
import { compileSteps, desugaredSteps } from "../../src/compile/index.js";
import { Lowering } from "../../src/compile/lower.js";
import { bun, chBun, env, grammar, rule, seg } from "../support/ast.js";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { variety } from "../lexicons/harness.js";

function enUsAlphabet(): ReturnType<typeof computeAlphabet> {
  const v = variety("grammar.strata");
  return computeAlphabet(v.inventory, new Lowering(v.grammar, v.inventory), desugaredSteps(v.grammar, v.inventory));
}

describe("alphabet", () => {
  it("lists every inventory segment, nuclei in their four prosodic variants, then derived segments", () => {
    const g = grammar([rule("nasalise", [bun("+syllabic")], [chBun("+nasal")], [env([], [seg("n")])])]);
    const steps = desugaredSteps(g, inv);
    const a = computeAlphabet(inv, new Lowering(g, inv), steps);
    // tiny: 6 consonants + 2 vowels × 4 variants, then 2 nasalised vowels × 4 variants.
    expect(a.segments.length).toBe(6 + 8 + 8);
    expect(a.size).toBe(FIRST_SEGMENT + 22);
    expect(a.segments.slice(0, 6).map((s) => s.text)).toEqual(["p", "t", "k", "b", "d", "n"]);
    // Unicode 15, Combining Diacritical Marks: U+0303 COMBINING TILDE marks nasalisation (IPA Handbook 1999).
    expect(new Set(a.segments.slice(14).map((s) => s.text))).toEqual(new Set(["a\u0303".normalize("NFC"), "i\u0303".normalize("NFC")]));
    expect(a.segments.every((s, i) => s.id === i + FIRST_SEGMENT)).toBe(true);
    // The nasalised vowels cannot reach the rule that makes them: its domain is the inventory's.
    expect(a.domains[0]![WORD]).toBe(1);
    expect(a.domains[0]![SYLL]).toBe(1);
    expect(a.segments.filter((s) => a.domains[0]![s.id] === 1).length).toBe(14);
  });

  it("is the same, byte for byte, when computed twice", () => {
    const v = variety("grammar.strata");
    const a1 = enUsAlphabet();
    const a2 = computeAlphabet(v.inventory, new Lowering(v.grammar, v.inventory), desugaredSteps(v.grammar, v.inventory));
    expect(a1.segments.map((s) => `${s.key} ${s.text}`)).toEqual(a2.segments.map((s) => `${s.key} ${s.text}`));
  });

  it("holds the General American allophones the rules produce", () => {
    const texts = new Set(enUsAlphabet().segments.map((s) => s.text));
    // Common practice, no source: aspirated voiceless stops, the flap, dark l and nasalised vowels
    // are General American allophones (written with U+02B0, U+027E, U+026B and U+0303).
    for (const t of ["pʰ", "tʰ", "kʰ", "ɾ", "ɫ", "æ\u0303"]) expect(texts.has(t.normalize("NFC")), t).toBe(true);
  });

  it("reports a produced segment nothing can write, at the rule's position", () => {
    // Without diacritics, a voiceless nasal t cannot be written.
    const bad = { ...rule("nasalise", [seg("t")], [chBun("+nasal")], []), span: { file: "bad.strata", line: 7, column: 3, length: 8 } };
    const r = compileSteps(grammar([bad]), { ...inv, diacritics: [] });
    expect(r.result).toBeNull();
    expect(r.diagnostics).toHaveLength(1);
    expect(r.diagnostics[0]).toMatchObject({ severity: "error", code: "compile/unwritable-segment", file: "bad.strata", line: 7, column: 3 });
    expect(r.diagnostics[0]!.message).toContain("nasalise");
  });
});
