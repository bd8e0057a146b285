// Tests of the ARPAbet import: the shipped mapping table, line formats, alternates, comments,
// rejects with positions, and the whole CMU Pronouncing Dictionary read through the en-us inventory.

import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadInventory, tokenise } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { convertArpabet, importArpabet, importArpabetDictionary, loadArpabetTable, parseArpabetTable } from "../../src/lexicon/arpabet.js";
import type { ArpabetTable } from "../../src/lexicon/arpabet.js";
import { applyStress, readLexicon } from "../../src/lexicon/read.js";
import { importedCsv } from "../../src/cli/import.js";

const loadedTable = loadArpabetTable();
if (loadedTable.table === undefined) throw new Error(loadedTable.diagnostics.map((d) => d.message).join("; "));
const table: ArpabetTable = loadedTable.table;
const SEGMENTS = fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url));
const loadedInv = loadInventory(SEGMENTS);
if (loadedInv.inventory === undefined) throw new Error(loadedInv.diagnostics.map((d) => d.message).join("; "));
const inv: Inventory = loadedInv.inventory;

const ipa = (phones: string): string => {
  const r = convertArpabet(phones, table);
  if (!r.ok) throw new Error(r.reason);
  return r.pron;
};

describe("the shipped mapping table (lexicons/en-us/arpabet.csv)", () => {
  it("covers the CMU dictionary's 39 phonemes: 15 vowels with stress, 24 consonants", () => {
    // CMU Pronouncing Dictionary, documented phoneme set (from memory): 39 phonemes, vowels carry stress 0/1/2
    const vowels = [...table.phones.values()].filter((p) => p.vowel).map((p) => p.arpabet).sort();
    const consonants = [...table.phones.values()].filter((p) => !p.vowel).map((p) => p.arpabet).sort();
    expect(vowels).toEqual(["AA", "AE", "AH", "AO", "AW", "AY", "EH", "ER", "EY", "IH", "IY", "OW", "OY", "UH", "UW"]);
    expect(consonants).toEqual(["B", "CH", "D", "DH", "F", "G", "HH", "JH", "K", "L", "M", "N", "NG", "P", "R", "S", "SH", "T", "TH", "V", "W", "Y", "Z", "ZH"]);
  });

  it("maps stressed and unstressed AH and ER to different vowels", () => {
    // Common practice, no source: General American broad transcription writes unstressed AH as ə and
    // stressed AH as ʌ, unstressed ER as ɚ and stressed ER as ɝ
    expect(ipa("AH0")).toBe("ə");
    expect(ipa("AH1")).toBe("ˈʌ");
    expect(ipa("AH2")).toBe("ˌʌ");
    expect(ipa("ER0")).toBe("ɚ");
    expect(ipa("ER1")).toBe("ˈɝ");
    expect(ipa("ER2")).toBe("ˌɝ");
  });

  it("converts the CMU example words to their usual General American IPA", () => {
    // CMU Pronouncing Dictionary phoneme table example words (from memory); IPA: common practice, no source
    const cases: Array<[string, string]> = [
      ["AA1 D", "ˈɑ d"], // odd
      ["HH AH1 T", "h ˈʌ t"], // hut
      ["K AW1", "k ˈaʊ"], // cow
      ["CH IY1 Z", "tʃ ˈi z"], // cheese
      ["DH IY1", "ð ˈi"], // thee
      ["G R IY1 N", "ɡ ɹ ˈi n"], // green
      ["JH IY1", "dʒ ˈi"], // gee
      ["P IH1 NG", "p ˈɪ ŋ"], // ping
      ["T OY1", "t ˈɔɪ"], // toy
      ["TH EY1 T AH0", "θ ˈeɪ t ə"], // theta
      ["Y IY1 L D", "j ˈi l d"], // yield
      ["S IY1 ZH ER0", "s ˈi ʒ ɚ"], // seizure
    ];
    for (const [arpa, want] of cases) expect(ipa(arpa)).toBe(want);
  });

  it("spells every IPA value as a segment of the en-us inventory (a before-vowel value as segments)", () => {
    for (const p of table.phones.values()) {
      for (const [k, v] of Object.entries(p.ipa)) {
        const t = tokenise(inv, v);
        const n = k.endsWith("V") ? v.split(" ").length : 1;
        expect(t.ok && t.tokens.length === n && t.tokens.every((x) => x.kind === "segment"), `${p.arpabet} → ${v}`).toBe(true);
      }
    }
  });
});

