// Loading inventories and diacritics: the shipped en-us files load cleanly, and every kind of bad
// input gives a positioned diagnostic (several at once), never an exception.

import { describe, expect, it } from "vitest";
import { join } from "node:path";
import { loadInventory, parseInventory, PROSODIC_FEATURES } from "../../src/inventory/index.js";
import { enUs, EN_US } from "./helpers.js";

const HEAD = "symbol,voice,nasal,high\n";
const at = (ds: readonly { code: string; line: number; column: number }[], code: string) =>
  ds.filter((d) => d.code === code).map((d) => [d.line, d.column]);

describe("the shipped en-us inventory", () => {
  it("loads with no diagnostic at all", () => {
    const r = loadInventory(join(EN_US, "segments.csv"));
    expect(r.diagnostics).toEqual([]);
    expect(r.inventory).toBeDefined();
  });

  it("has the segments the brief requires, each a single segment", () => {
    const inv = enUs();
    const required =
      "p b t d k ɡ f v θ ð s z ʃ ʒ h tʃ dʒ m n ŋ l ɹ w j ɾ ʔ ɫ i ɪ eɪ ɛ æ ɑ ɔ oʊ ʊ u ʌ ə aɪ aʊ ɔɪ ɚ ɝ".split(" ");
    const symbols = inv.segments.map((s) => s.symbol);
    for (const s of required) expect(symbols).toContain(s);
  });

  it("orders features: CSV columns, diacritic-only, then prosodic", () => {
    const inv = enUs();
    expect(inv.features.slice(0, 3)).toEqual(["syllabic", "consonantal", "approximant"]);
    expect(inv.features.slice(-2)).toEqual([...PROSODIC_FEATURES]);
    expect(inv.features).toContain("long");
    expect(inv.features).toContain("unreleased");
    expect(inv.features.indexOf("long")).toBeGreaterThan(inv.features.indexOf("diphthong"));
    for (const s of inv.segments) {
      expect(s.bundle).toHaveLength(inv.features.length);
      expect(s.bundle[inv.featureIndex.get("long")!]).toBe("-");
      expect(s.bundle[inv.featureIndex.get("stress")!]).toBe("0");
      expect(s.bundle[inv.featureIndex.get("primary")!]).toBe("0");
    }
  });

  it("uses the feature names grammar files spell", () => {
    const names =
      "syllabic consonantal approximant sonorant continuant delayed_release nasal voice spread_glottis constricted_glottis labial round labiodental coronal anterior distributed strident lateral dorsal high low front back tense".split(" ");
    for (const n of names) expect(enUs().featureIndex.has(n)).toBe(true);
  });

  it("reads the diacritics beside the inventory by default, in file order", () => {
    const inv = enUs();
    expect(inv.diacritics.map((d) => d.name)).toEqual([
      "dental", "voiceless", "voiced", "syllabic", "non-syllabic", "nasalised", "no audible release",
      "labialised", "velarised", "aspirated", "long",
    ]);
    expect(inv.diacritics.map((d) => d.order)).toEqual(inv.diacritics.map((_, k) => k));
  });
});

