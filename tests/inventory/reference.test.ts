// External checks of the en-us inventory: feature values against the open tables copied into
// tests/fixtures (PHOIBLE 2.0, CC BY 4.0; PanPhon, MIT — see tests/fixtures/reference-README.md),
// Unicode code points and names of the IPA symbols and diacritics, and facts of the trade.

import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { parse } from "csv-parse/sync";
import {
  bundleOf,
  describeBundle,
  naturalClasses,
  realise,
  segmentsMatching,
  type Inventory,
  type PartialBundle,
} from "../../src/inventory/index.js";
import { enUs, ROOT } from "./helpers.js";

type Row = Record<string, string>;
const fixture = (name: string): Map<string, Row> => {
  const rows = parse(readFileSync(join(ROOT, "tests", "fixtures", name), "utf8"), { columns: true, bom: true }) as Row[];
  const first = Object.keys(rows[0]!)[0]!;
  return new Map(rows.map((r) => [r[first]!.normalize("NFC"), r]));
};
// PHOIBLE 2.0 (Moran & McCloy 2019), cldf/parameters.csv, CC BY 4.0: row subset.
const PHOIBLE = fixture("reference-phoible-ga.csv");
// PanPhon (Mortensen et al. 2016), panphon/data/ipa_all.csv, MIT: row subset.
const PANPHON = fixture("reference-panphon-ga.csv");

const val = (inv: Inventory, symbol: string, feature: string): string => {
  const b = bundleOf(inv, symbol);
  if (!b) throw new Error(`cannot read ${symbol}`);
  return b[inv.featureIndex.get(feature)!]!;
};

/** Our feature name → PHOIBLE's column (the same Hayes-style feature set, spelt in camelCase). */
const PHOIBLE_COLUMN: Record<string, string> = {
  syllabic: "syllabic", consonantal: "consonantal", approximant: "approximant", sonorant: "sonorant",
  continuant: "continuant", delayed_release: "delayedRelease", nasal: "nasal",
  voice: "periodicGlottalSource", // PHOIBLE calls voicing [periodic glottal source]
  spread_glottis: "spreadGlottis", constricted_glottis: "constrictedGlottis", labial: "labial", round: "round",
  labiodental: "labiodental", coronal: "coronal", anterior: "anterior", distributed: "distributed",
  strident: "strident", lateral: "lateral", dorsal: "dorsal", high: "high", low: "low", front: "front",
  back: "back", tense: "tense", tap: "tap", long: "long",
};

/** Where PHOIBLE spells a segment differently (see /work/shared/reference/README.md). */
const PHOIBLE_NAME: Record<string, string> = { tʃ: "t̠ʃ", dʒ: "d̠ʒ" };

/**
 * Every deliberate difference from PHOIBLE, with the reason. The test fails if a difference is
 * missing here, and also if an entry here is no longer a difference.
 */
const PHOIBLE_DIFFERENCES: Record<string, { ours: string; phoible: string; why: string }> = {
  "ɫ high": { ours: "+", phoible: "-", why: "ɫ is l + velarisation ˠ = [+dorsal +high -low -front +back], so ɫ and lˠ are one segment; PHOIBLE itself gives lˠ [+high -back] and ɫ [-high +back]" },
  "ʔ consonantal": { ours: "-", phoible: "+", why: "laryngeals h and ʔ are [-consonantal] (Chomsky & Halle 1968, from memory; PanPhon agrees for ʔ); PHOIBLE has h [-] but ʔ [+]; with ʔ [+consonantal], [+consonantal -continuant -voice -delayed_release] would not be exactly p t k" },
  "ɚ anterior": { ours: "-", phoible: "+", why: "r-coloured vowels take ɹ's coronal values [+coronal -anterior +distributed -strident] (common practice, no source)" },
  "ɚ strident": { ours: "-", phoible: "+", why: "as above; with ɚ [+strident], [+strident] would no longer be exactly the sibilants s z ʃ ʒ tʃ dʒ" },
  "ɝ anterior": { ours: "-", phoible: "+", why: "ɝ is absent from PHOIBLE; compared with its ɚ row; same reason as ɚ" },
  "ɝ strident": { ours: "-", phoible: "+", why: "as ɚ" },
  "ɝ tense": { ours: "+", phoible: "-", why: "ɝ (stressed) and ɚ (unstressed) must differ in some non-prosodic feature; [+tense] for ɝ, as for the other stressable long nuclei (common practice, no source)" },
};