describe("importArpabet: line formats", () => {
  it("reads WORD  PHONES lines, (2) alternates, ;;; comments, trailing # comments and blank lines", () => {
    const src = [
      ";;; demo dictionary, invented words",
      "QUILLHAVEN  K W IH1 L HH EY2 V AH0 N",
      "SALLOWMEDE  S AE1 L OW0 M IY2 D",
      "SALLOWMEDE(2)  S AA1 L OW0 M IY2 D",
      "",
      "FENNAMERE F EH1 N AH0 M IH2 R # place, invented",
    ];
    const r = importArpabet(src, table, { file: "demo.dict" });
    expect(r.rejects).toEqual([]);
    expect(r.rows).toEqual([
      { word: "QUILLHAVEN", pron: "k w ˈɪ l h ˌeɪ v ə n", line: 2, variant: 1 },
      { word: "SALLOWMEDE", pron: "s ˈæ l oʊ m ˌi d", line: 3, variant: 1 },
      { word: "SALLOWMEDE", pron: "s ˈɑ l oʊ m ˌi d", line: 4, variant: 2 },
      { word: "FENNAMERE", pron: "f ˈɛ n ə m ˌɪ ɹ", line: 6, variant: 1, note: "place, invented" },
    ]);
    expect({ lines: r.lines, comments: r.comments, blanks: r.blanks }).toEqual({ lines: 6, comments: 1, blanks: 1 });
  });

  it("reads a JSON object written one entry a line", () => {
    const src = ["{", '  "pellanor": "P EH1 L AH0 N AO2 R",', '  "pellanor(2)": "P EH1 L AH0 N ER2"', "}"];
    const r = importArpabet(src, table, { file: "demo.json" });
    expect(r.rows.map((x) => [x.word, x.pron, x.variant, x.line])).toEqual([
      ["pellanor", "p ˈɛ l ə n ˌɔ ɹ", 1, 2],
      ["pellanor", "p ˈɛ l ə n ˌɝ", 2, 3],
    ]);
  });

  it("imports an entry without any stress digits unmarked", () => {
    expect(ipa("K AH T")).toBe("k ʌ t");
  });

  it("rejects bad entries with their line and column and goes on", () => {
    const src = [
      "DOVRENNY  D AA1 V R EH0 N IY0 QX0",
      "KEST  K1 EH1 S T",
      "BRINDLEWICK  B R IH1 N D AH L W IH2 K",
      "CORVELLAN",
      '  "pellanor": "P EH7 L",',
      "FENNAMERE  F EH1 N AH0 M IH2 R",
    ];
    const r = importArpabet(src, table, { file: "bad.dict" });
    expect(r.rejects.map((x) => [x.line, x.column, x.code])).toEqual([
      [1, 31, "arpabet/unknown-phone"],
      [2, 7, "arpabet/stress-on-consonant"],
      [3, 26, "arpabet/missing-stress"],
      [4, 1, "arpabet/no-phones"],
      [5, 18, "arpabet/bad-stress"],
    ]);
    expect(r.rejects[0]!.reason).toContain("QX0");
    expect(r.rows.map((x) => x.word)).toEqual(["FENNAMERE"]);
  });
});

describe("parseArpabetTable: errors in a mapping table", () => {
  it("reports a vowel without all three stress levels, a bad stress value and a duplicate", () => {
    const text = "arpabet,stress,ipa\nAH,0,ə\nAH,1,ʌ\nK,x,k\nT,-,t\nT,-,t\n";
    const r = parseArpabetTable(text, "bad.csv");
    expect(r.table).toBeUndefined();
    expect(r.diagnostics.map((d) => [d.line, d.code])).toEqual([
      [4, "arpabet/bad-stress"],
      [6, "arpabet/duplicate"],
      [2, "arpabet/incomplete"],
    ]);
  });
});

