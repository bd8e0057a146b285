// Per-variety overrides (lexicon/overrides.ts): a copy of the demo whose careful variety has an
// override file. Checked from the written files: which rows replace which, the keys, the rejects with
// their own codes and the warning at the word, replaced.csv, counts that reconcile, build.json, the
// other variety untouched; and reconcile() refusing outputs that lose or double a replaced row.

import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { vi } from "vitest";
import { beforeAll, describe, expect, it } from "vitest";
import { runBuild } from "../../src/cli/build.js";
import { loadManifest } from "../../src/lexicon/manifest.js";
import { reconcile, type InputRecords, type WrittenCounts } from "../../src/lexicon/reconcile.js";
import { buildOpts, copyLexicons } from "../regress/support.js";

const OVERRIDES = [
  "word,pron,id,pos,tags,note",
  "schedule,ˈʃɛdʒul,ct0195,noun,announcement,one row for the word's two", // line 2
  "city,ˈsɪɾi,,noun,,no id: key city#1", // line 3
  "tram,ˈtɹɑm,ct0138,noun,,", // line 4
  "tram,ˈtɹæm,ct0138b,noun,,a second row: added", // line 5
  "zorblax,ˈzɔɹblæks,,noun,,not in the lexicon", // line 6
  "via,ˈv@ə,,prep,,cannot be read: replaces nothing", // line 7
  "three,ˈθɹi,ct0001,num,,the key of zero (which stays)", // line 8
  "",
].join("\n");

let root: string;
let demo: string;
let out: string;
let code: number;
let stderr = "";
const jsonl = (variety: string) => readFileSync(join(out, "demo", variety, "lexicon.jsonl"), "utf8").trim().split("\n").map((l) => JSON.parse(l) as { key: string; word: string; narrow: string; source: { file: string; line: number } });

beforeAll(async () => {
  root = copyLexicons();
  demo = join(root, "lexicons", "demo");
  writeFileSync(join(demo, "overrides-careful.csv"), OVERRIDES);
  const manifest = JSON.parse(readFileSync(join(demo, "varieties.json"), "utf8"));
  manifest.varieties[1].overrides = "overrides-careful.csv";
  writeFileSync(join(demo, "varieties.json"), JSON.stringify(manifest, null, 2));
  out = join(root, "build");
  const spies = [vi.spyOn(process.stdout, "write").mockImplementation(() => true), vi.spyOn(process.stderr, "write").mockImplementation((c) => ((stderr += String(c)), true))];
  try {
    code = await runBuild(demo, { ...buildOpts(out), quiet: false });
  } finally {
    spies.forEach((s) => s.mockRestore());
  }
}, 180_000);

