// The IPA tokeniser: longest match, diacritics, tie bars, NFC/NFD, g/ɡ, prosodic marks, spaces,
// and errors with columns and suggestions.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { bundleKey, bundleOf, realise, tokenise, type PronToken } from "../../src/inventory/index.js";
import { enUs, featureValue, segmentsOf } from "./helpers.js";

const texts = (tokens: readonly PronToken[]): string[] =>
  tokens.map((t) => (t.kind === "segment" ? t.text : t.kind === "stress" ? (t.level === "primary" ? "ˈ" : "ˌ") : t.kind === "syllable" ? "." : "#"));

const ok = (ipa: string): readonly PronToken[] => {
  const r = tokenise(enUs(), ipa);
  if (!r.ok) throw new Error(r.error.message);
  return r.tokens;
};

describe("tokenise", () => {
  it("reads diphthongs and affricates as single segments by longest match", () => {
    expect(texts(ok("tʃeɪndʒ"))).toEqual(["tʃ", "eɪ", "n", "dʒ"]);
    expect(texts(ok("bɔɪ aʊt oʊk"))).toEqual(["b", "ɔɪ", "aʊ", "t", "oʊ", "k"]);
  });

  it("treats spaces between segments as nothing, and a space as a segment break", () => {
    expect(texts(ok("t ʃ"))).toEqual(["t", "ʃ"]);
    expect(segmentsOf(ok("k æ t"))).toEqual(segmentsOf(ok("kæt")));
  });

  it("reads tie bars and their absence the same", () => {
    expect(segmentsOf(ok("t͡ʃɪp"))).toEqual(segmentsOf(ok("tʃɪp")));
    expect(segmentsOf(ok("d͜ʒɪp"))).toEqual(segmentsOf(ok("dʒɪp")));
    expect(texts(ok("t͡ʃ"))).toEqual(["tʃ"]);
  });

  it("reads NFC and NFD input the same", () => {
    const nfc = "ˈmĩ.ɾũn".normalize("NFC"); // ĩ ũ have precomposed forms (U+0129, U+0169)
    const nfd = nfc.normalize("NFD");
    expect(nfc).not.toBe(nfd);
    expect(segmentsOf(ok(nfd))).toEqual(segmentsOf(ok(nfc)));
    expect(texts(ok(nfd))).toEqual(texts(ok(nfc)));
  });

  it("reads ASCII g and ɡ (U+0261) the same and writes ɡ", () => {
    expect(segmentsOf(ok("ɡʊd"))).toEqual(segmentsOf(ok("gʊd")));
    expect(texts(ok("gʊd"))[0]).toBe("\u0261");
  });

  it("reads stress marks (IPA and ASCII), syllable and word breaks", () => {
    const t = ok("ˌʌn.ɹi'lɑɪ# ,ə");
    expect(t.filter((x) => x.kind !== "segment").map((x) => [x.kind, x.column, x.kind === "stress" ? x.level : ""])).toEqual([
      ["stress", 1, "secondary"],
      ["syllable", 4, ""],
      ["stress", 7, "primary"],
      ["word", 11, ""],
      ["stress", 13, "secondary"],
    ]);
  });

  it("applies diacritics to the base segment, in any number", () => {
    const inv = enUs();
    const [pʰ] = segmentsOf(ok("pʰ"));
    expect(featureValue(inv, pʰ!, "spread_glottis")).toBe("+");
    const [v] = segmentsOf(ok("æ̃ː"));
    expect(featureValue(inv, v!, "nasal")).toBe("+");
    expect(featureValue(inv, v!, "long")).toBe("+");
    const [l] = segmentsOf(ok("l̥"));
    expect(featureValue(inv, l!, "voice")).toBe("-");
    expect(featureValue(inv, l!, "lateral")).toBe("+");
    const [n] = segmentsOf(ok("n̩"));
    expect(featureValue(inv, n!, "syllabic")).toBe("+");
  });

  it("reads aliases: ring above for ring below, ASCII colon for length", () => {
    expect(segmentsOf(ok("ŋ̊"))).toEqual(segmentsOf(ok("ŋ̥")));
    expect(segmentsOf(ok("i:"))).toEqual(segmentsOf(ok("iː")));
    expect(segmentsOf(ok("m̍"))).toEqual(segmentsOf(ok("m̩")));
  });

  it("reads lˠ as ɫ (the velarised lateral is l with velarisation)", () => {
    expect(segmentsOf(ok("lˠ"))).toEqual(segmentsOf(ok("ɫ")));
  });

  it("gives columns relative to pos and a segment's text as read", () => {
    const r = tokenise(enUs(), "ˈtʰeɪ.bəl", { file: "lex.csv", line: 7, column: 12 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.tokens.map((t) => t.column)).toEqual([12, 13, 15, 17, 18, 19, 20]);
  });

  it("reports an unknown character with its column in the original string and suggestions", () => {
    const r = tokenise(enUs(), "ˈba\u0303r", { file: "lex.csv", line: 3, column: 10 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    // 'a' is not an en-us segment; it is the 3rd code point of the string, column 10 + 2
    expect([r.error.file, r.error.line, r.error.column, r.error.code]).toEqual(["lex.csv", 3, 12, "ipa/unknown-symbol"]);
    expect(r.error.message).toContain("nearest known: ɑ æ ʌ aɪ");
    const r2 = tokenise(enUs(), "kæ\u0303r");
    expect(r2.ok).toBe(false);
    if (r2.ok) return;
    expect(r2.error.column).toBe(4);
    expect(r2.error.message).toContain("ɹ");
  });

  it("reports an undeclared combining mark and a diacritic with no segment", () => {
    const r = tokenise(enUs(), "ka\u0330".replace("a", "æ"));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.column).toBe(3);
      expect(r.error.message).toContain("U+0330");
    }
    const s = tokenise(enUs(), "ʰæt");
    expect(s.ok).toBe(false);
    if (!s.ok) {
      expect(s.error.code).toBe("ipa/stray-diacritic");
      expect(s.error.column).toBe(1);
    }
  });

  it("bundleOf reads exactly one segment", () => {
    const inv = enUs();
    expect(bundleOf(inv, "tʰ")).toBeDefined();
    expect(bundleOf(inv, "tʰæ")).toBeUndefined();
    expect(bundleOf(inv, "ˈæ")).toBeUndefined();
    expect(bundleOf(inv, "q")).toBeUndefined();
  });

  it("property: any sequence of inventory symbols, spaced, reads back segment for segment", () => {
    const inv = enUs();
    const syms = inv.segments.map((s) => s.symbol);
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...syms), { maxLength: 12 }), fc.constantFrom(" ", "  ", " . ", " ˈ"), (word, sep) => {
        const r = tokenise(inv, word.join(sep));
        expect(r.ok).toBe(true);
        if (!r.ok) return;
        expect(segmentsOf(r.tokens).map(bundleKey)).toEqual(word.map((w) => bundleKey(bundleOf(inv, w)!)));
      }),
      { numRuns: 200 },
    );
  });

  it("property: NFD, NFC and tie-barred spellings of a word read the same", () => {
    const inv = enUs();
    const syms = inv.segments.map((s) => s.symbol);
    const marks = ["", "\u0303", "\u0325", "ʰ", "ː", "\u0329"];
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom(...syms), fc.constantFrom(...marks)), { maxLength: 8 }), (parts) => {
        const word = parts.map(([s, m]) => s + m).join(" ");
        const a = tokenise(inv, word.normalize("NFC"));
        const b = tokenise(inv, word.normalize("NFD"));
        const c = tokenise(inv, word.replace("tʃ", "t͡ʃ").replace("dʒ", "d͡ʒ"));
        expect(a.ok && b.ok && c.ok).toBe(true);
        if (a.ok && b.ok && c.ok) {
          expect(segmentsOf(b.tokens)).toEqual(segmentsOf(a.tokens));
          expect(segmentsOf(c.tokens)).toEqual(segmentsOf(a.tokens));
        }
      }),
      { numRuns: 200 },
    );
  });

  it("writes every inventory segment as its own symbol", () => {
    const inv = enUs();
    for (const s of inv.segments) {
      const r = realise(inv, s.bundle);
      expect(r).toEqual({ ok: true, text: s.symbol });
    }
  });
});