describe("en-us feature values against PHOIBLE 2.0 (CC BY 4.0)", () => {
  it("agree everywhere except the listed deliberate differences; contours take the nucleus value", () => {
    const inv = enUs();
    const found = new Map<string, { ours: string; phoible: string }>();
    let compared = 0;
    for (const seg of inv.segments) {
      // ɝ is not in PHOIBLE: compared with ɚ (PanPhon gives ɜ˞ and ə˞ identical values).
      const name = seg.symbol === "ɝ" ? "ɚ" : (PHOIBLE_NAME[seg.symbol] ?? seg.symbol);
      const row = PHOIBLE.get(name.normalize("NFC"));
      expect(row, seg.symbol).toBeDefined();
      for (const [ours, theirs] of Object.entries(PHOIBLE_COLUMN)) {
        const cell = row![theirs]!;
        // A contour ("-,+": values in time order) is compared by its first value, the nucleus.
        const nucleus = cell.split(",")[0]!;
        const mine = val(inv, seg.symbol, ours);
        compared++;
        if (mine !== nucleus) found.set(`${seg.symbol} ${ours}`, { ours: mine, phoible: cell });
      }
    }
    expect(compared).toBeGreaterThan(1000);
    expect(Object.fromEntries(found)).toEqual(
      Object.fromEntries(Object.entries(PHOIBLE_DIFFERENCES).map(([k, v]) => [k, { ours: v.ours, phoible: v.phoible }])),
    );
  });

  it("diphthongs are their nucleus plus [+diphthong]: eɪ = e, oʊ = o (PHOIBLE e, o rows)", () => {
    const inv = enUs();
    for (const [d, n] of [["eɪ", "e"], ["oʊ", "o"]] as const) {
      for (const [ours, theirs] of Object.entries(PHOIBLE_COLUMN)) {
        expect(val(inv, d, ours), `${d} ${ours}`).toBe(PHOIBLE.get(n)![theirs]);
      }
      expect(val(inv, d, "diphthong")).toBe("+");
    }
  });

  it("diacritics express what PHOIBLE's modified segments show (pʰ tʰ kʰ, nasalised vowels, n̩, ɾ̃, lˠ)", () => {
    const inv = enUs();
    const rows = ["pʰ", "tʰ", "kʰ", "n̩", "ɾ̃", "ĩ", "ɪ̃", "ɛ̃", "æ̃", "ɑ̃", "ɔ̃", "ʊ̃", "ũ", "ʌ̃", "ə̃", "lˠ"];
    // Deliberate: lˠ [+back] (velar = high back; PHOIBLE's lˠ row has [-back], its ɫ row [+back]).
    const differences: Record<string, string> = { "lˠ back": "+" };
    for (const sym of rows) {
      const row = PHOIBLE.get(sym.normalize("NFC"))!;
      expect(row, sym).toBeDefined();
      for (const [ours, theirs] of Object.entries(PHOIBLE_COLUMN)) {
        const want = differences[`${sym} ${ours}`] ?? row[theirs];
        expect(val(inv, sym, ours), `${sym} ${ours}`).toBe(want);
      }
    }
  });
});

describe("en-us feature values against PanPhon (MIT), on the features both tables define alike", () => {
  // PanPhon fills '-' where PHOIBLE (and we) write '0', and treats place features differently, so
  // only these are compared; h's two differences follow PHOIBLE (h is a voiceless glottal
  // fricative with spread glottis, [-consonantal] like the other laryngeal).
  const COLUMN: Record<string, string> = {
    syllabic: "syl", consonantal: "cons", continuant: "cont", nasal: "nas", lateral: "lat", voice: "voi",
    spread_glottis: "sg", constricted_glottis: "cg",
  };
  const NAME: Record<string, string> = { tʃ: "t͡ʃ", dʒ: "d͡ʒ", ɚ: "ə˞", ɝ: "ɜ˞" };
  const DIFFERENCES: Record<string, string> = { "h consonantal": "+", "h spread_glottis": "-" };

  it("agree except h's two listed values (segments PanPhon has; it has no diphthongs)", () => {
    const inv = enUs();
    const found: Record<string, string> = {};
    let compared = 0;
    for (const seg of inv.segments) {
      const row = PANPHON.get((NAME[seg.symbol] ?? seg.symbol).normalize("NFC"));
      if (!row) {
        expect(["eɪ", "oʊ", "aɪ", "aʊ", "ɔɪ"]).toContain(seg.symbol);
        continue;
      }
      for (const [ours, theirs] of Object.entries(COLUMN)) {
        compared++;
        if (val(inv, seg.symbol, ours) !== row[theirs]) found[`${seg.symbol} ${ours}`] = row[theirs]!;
      }
    }
    expect(compared).toBeGreaterThan(250);
    expect(found).toEqual(DIFFERENCES);
  });

  it("ɜ˞ and ə˞ are one segment in PanPhon, which is why ɝ and ɚ differ only in [tense] here", () => {
    const a = PANPHON.get("ɜ˞".normalize("NFC"))!;
    const b = PANPHON.get("ə˞".normalize("NFC"))!;
    expect({ ...a, ipa: "" }).toEqual({ ...b, ipa: "" });
    const inv = enUs();
    const diff = inv.features.filter((f) => val(inv, "ɝ", f) !== val(inv, "ɚ", f));
    expect(diff).toEqual(["tense"]);
  });
});

