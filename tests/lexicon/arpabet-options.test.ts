// ARPAbet import (issue 10, section 3): unstressed ER directly before a vowel is schwa + onset ɹ,
// the spelling's case, and the stress policies (weak forms, a second primary demoted), each counted.
// Real words from the CMU Pronouncing Dictionary (npm cmu-pronouncing-dictionary 3.0.0).

import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadInventory } from "../../src/inventory/index.js";
import { convertArpabet, importArpabetDictionary, importArpabetText, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { readLexicon } from "../../src/lexicon/read.js";
import type { LexiconItem } from "../../src/lexicon/read.js";
import { importedCsv, runImport } from "../../src/cli/import.js";
import { loadEngine } from "../../src/cli/common.js";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

const table = loadArpabetTable().table!;
const inv = loadInventory(fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url))).inventory!;
const cmu = (word: string): string => dictionary[word]!;
const pron = (phones: string, policies: Parameters<typeof convertArpabet>[2] = []) => {
  const r = convertArpabet(phones, table, policies);
  if (!r.ok) throw new Error(r.reason);
  return r;
};

describe("ER0 directly before a vowel", () => {
  it("is a schwa and then ɹ on real CMU words, and stays ɚ elsewhere", () => {
    // camera K AE1 M ER0 AH0, every EH1 V ER0 IY0, history HH IH1 S T ER0 IY0 (CMU dictionary)
    expect(pron(cmu("camera")).pron).toBe("k ˈæ m ə ɹ ə");
    expect(pron(cmu("every")).pron).toBe("ˈɛ v ə ɹ i");
    expect(pron(cmu("history")).pron).toBe("h ˈɪ s t ə ɹ i");
    expect(pron(cmu("aberration")).pron).toBe("ˌæ b ə ɹ ˈeɪ ʃ ə n");
    // before a consonant or at the end, ER0 is ɚ: newspaper N UW1 Z P EY2 P ER0, butter
    expect(pron(cmu("newspaper")).pron).toBe("n ˈu z p ˌeɪ p ɚ");
    expect(pron(cmu("camera")).changed).toEqual(["before-vowel"]);
    expect(pron(cmu("newspaper")).changed).toEqual([]);
  });

  it("changes 3,995 entries of the whole CMU dictionary, and the reader reads every one", async () => {
    const r = importArpabetDictionary(dictionary, table, { file: "cmu" });
    expect(r.changed["before-vowel"]).toBe(3995);
    const changed = r.rows.filter((x) => x.pron.includes("ə ɹ"));
    const csv = [...importedCsv(changed.slice(0, 4000))].join("");
    const reader = readLexicon(Readable.from([csv]), { inventory: inv, file: "er.csv" });
    const items: LexiconItem[] = [];
    for await (const x of reader) items.push(x);
    expect(items.filter((x) => x.kind === "reject")).toEqual([]);
  }, 60_000);

  it("syllabifies the ɹ into the next onset through the en-us grammar (camera, every)", async () => {
    const grammar = fileURLToPath(new URL("../../lexicons/en-us/grammar.strata", import.meta.url));
    const loaded = loadEngine(grammar, { kind: "interpreter", syllables: true });
    if (!("engine" in loaded)) throw new Error("grammar did not load");
    const csv = [...importedCsv(importArpabetText(`CAMERA  ${cmu("camera")}\nEVERY  ${cmu("every")}\n`, table, { file: "d", case: "lower" }).rows)].join("");
    const items: LexiconItem[] = [];
    for await (const x of readLexicon(Readable.from([csv]), { inventory: inv, file: "x.csv" })) items.push(x);
    const broad = items.map((x) => (x.kind === "row" ? loaded.engine.transcribeWord(x.symbols)?.broad : x.reason));
    // the boundary falls before ɹ: ə.ɹə, ə.ɹi
    expect(broad[0]).toMatch(/ə\.ɹə$/);
    expect(broad[1]).toMatch(/ə\.ɹi$/);
  }, 120_000);
});

describe("the spelling's case", () => {
  it("keeps the case by default and writes lower case with case: lower", () => {
    const text = "CAMERA  K AE1 M ER0 AH0\nMcDONALD  M AH0 K D AA1 N AH0 L D\n";
    expect(importArpabetText(text, table, { file: "d" }).rows.map((r) => r.word)).toEqual(["CAMERA", "McDONALD"]);
    expect(importArpabetText(text, table, { file: "d", case: "lower" }).rows.map((r) => r.word)).toEqual(["camera", "mcdonald"]);
  });
});