describe("problems in segments.csv", () => {
  it("reports a ragged row at the first surplus or missing cell", () => {
    const r = parseInventory(HEAD + "p,-,-,-\nb,+,-\nm,+,+,-,+\n", "x.csv");
    expect(r.inventory).toBeUndefined();
    expect(at(r.diagnostics, "inventory/ragged-row")).toEqual([[3, 6], [4, 9]]);
  });

  it("reports unknown values with their column, several at once", () => {
    const r = parseInventory(HEAD + "p,-,-,-\nb,+,yes,-\nm,+,+,\u2212\n", "x.csv");
    const bad = r.diagnostics.filter((d) => d.code === "inventory/bad-value");
    expect(bad.map((d) => [d.line, d.column])).toEqual([[3, 5], [4, 7]]);
    expect(bad[0]!.message).toContain("'yes'");
    expect(bad[1]!.message).toContain("hyphen-minus");
  });

  it("reports a duplicate symbol, also when spelt differently (g and ɡ, tie bar, NFD)", () => {
    const r = parseInventory("symbol,voice,cont\nɡ,+,-\ng,-,-\ntʃ,-,+\nt͡ʃ,+,+\nã,+,+\na\u0303,-,+\n", "x.csv");
    const dups = r.diagnostics.filter((d) => d.code === "inventory/duplicate-symbol");
    expect(dups.map((d) => d.line)).toEqual([3, 5, 7]);
    expect(dups[0]!.message).toContain("line 2");
  });

  it("reports two segments with identical values", () => {
    const r = parseInventory(HEAD + "p,-,-,-\nb,+,-,-\nq,-,-,-\nm,+,+,+\n", "x.csv");
    const d = r.diagnostics.find((x) => x.code === "inventory/identical-segments")!;
    expect([d.line, d.column]).toEqual([4, 1]);
    expect(d.message).toContain("'p'");
  });

  it("warns about a constant feature column but still loads", () => {
    const r = parseInventory(HEAD + "p,-,-,+\nb,+,-,+\nm,+,+,+\n", "x.csv");
    expect(r.inventory).toBeDefined();
    const w = r.diagnostics.filter((d) => d.code === "inventory/constant-feature");
    expect(w).toHaveLength(1);
    expect(w[0]!.severity).toBe("warning");
    expect([w[0]!.line, w[0]!.column]).toEqual([1, 20]);
  });

  it("skips comments and blank lines but keeps true line numbers", () => {
    const r = parseInventory("# heading\n\n" + HEAD + "# stops\np,-,-,-\n\n  # indented\nb,+,-,x # trailing\n", "x.csv");
    expect(at(r.diagnostics, "inventory/bad-value")).toEqual([[8, 7]]);
  });

  it("checks the header: bad names, duplicates, prosodic names", () => {
    const r = parseInventory("symbol,voice,Voice,voice,stress\np,-,-,-,-\n", "x.csv");
    expect(at(r.diagnostics, "inventory/bad-feature-name")).toEqual([[1, 14]]);
    expect(at(r.diagnostics, "inventory/duplicate-feature")).toEqual([[1, 20]]);
    expect(at(r.diagnostics, "inventory/reserved-feature")).toEqual([[1, 26]]);
  });

  it("rejects symbols that clash with stress, syllable or word marks", () => {
    // A row starting with '#' is a comment, so '#' itself can never be listed.
    const r = parseInventory(HEAD + "p.,-,-,-\nˈb,+,-,-\na',+,+,-\nm n,+,+,+\n", "x.csv");
    expect(at(r.diagnostics, "inventory/bad-symbol")).toEqual([[2, 1], [3, 1], [4, 1], [5, 1]]);
  });

  it("reports an empty file and unreadable CSV", () => {
    expect(parseInventory("# nothing\n", "x.csv").diagnostics[0]!.code).toBe("inventory/empty");
    const r = parseInventory(HEAD + 'p,"-,-,-\n', "x.csv");
    expect(r.diagnostics[0]!.code).toBe("inventory/csv-syntax");
    expect(r.inventory).toBeUndefined();
  });

  it("reports a missing file as a diagnostic, not an exception", () => {
    const r = loadInventory(join(EN_US, "no-such-inventory.csv"));
    expect(r.diagnostics).toHaveLength(1);
    expect(r.diagnostics[0]!.code).toBe("inventory/unreadable");
    expect(r.diagnostics[0]!.message).toContain("no such file");
  });
});

describe("problems in diacritics.csv", () => {
  const SEGS = HEAD + "p,-,-,-\nb,+,-,-\nm,+,+,-\ni,+,-,+\n";
  const load = (dia: string) => parseInventory(SEGS, "s.csv", dia, "d.csv");

  it("accepts literal marks and U+ notation, and adds diacritic-only features", () => {
    const r = load("mark,name,sets,aliases\nU+0303,nasalised,+nasal,\nː,long,+long,:\n");
    expect(r.diagnostics).toEqual([]);
    const inv = r.inventory!;
    expect(inv.features).toEqual(["voice", "nasal", "high", "long", "stress", "primary"]);
    expect(inv.diacritics[0]!.mark).toBe("\u0303");
    expect(inv.diacritics[1]!.aliases).toEqual([":"]);
  });

  it("reports bad values, unknown-value features, prosodic features and duplicates together", () => {
    const r = load(
      "mark,name,sets,aliases\n" +
        "U+0303,nasalised,nasal,\n" + // no value
        "U+0325,voiceless,-voice -voice,\n" + // twice
        "U+02D0,long,-long,\n" + // diacritic-only must be '+'
        "U+02C8,stressed,+stress,\n" + // reserved mark and prosodic feature
        "U+0324,breathy,+breathy,U+0325\n" + // alias already declared
        "p,plosive,+voice,\n", // mark is a segment
    );
    const codes = r.diagnostics.map((d) => `${d.code}@${d.line}:${d.column}`);
    expect(codes).toEqual([
      "diacritics/bad-value@2:18",
      "diacritics/duplicate-feature@3:25",
      "diacritics/diacritic-only-value@4:13",
      "diacritics/bad-mark@5:1",
      "diacritics/duplicate-mark@6:1",
      "diacritics/mark-is-segment@7:1",
    ]);
    expect(r.inventory).toBeUndefined();
  });

  it("warns when a new diacritic-only feature looks like a typo of a column", () => {
    const r = load("mark,name,sets\nU+0303,nasalised,+nasl\n");
    const w = r.diagnostics.find((d) => d.code === "diacritics/new-feature")!;
    expect(w.severity).toBe("warning");
    expect(w.message).toContain("'nasal'");
  });

  it("requires the mark, name and sets columns", () => {
    const r = load("mark,label,values\nU+0303,nasalised,+nasal\n");
    expect(r.diagnostics.filter((d) => d.code === "diacritics/bad-header")).toHaveLength(2);
  });
});
