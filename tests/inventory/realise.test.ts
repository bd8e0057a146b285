// The IPA writer: exact symbols, base symbol plus diacritics in customary order, NFC output,
// errors naming the bundle, and the round trip tokenise(realise(b)) = b.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { bundleKey, bundleOf, realise, tokenise, type Bundle, type FeatureValue, type Inventory } from "../../src/inventory/index.js";
import { marksOnFirstLetter, withMarksAfterFirst } from "../../src/inventory/diphthong.js";
import { enUs, inventoryOf, segmentsOf } from "./helpers.js";

const nonProsodic = (inv: Inventory, b: Bundle): string => bundleKey(b.slice(0, inv.features.length - 2));

function withValues(inv: Inventory, b: Bundle, values: Record<string, FeatureValue>): Bundle {
  const out = b.slice();
  for (const [f, v] of Object.entries(values)) out[inv.featureIndex.get(f)!] = v;
  return out;
}

/** realise, then read back; returns the text after checking the round trip. */
function roundTrip(inv: Inventory, b: Bundle): string {
  const r = realise(inv, b);
  if (!r.ok) throw new Error(r.error);
  const t = tokenise(inv, r.text);
  expect(t.ok).toBe(true);
  if (!t.ok) return r.text;
  const segs = segmentsOf(t.tokens);
  expect(segs).toHaveLength(1);
  expect(nonProsodic(inv, segs[0]!)).toBe(nonProsodic(inv, b));
  return r.text;
}

