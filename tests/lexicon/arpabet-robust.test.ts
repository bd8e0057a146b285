// ARPAbet import robustness (issue 15): NUL, a BOM inside the text and control characters are
// positioned rejects (also when a JSON escape spells them); CR-only line ends read line by line.

import { describe, expect, it } from "vitest";
import { importArpabet, importArpabetDictionary, importArpabetText, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import type { ImportResult } from "../../src/lexicon/arpabet.js";

const table = loadArpabetTable().table!;
const brief = (r: ImportResult): string[] => [
  ...r.rows.map((x) => `row ${x.line} ${x.word}`),
  ...r.rejects.map((x) => `reject ${x.line}:${x.column} ${x.code}`),
];

describe("ARPAbet import: characters no entry may hold", () => {
  it("rejects NUL and a BOM inside a word, each at its column, and reads the lines around them", () => {
    const r = importArpabet(["CAT  K AE1 T", "DO\u0000G  D AO1 G", "\ufeffBIRD  B ER1 D", "FI\ufeffSH  F IH1 SH", "COW  K AW1"], table, { file: "d.txt" });
    expect(brief(r)).toEqual(["row 1 CAT", "row 5 COW", "reject 2:3 arpabet/nul", "reject 3:1 arpabet/bom", "reject 4:3 arpabet/bom"]);
    expect(r.lines).toBe(r.rows.length + r.rejects.length + r.comments + r.blanks);
  });

  it("keeps a BOM at the very start of the file out of the first word", () => {
    const r = importArpabet(["\ufeffCAT  K AE1 T"], table, { file: "d.txt" });
    expect(brief(r)).toEqual(["row 1 CAT"]);
  });

  it("rejects a NUL spelled as a JSON escape, and one in a dictionary object's key", () => {
    const r = importArpabet(['{', '  "do\\u0000g": "D AO1 G",', '  "cat": "K AE1 T"', "}"], table, { file: "d.json" });
    expect(brief(r)).toEqual(["row 3 cat", "reject 2:3 arpabet/nul"]);
    const d = importArpabetDictionary({ "do\u0000g": "D AO1 G", cat: "K AE1 T" }, table, { file: "dict" });
    expect(brief(d)).toEqual(["row 2 cat", "reject 1:1 arpabet/nul"]);
  });

  it("reads CR-only and CR CR LF line ends line by line, with exact line numbers", () => {
    const r = importArpabetText("CAT  K AE1 T\rDOG  D AO1 G\r\r\nCOW  K AW1\r", table, { file: "d.txt" });
    expect(brief(r)).toEqual(["row 1 CAT", "row 2 DOG", "row 4 COW"]);
    expect([r.lines, r.blanks]).toEqual([4, 1]);
  });
});
