// The pronunciation fast path (src/lexicon/pron.ts) against the general tokeniser + stress
// placement it stands in for: the same symbols (bundles) and the same stress flag on every string
// it accepts, and it accepts the common case (so the comparison is not empty).

import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { loadInventory, tokenise } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { applyStress } from "../../src/lexicon/read.js";
import { PronReader } from "../../src/lexicon/pron.js";
import { toKey } from "../../src/interp/types.js";

// A run's seed (set STRATA_FC_SEED to replay one), printed first; fixed under CI.
const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 415263 : Date.now() % 2 ** 31));
fc.configureGlobal({ seed: SEED });
process.stderr.write(`lexicon/pron: fast-check seed ${SEED}\n`);

const dir = fileURLToPath(new URL("../../lexicons/en-us/", import.meta.url));
const loaded = loadInventory(`${dir}segments.csv`, `${dir}diacritics.csv`);
if (loaded.inventory === undefined) throw new Error("en-us inventory did not load");
const inv: Inventory = loaded.inventory;

/** The general path: tokenise, then stress marks onto nuclei; undefined on any error. */
function general(pron: string): { keys: string[]; marked: boolean } | undefined {
  const t = tokenise(inv, pron);
  if (!t.ok) return undefined;
  const s = applyStress(inv, t.tokens);
  return s.ok ? { keys: s.symbols.map(toKey), marked: s.marked } : undefined;
}

const symbols = inv.segments.map((s) => s.symbol);
const marks = inv.diacritics.flatMap((d) => [d.mark, ...d.aliases]);
// Pieces: symbols, diacritics, stress marks (IPA and ASCII), boundaries, white space, and
// characters the fast path must leave to the general one (ASCII g, tie bars, NFD forms, unknowns).
const piece = fc.oneof(
  { weight: 10, arbitrary: fc.constantFrom(...symbols) },
  { weight: 3, arbitrary: fc.constantFrom(...marks) },
  { weight: 3, arbitrary: fc.constantFrom("ˈ", "ˌ", "'", ",") },
  { weight: 2, arbitrary: fc.constantFrom(".", "#", " ", "\t", "  ") },
  { weight: 2, arbitrary: fc.constant("+") },
  { weight: 1, arbitrary: fc.constantFrom("g", "t\u0361ʃ", "d\u035Cʒ", "ĩ", "i\u0303", "ã", "x", "\u0303\u0325", "\u0325\u0303", "é", "😀", "\u00a0", "\u2028") },
);
const pron = fc.array(piece, { minLength: 1, maxLength: 12 }).map((p) => p.join(""));

describe("pronunciation fast path", () => {
  const fast = new PronReader(inv);

  it("gives the general path's symbols and stress flag wherever it answers", () => {
    let answered = 0;
    fc.assert(
      fc.property(pron, (p) => {
        const f = fast.read(p);
        if (f === undefined) return;
        answered++;
        expect(general(p)).toEqual({ keys: f.symbols.map(toKey), marked: f.marked });
      }),
      { numRuns: 3000 },
    );
    expect(answered).toBeGreaterThan(300);
  });

  it("answers the common case and shares one symbol object per distinct segment and stress", () => {
    const a = fast.read("b ˈaʊ t")!;
    const b = fast.read("ˈbaʊt.ˌaʊt")!;
    expect(a.symbols.map(toKey)).toEqual(general("b ˈaʊ t")!.keys);
    expect(a.symbols[0]).toBe(b.symbols[0]);
    expect(a.symbols[1]).toBe(b.symbols[1]);
    expect(b.symbols[4]).not.toBe(a.symbols[1]);
  });

  it("leaves every error to the general path", () => {
    for (const p of ["ˈˈa", "bˈ", "#a", "a#", "a##b", "x", "\u0303a", "aɡ ˈ"]) expect(fast.read(p)).toBeUndefined();
  });
});