describe("stress policies", () => {
  it("weak-forms tags an all-zero entry weak; the reader then leaves every vowel unstressed", async () => {
    // the DH AH0, a AH0 (CMU dictionary); of AH1 V has a primary and is left alone
    const text = `THE  ${cmu("the")}\nA  ${cmu("a")}\nOF  ${cmu("of")}\n`;
    const plain = importArpabetText(text, table, { file: "d" });
    expect(plain.rows.every((r) => r.tags === undefined)).toBe(true);
    expect(plain.changed).toEqual({ "before-vowel": 0 });
    const r = importArpabetText(text, table, { file: "d", policies: ["weak-forms"] });
    expect(r.rows.map((x) => [x.word, x.tags])).toEqual([["THE", ["weak", "weak-forms"]], ["A", ["weak", "weak-forms"]], ["OF", undefined]]);
    expect(r.changed).toEqual({ "before-vowel": 0, "weak-forms": 2 });
    const csv = [...importedCsv(r.rows)].join("");
    expect(csv.split("\n")[0]).toBe("word,pron,tags,note");
    const grammar = fileURLToPath(new URL("../../lexicons/en-us/grammar.strata", import.meta.url));
    const loaded = loadEngine(grammar, { kind: "interpreter", syllables: true });
    if (!("engine" in loaded)) throw new Error("grammar did not load");
    const items: LexiconItem[] = [];
    for await (const x of readLexicon(Readable.from([csv]), { inventory: inv, file: "x.csv" })) items.push(x);
    const narrow = items.map((x) => (x.kind === "row" ? loaded.engine.transcribeWord(x.symbols)?.narrow : x.reason));
    // weak forms: no stress mark anywhere (default stress would have written ˈðʌ-like stressed forms)
    expect(narrow[0]).not.toMatch(/[ˈˌ]/);
    expect(narrow[1]).not.toMatch(/[ˈˌ]/);
    expect(narrow[2]).toMatch(/ˈ/);
  }, 120_000);

  it("a row tagged weak that has stress marks is rejected", async () => {
    const items: LexiconItem[] = [];
    for await (const x of readLexicon(Readable.from(["word,pron,tags\nthe,ˈðə,weak\n"]), { inventory: inv, file: "x.csv" })) items.push(x);
    expect(items.map((x) => (x.kind === "reject" ? `${x.line}:${x.column} ${x.code}` : "row"))).toEqual(["2:9 lexicon/weak-with-stress"]);
  });

  it("demote-second-primary keeps the first primary and makes the others secondary; counted on the whole CMU dictionary", () => {
    // baseball B EY1 S B AO1 L, actuary AE1 K CH UW0 EH1 R IY2 (CMU dictionary)
    expect(pron(cmu("baseball"), ["demote-second-primary"]).pron).toBe("b ˈeɪ s b ˌɔ l");
    expect(pron(cmu("actuary"), ["demote-second-primary"]).pron).toBe("ˈæ k tʃ u ˌɛ ɹ ˌi");
    expect(pron(cmu("baseball")).pron).toBe("b ˈeɪ s b ˈɔ l");
    const r = importArpabetDictionary(dictionary, table, { file: "cmu", policies: ["demote-second-primary", "weak-forms"] });
    expect(r.changed["demote-second-primary"]).toBe(1787);
    expect(r.changed["weak-forms"]).toBe(88);
  }, 60_000);

  it("the import command prints each policy's name with its count", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-import-"));
    const path = join(dir, "d.txt");
    writeFileSync(path, `THE  ${cmu("the")}\nBASEBALL  ${cmu("baseball")}\nCAMERA  ${cmu("camera")}\n`);
    const o = await runImport({ arpabet: path, case: "lower", stressPolicy: ["weak-forms", "demote-second-primary"] });
    expect(o.stderr).toContain("import: before-vowel: 1 entry changed\n");
    expect(o.stderr).toContain("import: weak-forms: 1 entry changed\n");
    expect(o.stderr).toContain("import: demote-second-primary: 1 entry changed\n");
    expect(o.stdout.split("\n").slice(0, 2)).toEqual(["word,pron,tags,note", "the,ð ə,weak weak-forms,"]);
  });
});
