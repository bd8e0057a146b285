// Stress hygiene in every run (issue 10, section 2): the stress checks shared with `strata lint`,
// the report file beside the outputs (stress.csv), the counts in summary.json and on stderr,
// --strict, and the stress policies counted by name. Real words from the CMU Pronouncing Dictionary
// (npm cmu-pronouncing-dictionary 3.0.0).

import { mkdtempSync, readFileSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadInventory } from "../../src/inventory/index.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { importedCsv } from "../../src/cli/import.js";
import { readLexicon, type LexiconRow } from "../../src/lexicon/read.js";
import { countStressProblems, emptyStressCounts, stressFindings, STRESS_CODES, type StressCode } from "../../src/lexicon/lint-stress.js";
import { reconcileStressReport } from "../../src/lexicon/reconcile-stress.js";
import { countInputRecords, csvRecords } from "../../src/lexicon/reconcile.js";
import { cli } from "../cli/helpers.js";

const ROOT = resolve(__dirname, "../..");
const GRAMMAR = join(ROOT, "lexicons", "en-us", "grammar.strata");
const CACHE = join(tmpdir(), "strata-test-cache");
const inv = loadInventory(join(ROOT, "lexicons", "en-us", "segments.csv")).inventory!;
const ctx = { inventory: inv, assignsStress: true };

async function rows(csv: string): Promise<LexiconRow[]> {
  const out: LexiconRow[] = [];
  for await (const x of readLexicon(Readable.from([csv]), { inventory: inv, file: "x.csv" })) if (x.kind === "row") out.push(x);
  return out;
}

const codes = async (csv: string, assignsStress = true): Promise<string[][]> =>
  (await rows(csv)).map((r) => stressFindings(r, { inventory: inv, assignsStress }).map((f) => `${f.column} ${f.code}`));

// Problems in the sense of issue 10, section 2, as CMU writes them (the dictionary's own entries,
// turned to IPA by hand with lexicons/en-us/arpabet.csv).
const PROBLEMS = [
  "word,pron,tags",
  "baseball,bˈeɪsbˈɔl,", //      2: B EY1 S B AO1 L: two primaries (the second at column 16)
  "ability,əbˈɪlətˌi,", //       3: AH0 B IH1 L AH0 T IY2: secondary on a weak final syllable
  "the,ðə,", //                  4: DH AH0: unmarked, every vowel reduced
  "the,ðə,weak", //              5: the weak form: no problem
  "city,sˌɪti,", //              6: only secondary stress
  "cat,kæt,", //                 7: unmarked: default stress, no problem
  "aardvark,ˈɑɹdvˌɑɹk,", //       8: AA1 R D V AA2 R K: a closed final syllable keeps its secondary
  "Quillhaven Row,kwˈɪl.hˌeɪ.vən # ɹˈoʊ,", // 9: one primary in each word of a phrase
].join("\n") + "\n";

describe("the stress checks (lint-stress.ts)", () => {
  it("countStressProblems counts what stressFindings finds, code by code", async () => {
    const csv = PROBLEMS + ["kˈɑmpˈaʊnd#ɹˈum", "ˌa ˌb", "bˈeɪsbˈɔl # ɹˈoʊ", "ðə # ðə"].map((p, i) => `extra${i},${p},\n`).join("");
    for (const assignsStress of [true, false]) {
      const c = { inventory: inv, assignsStress };
      const counted = emptyStressCounts();
      const found = emptyStressCounts();
      let n = 0;
      let total = 0;
      for (const r of await rows(csv)) {
        total += countStressProblems(r, c, counted);
        for (const f of stressFindings(r, c)) {
          found[f.code]++;
          n++;
        }
      }
      expect(counted).toEqual(found);
      expect(total).toBe(n);
      expect(n).toBeGreaterThan(3);
    }
  });

  it("find each kind, positioned at the mark at fault or the whole pronunciation", async () => {
    expect(await codes(PROBLEMS)).toEqual([
      ["16 lint/many-primary"],
      ["16 lint/final-secondary"],
      ["5 lint/reduced-default"],
      [],
      ["6 lint/no-primary"],
      [],
      [],
      [],
    ]);
  });

  it("an unmarked entry is an error only without a stress step; a weak form is never an unmarked entry", async () => {
    expect(await codes("word,pron,tags\ncat,kæt,\nthe,ðə,weak\n", false)).toEqual([["5 lint/unstressed-entry"], []]);
  });

  it("a closed or post-stress final syllable, and a final vowel that is not weak-looking, are not flagged", async () => {
    // abilities AH0 B IH1 L AH0 T IY2 Z (closed); aalto AA1 L T OW2 (oʊ); abc EY1 B IY2 S IY2 (after secondary)
    expect(await codes("word,pron\nabilities,əbˈɪlətˌiz\naalto,ˈɑltˌoʊ\nabc,ˈeɪbˌisˌi\n")).toEqual([[], [], []]);
  });
});

