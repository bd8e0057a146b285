// Derivations from the compiled steps (src/analyze/explain.ts) against the reference interpreter's
// trace: the form after every step, the surface variants, and the table and JSON written for them.

import { describe, it, expect, beforeAll } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import type { Grammar } from "../../src/grammar/ast.js";
import type { Inventory } from "../../src/inventory/types.js";
import { applyGrammar, prepareGrammar, wordKey, WORD_EDGE, SYLLABLE_EDGE, JOIN_EDGE, type Sym, type PreparedGrammar } from "../../src/interp/index.js";
import { Deriver, explain } from "../../src/analyze/explain.js";
import { explanationJson, explanationTable } from "../../src/analyze/explain-format.js";
import { readRows } from "../../src/analyze/commands.js";
import { FIRST_SEGMENT } from "../../src/compile/index.js";
import { tokenise } from "../../src/inventory/index.js";
import { applyStress } from "../../src/lexicon/read.js";

export function decode(d: Deriver, ids: readonly number[]): Sym[] {
  return ids.map((id) => (id === 1 ? WORD_EDGE : id === 2 ? SYLLABLE_EDGE : id === 3 ? JOIN_EDGE : { kind: "segment", bundle: d.alphabet.segments[id - FIRST_SEGMENT]!.bundle }));
}

/** The interpreter's preferred form after each step: one prepared prefix of the grammar per step. */
export function interpreterForms(prefixes: readonly PreparedGrammar[], inv: Inventory, word: Sym[]): string[] {
  return prefixes.map((p) => wordKey(applyGrammar(p, inv, word).preferred));
}

export const prefixesOf = (g: Grammar, inv: Inventory): PreparedGrammar[] => g.steps.map((_, k) => prepareGrammar({ ...g, steps: g.steps.slice(0, k + 1) }, inv));

describe("explain on the en-us grammars", () => {
  for (const variety of ["grammar", "careful"]) {
    describe(variety, () => {
      let d: Deriver;
      let inv: Inventory;
      let g: Grammar;
      beforeAll(() => {
        const l = loadGrammar(`lexicons/en-us/${variety}.strata`);
        g = l.grammar!;
        inv = l.inventory!;
        d = Deriver.build(g, inv).deriver!;
      }, 120_000);

      it("every step's form equals the interpreter's trace, and the surface variants its outputs (demo lexicon)", async () => {
        const { rows } = await readRows("lexicons/demo/lexicon.csv", inv, "lexicons/demo/lexicon.csv");
        const prefixes = prefixesOf(g, inv);
        const full = prepareGrammar(g, inv);
        let checked = 0;
        for (const row of rows.filter((_, i) => i % 4 === 0)) {
          const e = explain(d, { label: row.word, word: row.symbols })!;
          const word = [WORD_EDGE, ...row.symbols, WORD_EDGE];
          const expected = interpreterForms(prefixes, inv, word);
          const pref = e.derivations[0]!;
          expect(pref.preferred).toBe(true);
          let cur = wordKey(decode(d, e.underlying));
          pref.steps.forEach((s, k) => {
            if (s.form !== null) cur = wordKey(decode(d, s.form));
            expect(cur, `${row.word} after ${s.step}`).toBe(expected[k]);
          });
          const run = applyGrammar(full, inv, word);
          expect(e.derivations.map((x) => wordKey(decode(d, x.surface))).sort(), row.word).toEqual(run.outputs.map(wordKey).sort());
          checked++;
        }
        expect(checked).toBeGreaterThan(50);
      }, 120_000);
    });
  }

  it("writes the trade's table: underlying form, one row per step (a dash where it did not apply), surface; variants side by side", () => {
    const l = loadGrammar("lexicons/en-us/grammar.strata");
    const d = Deriver.build(l.grammar!, l.inventory!).deriver!;
    const inv = l.inventory!;
    const t = tokenise(inv, "ˈbʌtən");
    const w = t.ok ? applyStress(inv, t.tokens) : null;
    const e = explain(d, { label: "button", word: w !== null && w.ok ? w.symbols : [] })!;
    const table = explanationTable(d, e);
    const lines = table.split("\n");
    expect(lines[0]).toBe("button");
    expect(lines[1]).toMatch(/preferred \*\s+variant 2/);
    expect(table).toMatch(/^underlying\s+\/ˈbʌtən\/\s+\/ˈbʌtən\/$/m);
    expect(table).toMatch(/^glottal-stop\s+ˈbʌ\.ʔn̩\s+—$/m);
    expect(table).toMatch(/^surface\s+\[ˈbʌ\.ʔn̩\]\s+\[ˈbʌ\.tn̩\]$/m);
    // The caret under the glottal stop: the column of ʔ in the line above.
    const g = lines.findIndex((x) => x.startsWith("glottal-stop"));
    expect(lines[g + 1]!.indexOf("^")).toBe(lines[g]!.indexOf("ʔ"));
    const json = explanationJson(d, e) as { derivations: { preferred: boolean; surface: string; steps: { step: string; applied: boolean; segments?: string[]; changed?: number[]; changes?: string }[] }[] };
    const gs = json.derivations[0]!.steps.find((s) => s.step === "glottal-stop")!;
    expect(gs.changed!.map((i) => gs.segments![i])).toEqual(["ʔ"]);
    expect(gs.changes).toBe("t → ʔ");
    expect(json.derivations[1]!.steps.find((s) => s.step === "glottal-stop")!.applied).toBe(false);
  }, 120_000);
});