describe("realise", () => {
  it("writes every inventory segment as its own symbol and reads it back", () => {
    const inv = enUs();
    for (const s of inv.segments) expect(roundTrip(inv, s.bundle)).toBe(s.symbol);
  });

  it("round-trips every diacritic a feature change can add, on every base segment", () => {
    const inv = enUs();
    let checked = 0;
    for (const s of inv.segments) {
      for (const d of inv.diacritics) {
        const b = s.bundle.slice();
        let changes = false;
        for (const [f, v] of d.sets) {
          if (b[f] !== v) changes = true;
          b[f] = v;
        }
        if (!changes) continue;
        const text = roundTrip(inv, b);
        checked++;
        // With no inventory segment for the changed bundle, the text is a base plus exactly this mark.
        const exact = inv.segments.find((x) => nonProsodic(inv, x.bundle) === nonProsodic(inv, b));
        // (Another base may need the same single mark: ɛ velarised is ɪ velarised, since ˠ sets [+high].)
        // The mark may be written above a base with a descender (its declared alias: ŋ̊ for ŋ̥).
        // On a diphthong the mark follows its first letter (inventory/diphthong.ts: ãɪ, aːɪ).
        const written = (x: (typeof inv.segments)[number], m: string): string =>
          marksOnFirstLetter(inv, x.symbol, x.bundle) ? withMarksAfterFirst(x.symbol, [m]) : (x.symbol + m).normalize("NFC");
        if (!exact) expect(inv.segments.some((x) => [d.mark, ...d.aliases].some((m) => written(x, m) === text))).toBe(true);
      }
    }
    expect(checked).toBeGreaterThan(300);
  });

  it("writes diacritics in customary order: dental before aspiration, nasal before length", () => {
    const inv = enUs();
    const t = bundleOf(inv, "t")!;
    expect(roundTrip(inv, withValues(inv, t, { distributed: "+", spread_glottis: "+" }))).toBe("t\u032Aʰ");
    const ae = bundleOf(inv, "æ")!;
    expect(roundTrip(inv, withValues(inv, ae, { long: "+", nasal: "+" }))).toBe("æ\u0303ː");
    const l = bundleOf(inv, "l")!;
    expect(roundTrip(inv, withValues(inv, l, { voice: "-", labial: "+", round: "+" }))).toBe("l\u0325ʷ");
    expect(roundTrip(inv, withValues(inv, l, { dorsal: "+", high: "+", low: "-", front: "-", back: "+", syllabic: "+" }))).toBe("ɫ\u0329");
  });

  it("prefers an inventory symbol to a base plus diacritics (lˠ is written ɫ)", () => {
    const inv = enUs();
    expect(realise(inv, bundleOf(inv, "lˠ")!)).toEqual({ ok: true, text: "ɫ" });
  });

  it("ignores prosodic features", () => {
    const inv = enUs();
    const a = bundleOf(inv, "æ")!;
    expect(realise(inv, withValues(inv, a, { stress: "+", primary: "+" }))).toEqual({ ok: true, text: "æ" });
  });

  it("writes NFC, composing where Unicode has a precomposed letter, never NFKC", () => {
    const inv = enUs();
    const i = bundleOf(inv, "i")!;
    const r = realise(inv, withValues(inv, i, { nasal: "+" }));
    expect(r).toEqual({ ok: true, text: "\u0129" }); // Unicode: U+0129 LATIN SMALL LETTER I WITH TILDE = i + U+0303
    const p = realise(inv, withValues(inv, bundleOf(inv, "p")!, { spread_glottis: "+" }));
    expect(p).toEqual({ ok: true, text: "p\u02B0" });
    if (p.ok) expect(p.text.normalize("NFKC")).toBe("ph"); // what NFKC would have done to it
  });

  it("names the bundle it cannot write", () => {
    const inv = enUs();
    const r = realise(inv, withValues(inv, bundleOf(inv, "t")!, { lateral: "+", nasal: "+" }));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error).toMatch(/^No inventory symbol and declared diacritics write \[/);
      expect(r.error).toContain("+lateral");
      expect(r.error).toContain("+nasal");
    }
  });

  it("rejects a bundle of the wrong length", () => {
    const r = realise(enUs(), ["+", "-"]);
    expect(r.ok).toBe(false);
  });

  it("is deterministic and independent of call order (memo per inventory)", () => {
    const csv = "symbol,voice,nasal,spread\np,-,-,-\nb,+,-,-\nm,+,+,-\n";
    const dia = "mark,name,sets\nʰ,aspirated,+spread\nU+0325,voiceless,-voice\n";
    const one = inventoryOf(csv, dia);
    const two = inventoryOf(csv, dia);
    const m̥ʰ: Bundle = ["-", "+", "+", "0", "0"];
    expect(realise(one, m̥ʰ)).toEqual({ ok: true, text: "m\u0325ʰ" });
    expect(realise(one, m̥ʰ)).toEqual(realise(two, m̥ʰ));
  });

  it("chooses the base needing the fewest diacritics, then the earliest in the inventory", () => {
    const csv = "symbol,voice,nasal,long\np,-,-,-\nb,+,-,-\nm,+,+,-\n";
    const dia = "mark,name,sets\nU+0303,nasalised,+nasal\nU+032C,voiced,+voice\n";
    const inv = inventoryOf(csv, dia);
    // [+voice +nasal +long]: not writable (no mark for long).
    expect(realise(inv, ["+", "+", "+", "0", "0"]).ok).toBe(false);
    // [-voice +nasal -long]: p + nasal (1 mark), not b? b would need voiceless, not declared.
    expect(realise(inv, ["-", "+", "-", "0", "0"])).toEqual({ ok: true, text: "p\u0303" });
  });

  it("property: any base with any declared diacritics round-trips, NFC, marks in declared order", () => {
    const inv = enUs();
    const n = inv.diacritics.length;
    fc.assert(
      fc.property(fc.nat(inv.segments.length - 1), fc.subarray([...Array(n).keys()]), (s, picks) => {
        const b = inv.segments[s]!.bundle.slice();
        for (const k of picks) for (const [f, v] of inv.diacritics[k]!.sets) b[f] = v;
        const r = realise(inv, b);
        if (!r.ok) {
          // A conflicting pair (e.g. syllabic + non-syllabic) never sets both values; anything we
          // built by applying marks must be writable.
          throw new Error(r.error);
        }
        expect(r.text).toBe(r.text.normalize("NFC"));
        roundTrip(inv, b);
        // Customary order: after the base, combining marks (in NFD) come before modifier letters, and
        // the length mark is last.
        const tail = Array.from(r.text.normalize("NFD")).filter((c) => /\p{Mn}|\p{Lm}/u.test(c));
        const firstModifier = tail.findIndex((c) => /\p{Lm}/u.test(c));
        if (firstModifier >= 0) expect(tail.slice(firstModifier).every((c) => /\p{Lm}/u.test(c))).toBe(true);
        const len = tail.indexOf("ː");
        if (len >= 0) expect(len).toBe(tail.length - 1);
      }),
      { numRuns: 500 },
    );
  });
});

describe("marks on symbols with a descender", () => {
  const inv = enUs();
  const write = (ipa: string): string => {
    const t = tokenise(inv, ipa);
    if (!t.ok || t.tokens[0]?.kind !== "segment") throw new Error(`cannot read ${ipa}`);
    const r = realise(inv, t.tokens[0].bundle);
    if (!r.ok) throw new Error(r.error);
    return r.text;
  };
  it("the voiceless and syllabic marks go above j ɡ ŋ, below elsewhere", () => {
    // Handbook of the IPA (1999), notes to the diacritics chart (from memory): a mark may be put above a
    // symbol with a descender, e.g. ŋ̊
    expect(write("j\u0325")).toBe("j\u030A");
    expect(write("ŋ\u0325")).toBe("ŋ\u030A");
    expect(write("ŋ\u0329")).toBe("ŋ\u030D");
    // no descender: the mark stays below (Unicode U+0325 COMBINING RING BELOW)
    expect(write("l\u030A")).toBe("l\u0325");
    expect(write("w\u0325")).toBe("w\u0325");
  });
});