/** A lexicon folder with one en-us variety. */
function lexiconFolder(csv: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-hyg-"));
  writeFileSync(join(dir, "lexicon.csv"), csv);
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
  return dir;
}

describe("strata build and transcribe report stress problems", () => {
  it("build writes stress.csv beside the outputs, counts in summary.json, one line per variety on stderr; --strict exits 4 after writing", async () => {
    const dir = lexiconFolder(PROBLEMS);
    const out = mkdtempSync(join(tmpdir(), "strata-hyg-out-"));
    const plain = await cli(["build", dir, "-o", out, "--cache-dir", CACHE, "--samples", "0", "--workers", "0"]);
    expect(plain.exitCode).toBe(0);
    expect(plain.stderr).toContain("strata: general: 4 stress problems (many-primary 1, no-primary 1, final-secondary 1, reduced-default 1), see stress.csv; stress set by default-stress 2, weak 1\n");
    const name = dir.split(/[\\/]/).pop()!;
    const base = join(out, name, "general");
    const report = csvRecords(readFileSync(join(base, "stress.csv"), "utf8"));
    expect(report[0]).toEqual(["file", "line", "column", "key", "word", "severity", "code", "message"]);
    expect(report.slice(1).map((r) => r.slice(0, 7).join(" "))).toEqual([
      "lexicon.csv 2 16 baseball#1 baseball error lint/many-primary",
      "lexicon.csv 3 16 ability#1 ability warning lint/final-secondary",
      "lexicon.csv 4 5 the#1 the warning lint/reduced-default",
      "lexicon.csv 6 6 city#1 city warning lint/no-primary",
    ]);
    const summary = JSON.parse(readFileSync(join(base, "summary.json"), "utf8"));
    expect(summary.stress).toEqual({
      problems: { "lint/many-primary": 1, "lint/unstressed-entry": 0, "lint/no-primary": 1, "lint/final-secondary": 1, "lint/reduced-default": 1 },
      policies: { "default-stress": 2, weak: 1, "weak-forms": 0, "demote-second-primary": 0 },
    });
    expect(summary.files).toContain("stress.csv");

    const strictOut = mkdtempSync(join(tmpdir(), "strata-hyg-out-"));
    const strict = await cli(["build", dir, "-o", strictOut, "--cache-dir", CACHE, "--samples", "0", "--workers", "0", "--strict", "-q"]);
    expect(strict.exitCode).toBe(4);
    expect(strict.stderr).not.toContain("stress problems");
    expect(readdirSync(join(strictOut, name, "general")).sort()).toEqual(["lexicon.jsonl", "lexicon.pls", "lexicon.tsv", "rejects.csv", "stress.csv", "summary.json"]);
    expect(readFileSync(join(strictOut, name, "general", "stress.csv"), "utf8")).toBe(readFileSync(join(base, "stress.csv"), "utf8"));

    const clean = lexiconFolder("word,pron\ncat,ˈkæt\n");
    expect((await cli(["build", clean, "-o", strictOut, "--cache-dir", CACHE, "--samples", "0", "--strict", "-q"])).exitCode).toBe(0);
  }, 120_000);

  it("transcribe counts the same problems on stderr, writes them with --stress-report, and --strict exits 4", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-hyg-t-"));
    const file = join(dir, "x.csv");
    writeFileSync(file, PROBLEMS);
    const report = join(dir, "stress.csv");
    const r = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "--strict", "--stress-report", report, file]);
    expect(r.exitCode).toBe(4);
    expect(r.stderr).toContain(`strata: 4 stress problems (many-primary 1, no-primary 1, final-secondary 1, reduced-default 1), see ${report}; stress set by default-stress 2, weak 1\n`);
    expect(csvRecords(readFileSync(report, "utf8")).slice(1).map((x) => `${x[1]} ${x[6]}`)).toEqual(["2 lint/many-primary", "3 lint/final-secondary", "4 lint/reduced-default", "6 lint/no-primary"]);
    const quiet = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", file]);
    expect(quiet.exitCode).toBe(0);
    expect(quiet.stderr).toBe("");
  }, 120_000);
});