describe("Unicode code points and names of the symbols and diacritics used", () => {
  // Names: Unicode Character Database (Unicode 14/15 code charts: IPA Extensions, Spacing Modifier
  // Letters, Combining Diacritical Marks), checked against Python's unicodedata; meanings: Handbook
  // of the IPA (1999), the IPA chart's diacritics and suprasegmentals.
  const SYMBOLS: [string, number, string][] = [
    ["ɡ", 0x0261, "LATIN SMALL LETTER SCRIPT G"],
    ["ɹ", 0x0279, "LATIN SMALL LETTER TURNED R"],
    ["ɾ", 0x027e, "LATIN SMALL LETTER R WITH FISHHOOK"],
    ["ʔ", 0x0294, "LATIN LETTER GLOTTAL STOP"],
    ["ɫ", 0x026b, "LATIN SMALL LETTER L WITH MIDDLE TILDE"],
    ["ŋ", 0x014b, "LATIN SMALL LETTER ENG"],
    ["θ", 0x03b8, "GREEK SMALL LETTER THETA"],
    ["ð", 0x00f0, "LATIN SMALL LETTER ETH"],
    ["ʃ", 0x0283, "LATIN SMALL LETTER ESH"],
    ["ʒ", 0x0292, "LATIN SMALL LETTER EZH"],
    ["ɪ", 0x026a, "LATIN LETTER SMALL CAPITAL I"],
    ["ɛ", 0x025b, "LATIN SMALL LETTER OPEN E"],
    ["æ", 0x00e6, "LATIN SMALL LETTER AE"],
    ["ɑ", 0x0251, "LATIN SMALL LETTER ALPHA"],
    ["ɔ", 0x0254, "LATIN SMALL LETTER OPEN O"],
    ["ʊ", 0x028a, "LATIN SMALL LETTER UPSILON"],
    ["ʌ", 0x028c, "LATIN SMALL LETTER TURNED V"],
    ["ə", 0x0259, "LATIN SMALL LETTER SCHWA"],
    ["ɚ", 0x025a, "LATIN SMALL LETTER SCHWA WITH HOOK"],
    ["ɝ", 0x025d, "LATIN SMALL LETTER REVERSED OPEN E WITH HOOK"],
  ];
  const DIACRITICS: [string, number, string, string][] = [
    ["dental", 0x032a, "COMBINING BRIDGE BELOW", "Mn"],
    ["voiceless", 0x0325, "COMBINING RING BELOW", "Mn"],
    ["voiced", 0x032c, "COMBINING CARON BELOW", "Mn"],
    ["syllabic", 0x0329, "COMBINING VERTICAL LINE BELOW", "Mn"],
    ["non-syllabic", 0x032f, "COMBINING INVERTED BREVE BELOW", "Mn"],
    ["nasalised", 0x0303, "COMBINING TILDE", "Mn"],
    ["no audible release", 0x031a, "COMBINING LEFT ANGLE ABOVE", "Mn"],
    ["labialised", 0x02b7, "MODIFIER LETTER SMALL W", "Lm"],
    ["velarised", 0x02e0, "MODIFIER LETTER SMALL GAMMA", "Lm"],
    ["aspirated", 0x02b0, "MODIFIER LETTER SMALL H", "Lm"],
    ["long", 0x02d0, "MODIFIER LETTER TRIANGULAR COLON", "Lm"],
  ];

  it("every single-letter inventory symbol named above is that code point", () => {
    const symbols = new Set(enUs().segments.map((s) => s.symbol));
    for (const [s, cp] of SYMBOLS) {
      expect(s.codePointAt(0)).toBe(cp);
      expect(symbols.has(String.fromCodePoint(cp))).toBe(true);
    }
  });

  it("every declared diacritic is the code point for its meaning, of the right category", () => {
    const inv = enUs();
    for (const [name, cp, , cat] of DIACRITICS) {
      const d = inv.diacritics.find((x) => x.name === name);
      expect(d, name).toBeDefined();
      expect(d!.mark).toBe(String.fromCodePoint(cp));
      expect(new RegExp(`^\\p{${cat}}$`, "u").test(d!.mark)).toBe(true);
    }
    expect(inv.diacritics).toHaveLength(DIACRITICS.length);
  });

  it("aliases: U+030A COMBINING RING ABOVE for voiceless, U+030D COMBINING VERTICAL LINE ABOVE for syllabic", () => {
    const inv = enUs();
    expect(inv.diacritics.find((d) => d.name === "voiceless")!.aliases).toContain("\u030A");
    expect(inv.diacritics.find((d) => d.name === "syllabic")!.aliases).toContain("\u030D");
  });

  it("canonical ordering puts marks below (class 220) before marks above (230), as we write them", () => {
    // Unicode Character Database: U+0325 and U+0329 have combining class 220, U+0303 has 230.
    expect("n\u0303\u0329".normalize("NFD")).toBe("n\u0329\u0303");
    expect("n\u0325\u0303".normalize("NFD")).toBe("n\u0325\u0303");
  });

  it("tie bars: U+0361 COMBINING DOUBLE INVERTED BREVE and U+035C COMBINING DOUBLE BREVE BELOW are read and dropped", () => {
    const inv = enUs();
    expect(bundleOf(inv, "t\u0361ʃ")).toEqual(bundleOf(inv, "tʃ"));
    expect(bundleOf(inv, "t\u035Cʃ")).toEqual(bundleOf(inv, "tʃ"));
  });
});