describe("per-variety overrides", () => {
  it("the manifest reads the file; a missing one is an error at the value", () => {
    const m = loadManifest(demo);
    expect(m.manifest?.varieties[1]!.overrides).toBe(join(demo, "overrides-careful.csv"));
    expect(m.manifest?.varieties[0]!.overrides).toBeUndefined();
    const text = readFileSync(join(demo, "varieties.json"), "utf8");
    writeFileSync(join(demo, "varieties.json"), text.replace('"overrides-careful.csv"', '"nowhere.csv"'));
    const bad = loadManifest(demo);
    writeFileSync(join(demo, "varieties.json"), text);
    expect(bad.manifest).toBeUndefined();
    expect(bad.diagnostics.map((d) => d.code)).toEqual(["manifest/overrides-missing"]);
    const line = text.split("\n").findIndex((l) => l.includes("overrides-careful.csv")) + 1;
    expect(bad.diagnostics[0]!.line).toBe(line);
  });

  it("exits 3 (override rows rejected) and warns at the unknown word", () => {
    expect(code).toBe(3);
    expect(stderr).toMatch(/overrides-careful\.csv:6:1: warning: The word 'zorblax' has no row in the lexicon/);
  });

  it("replaces every row of an overridden word in that variety only, with the keys the README states", () => {
    const careful = jsonl("careful");
    const general = jsonl("general");
    const of = (es: typeof careful, w: string) => es.filter((e) => e.word === w).map((e) => [e.key, e.source.file, e.source.line]);
    expect(of(careful, "schedule")).toEqual([["ct0195", "overrides-careful.csv", 2]]);
    expect(of(careful, "city")).toEqual([["city#1", "overrides-careful.csv", 3]]);
    expect(of(careful, "tram")).toEqual([["ct0138", "overrides-careful.csv", 4], ["ct0138b", "overrides-careful.csv", 5]]);
    // A rejected override row replaces nothing; a row read and then rejected (duplicate key) has replaced its word.
    expect(of(careful, "via")).toEqual([["ct0252", "lexicon.csv", 253], ["ct0253", "lexicon.csv", 254]]);
    expect(of(careful, "three")).toEqual([]);
    expect(of(careful, "zorblax")).toEqual([]);
    // The other variety is untouched.
    expect(of(general, "schedule")).toEqual([["ct0195", "lexicon.csv", 196], ["ct0196", "lexicon.csv", 197]]);
    expect(of(general, "three")).toEqual([["ct0004", "lexicon.csv", 5]]);
    expect(careful.find((e) => e.key === "ct0195")!.narrow).toMatch(/^ˈʃ/);
    // Override entries come after the lexicon's own, in the override file's order.
    expect(careful.slice(-4).map((e) => e.key)).toEqual(["ct0195", "city#1", "ct0138", "ct0138b"]);
  });

  it("writes replaced.csv and rejects with their own codes, and the counts reconcile", () => {
    const replaced = readFileSync(join(out, "demo", "careful", "replaced.csv"), "utf8");
    expect(replaced).toBe("file,line,key,word\nlexicon.csv,5,ct0004,three\nlexicon.csv,139,ct0138,tram\nlexicon.csv,165,ct0164,city\nlexicon.csv,196,ct0195,schedule\nlexicon.csv,197,ct0196,schedule\n");
    const rejects = readFileSync(join(out, "demo", "careful", "rejects.csv"), "utf8").trim().split("\n").slice(1).map((l) => l.split(",").slice(0, 4).join(","));
    expect(rejects).toEqual(["overrides-careful.csv,6,1,override/unknown-word", "overrides-careful.csv,7,7,ipa/unknown-symbol", "overrides-careful.csv,8,1,override/duplicate-key"]);
    const summary = JSON.parse(readFileSync(join(out, "demo", "careful", "summary.json"), "utf8"));
    // 391 lexicon rows + 7 override rows = 388 + 2 (schedule, city) + 2 (tram) entries + 3 rejects + 5 replaced.
    expect([summary.rowsRead, summary.entriesWritten, summary.rowsRejected, summary.rowsReplaced]).toEqual([398, 390, 3, 5]);
    expect(summary.reconciled).toBe(true);
    expect(summary.files).toContain("replaced.csv");
    const general = JSON.parse(readFileSync(join(out, "demo", "general", "summary.json"), "utf8"));
    expect([general.rowsRead, general.entriesWritten, general.rowsRejected, general.rowsReplaced]).toEqual([391, 391, 0, undefined]);
    expect(readFileSync(join(out, "demo", "careful", "lexicon.tsv"), "utf8").trim().split("\n").length - 1).toBe(390);
  });

  it("records the override file and its hash in build.json", () => {
    const record = JSON.parse(readFileSync(join(out, "demo", "build.json"), "utf8"));
    expect(record.varieties[1].overrides).toEqual({ path: "overrides-careful.csv", sha256: expect.stringMatching(/^[0-9a-f]{64}$/) });
    expect(record.varieties[0].overrides).toBeUndefined();
    expect(record.varieties[0].stepHashes.length).toBe(record.varieties[0].steps.length);
  });
});

describe("reconcile() with an override file", () => {
  const input = (lines: number[], words: string[]): InputRecords => ({ count: lines.length, lines, words });
  const base = input([2, 3, 4], ["a", "b", "b"]);
  const over = { lexicon: "lex.csv", overrides: "over.csv", input: input([2], ["b"]) };
  const written = (w: Partial<WrittenCounts>): WrittenCounts => ({
    jsonl: 2, jsonlLines: [2, 2], jsonlFiles: ["lex.csv", "over.csv"], jsonlWords: ["a", "b"], rejects: 0, rejectLines: [], rejectFiles: [],
    replaced: [{ file: "lex.csv", line: 3, word: "b" }, { file: "lex.csv", line: 4, word: "b" }], ...w,
  });

  it("accepts every record as one entry, one reject or one replaced row", () => {
    expect(reconcile("lex.csv", base, written({}), over)).toEqual([]);
  });

  it("refuses a replaced row missing, doubled, or holding another word", () => {
    const missing = reconcile("lex.csv", base, written({ replaced: [{ file: "lex.csv", line: 3, word: "b" }] }), over);
    expect(missing.map((d) => d.message).join(" ")).toMatch(/Line lex\.csv line 4 of the input is neither an entry nor a reject nor replaced/);
    const doubled = reconcile("lex.csv", base, written({ replaced: [{ file: "lex.csv", line: 3, word: "b" }, { file: "lex.csv", line: 4, word: "b" }, { file: "lex.csv", line: 2, word: "a" }] }), over);
    expect(doubled.map((d) => d.message).join(" ")).toMatch(/lex\.csv line 2 of the input was written more than once/);
    const moved = reconcile("lex.csv", base, written({ replaced: [{ file: "lex.csv", line: 3, word: "b" }, { file: "lex.csv", line: 4, word: "c" }] }), over);
    expect(moved.map((d) => d.message).join(" ")).toMatch(/do(es)? not hold the word on that line/);
  });

  it("tells the two files' lines apart: the override's line 2 is not the lexicon's line 2", () => {
    const r = reconcile("lex.csv", base, written({ jsonlFiles: ["lex.csv", "lex.csv"] }), over);
    expect(r.length).toBeGreaterThan(0);
  });
});