describe("the stress report is reconciled before the folder is swapped in", () => {
  it("a report that lost a row, names a rejected line or another word is an error", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-hyg-r-"));
    const lexicon = join(dir, "lexicon.csv");
    writeFileSync(lexicon, "word,pron\nbaseball,bˈeɪsbˈɔl\ncity,sˌɪti\nbad,ˈbæq\n");
    const input = await countInputRecords(lexicon);
    const header = "file,line,column,key,word,severity,code,message\n";
    const good = `${header}lexicon.csv,2,18,baseball#1,baseball,error,lint/many-primary,m\nlexicon.csv,3,6,city#1,city,warning,lint/no-primary,m\n`;
    const path = join(dir, "stress.csv");
    writeFileSync(path, good);
    const src = [{ file: "lexicon.csv", input }];
    const rejected = [{ file: "lexicon.csv", line: 4 }];
    expect(await reconcileStressReport(lexicon, path, 2, src, rejected)).toEqual([]);
    expect((await reconcileStressReport(lexicon, path, 3, src, rejected)).map((d) => d.message)).toEqual([
      "The run found 3 stress problems but stress.csv holds 2. This is a bug in Strata; please report it with the lexicon.",
    ]);
    writeFileSync(path, `${header}lexicon.csv,4,1,bad#1,bad,error,lint/many-primary,m\n`);
    expect((await reconcileStressReport(lexicon, path, 1, src, rejected))[0]!.message).toContain("names lexicon.csv line 4, which is not an entry");
    writeFileSync(path, `${header}lexicon.csv,3,6,city#1,town,warning,lint/no-primary,m\n`);
    expect((await reconcileStressReport(lexicon, path, 1, src, rejected))[0]).toMatchObject({ line: 3, code: "run/unreconciled" });
    // another file's line 3 is not this one's
    writeFileSync(path, `${header}overrides.csv,3,6,city#1,city,warning,lint/no-primary,m\n`);
    expect((await reconcileStressReport(lexicon, path, 1, src, rejected))[0]!.message).toContain("names overrides.csv line 3, which is not an entry");
  });
});

describe("on the whole CMU dictionary", () => {
  // Expected counts computed here from the ARPAbet digits themselves, not by the checks.
  const table = loadArpabetTable().table!;
  const vowels = (p: string): [string, string][] => [...p.matchAll(/([A-Z]+)([012])/g)].map((m) => [m[1]!, m[2]!]);
  const expected = { "lint/many-primary": 0, "lint/no-primary": 0, "lint/reduced-default": 0, "lint/final-secondary": 0 } as Record<string, number>;
  for (const w of Object.keys(dictionary)) {
    const p = dictionary[w]!;
    const v = vowels(p);
    const ones = v.filter((x) => x[1] === "1").length;
    if (ones > 1) expected["lint/many-primary"]!++;
    if (ones === 0 && v.some((x) => x[1] === "2")) expected["lint/no-primary"]!++;
    // AH0 is ə and ER0 is ɚ (or ə before a vowel): the reduced vowels of lexicons/en-us/arpabet.csv.
    if (v.length > 0 && v.every((x) => x[1] === "0" && (x[0] === "AH" || x[0] === "ER"))) expected["lint/reduced-default"]!++;
    const last = v[v.length - 1];
    const open = /[012]\s*$/.test(p.replace(/#.*$/, "").trim());
    if (v.length > 1 && last![1] === "2" && v[v.length - 2]![1] === "0" && (last![0] === "IY" || last![0] === "IH") && open) expected["lint/final-secondary"]!++;
  }

  async function count(policies: ("weak-forms" | "demote-second-primary")[]): Promise<{ codes: Record<string, number>; tags: Record<string, number> }> {
    const imported = importArpabetDictionary(dictionary, table, { file: "cmu", policies });
    const csv = [...importedCsv(imported.rows)].join("");
    const codes: Record<string, number> = {};
    const tags: Record<string, number> = {};
    for await (const batch of readLexicon(Readable.from([csv]), { inventory: inv, file: "cmu.csv" }).batches()) {
      for (const x of batch) {
        if (x.kind !== "row") continue;
        for (const f of stressFindings(x, ctx)) codes[f.code] = (codes[f.code] ?? 0) + 1;
        for (const t of x.tags) tags[t] = (tags[t] ?? 0) + 1;
      }
    }
    return { codes, tags };
  }

  it("finds every entry with two primaries, only secondaries, a stressed-schwa default or a weak final secondary; the policies remove two kinds and are counted", async () => {
    const plain = await count([]);
    for (const c of ["lint/many-primary", "lint/no-primary", "lint/reduced-default", "lint/final-secondary"]) expect(plain.codes[c] ?? 0, c).toBe(expected[c]);
    expect(expected["lint/many-primary"]).toBe(1787); // the figure issue 10 gives
    expect(expected["lint/no-primary"]).toBe(48);
    const both = await count(["weak-forms", "demote-second-primary"]);
    expect(both.codes["lint/many-primary"] ?? 0).toBe(0);
    expect(both.codes["lint/reduced-default"] ?? 0).toBe(0);
    expect(both.tags["demote-second-primary"]).toBe(1787);
    expect(both.tags["weak-forms"]).toBe(88);
    expect(both.tags["weak"]).toBe(88);
    expect(STRESS_CODES.filter((c: StressCode) => (both.codes[c] ?? 0) > 0).sort()).toEqual(["lint/final-secondary", "lint/no-primary"]);
  }, 120_000);
});