describe("facts of the trade", () => {
  const picks = (inv: Inventory, text: string): string[] => {
    const p: PartialBundle = new Map(
      text.split(" ").map((t) => [inv.featureIndex.get(t.slice(1))!, t[0] as "+" | "-" | "0"] as const),
    );
    return segmentsMatching(inv, p).map((s) => s.symbol).sort();
  };

  it("English p t k are picked out by [+consonantal -continuant -voice -delayed_release]", () => {
    // Common practice, no source.
    expect(picks(enUs(), "+consonantal -continuant -voice -delayed_release")).toEqual(["k", "p", "t"]);
  });

  it("the nasals m n ŋ are [+nasal -syllabic]; the sibilants are [+strident]", () => {
    // Common practice, no source.
    expect(picks(enUs(), "+nasal -syllabic")).toEqual(["m", "n", "ŋ"]);
    expect(picks(enUs(), "+strident")).toEqual(["dʒ", "s", "tʃ", "z", "ʃ", "ʒ"]);
  });

  it("the affricates tʃ dʒ are the [-continuant +delayed_release] segments", () => {
    // Common practice, no source (Hayes-style [delayed release]).
    expect(picks(enUs(), "-continuant +delayed_release")).toEqual(["dʒ", "tʃ"]);
  });

  it("the glides w j and ɹ are [-syllabic -consonantal +approximant]; laryngeals h ʔ are [-consonantal -sonorant]", () => {
    // Common practice, no source.
    expect(picks(enUs(), "-syllabic -consonantal +approximant")).toEqual(["j", "w", "ɹ"]);
    expect(picks(enUs(), "-consonantal -sonorant")).toEqual(["h", "ʔ"]);
  });

  it("the flap is kept apart from d and from ɹ", () => {
    // Common practice, no source: the American flap is a sonorant tap, not a stop.
    const inv = enUs();
    expect(picks(inv, "+tap")).toEqual(["ɾ"]);
    expect(describeBundle(inv, bundleOf(inv, "ɾ")!)).not.toBe(describeBundle(inv, bundleOf(inv, "d")!));
  });

  it("a voiceless stop plus aspiration is written with ʰ, a dental t with the bridge below", () => {
    // Handbook of the IPA (1999), the IPA chart's diacritics: ʰ aspirated, ̪ dental.
    const inv = enUs();
    const t = bundleOf(inv, "t")!.slice();
    t[inv.featureIndex.get("spread_glottis")!] = "+";
    expect(realise(inv, t)).toEqual({ ok: true, text: "tʰ" });
    t[inv.featureIndex.get("spread_glottis")!] = "-";
    t[inv.featureIndex.get("distributed")!] = "+";
    expect(realise(inv, t)).toEqual({ ok: true, text: "t\u032A" });
  });

  it("the class finder confirms p t k is natural and p t k s is not", () => {
    const inv = enUs();
    expect(naturalClasses(inv, ["p", "t", "k"]).exact.length).toBeGreaterThan(0);
    expect(naturalClasses(inv, ["p", "t", "k", "s"]).exact).toEqual([]);
  });
});