describe("the CMU Pronouncing Dictionary (npm cmu-pronouncing-dictionary, ISC)", () => {
  it("imports every entry and the en-us inventory reads every pronunciation", () => {
    const r = importArpabetDictionary(dictionary, table, { file: "cmu-pronouncing-dictionary" });
    // Every entry is read: no rejects at import, and none when the reader's tokeniser and stress
    // placement read the IPA we wrote.
    expect(r.rejects).toEqual([]);
    expect(r.rows.length).toBe(Object.keys(dictionary).length);
    const problems: string[] = [];
    let marked = 0;
    for (const row of r.rows) {
      const t = tokenise(inv, row.pron, { file: "cmu", line: row.line, column: 1 });
      if (!t.ok) {
        problems.push(`${row.word}: ${t.error.message}`);
        continue;
      }
      const s = applyStress(inv, t.tokens);
      if (!s.ok) problems.push(`${row.word}: ${s.reason}`);
      else if (s.marked) marked++;
    }
    expect(problems).toEqual([]);
    // Every CMU entry has at least one vowel with a stress digit; only those with a 1 or 2 get a mark.
    expect(marked).toBeGreaterThan(r.rows.length * 0.99);
    // Alternates (word(2), word(3), …) become rows of the same word
    const variants = r.rows.filter((x) => x.variant > 1).length;
    expect(variants).toBe(Object.keys(dictionary).filter((w) => /\(\d+\)$/.test(w)).length);
    // The 22 entries with a trailing "# …" comment keep it as a note (e.g. "aalborg  … # place, danish")
    expect(r.rows.filter((x) => x.note !== undefined).length).toBe(Object.values(dictionary).filter((p) => p.includes("#")).length);
  });
});

describe("the CMU Pronouncing Dictionary through the whole import path", () => {
  it("writes a lexicon CSV that the lexicon reader reads back with zero rejects", async () => {
    const r = importArpabetDictionary(dictionary, table, { file: "cmu-pronouncing-dictionary" });
    // Fed in chunks of 1,000 lines, as a file read in 64 KiB chunks would arrive.
    const lines = [...importedCsv(r.rows)];
    const chunks: string[] = [];
    for (let i = 0; i < lines.length; i += 1000) chunks.push(lines.slice(i, i + 1000).join(""));
    const reader = readLexicon(Readable.from(chunks), { inventory: inv, file: "cmu.csv" });
    const rejected: string[] = [];
    let n = 0;
    for await (const item of reader) {
      if (item.kind === "reject") rejected.push(`${item.line}: ${item.reason} (${item.raw})`);
      else n++;
    }
    expect(reader.diagnostics).toEqual([]);
    expect(rejected).toEqual([]);
    expect(n).toBe(Object.keys(dictionary).length);
    expect(reader.stats.dataLines).toBe(n);
  }, 60_000);
});

describe("the CMU Pronouncing Dictionary as a file, line by line", () => {
  it("imports the package's own module file (a JavaScript object, one entry a line) with zero rejects", async () => {
    const { readFile } = await import("node:fs/promises");
    const { createRequire } = await import("node:module");
    const path = createRequire(import.meta.url).resolve("cmu-pronouncing-dictionary/index.js");
    const lines = (await readFile(path, "utf8")).split("\n");
    const r = importArpabet(lines, table, { file: path });
    expect(r.rejects).toEqual([]);
    expect(r.rows.length).toBe(Object.keys(dictionary).length);
    // the rest are the doc comment, the `export const dictionary = {` line and the closing brace (and a final empty line)
    expect(r.lines).toBe(r.rows.length + r.comments + r.blanks);
    expect(r.comments).toBe(3);
  });
});
