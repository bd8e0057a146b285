// `strata lint` on small invented lexicons: each finding's code, severity, line, column and span;
// the counts per code; the JSON document; exit codes; and the library's per-row lint directly.

import { copyFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { runLint, type LintJson } from "../../src/cli/lint.js";

const ROOT = resolve(__dirname, "../..");
const EN_US = join(ROOT, "lexicons", "en-us");

/**
 * A grammar folder of our own over the en-us inventory: a few onsets and codas, `syllabify`, and
 * (unless `stress` is false) no default-stress step.
 */
function tinyGrammar(opts: { stress?: boolean } = {}): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-lint-g-"));
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(
    join(dir, "grammar.strata"),
    [
      'inventory "segments.csv"',
      "onsets = p t k s l n m pl st",
      "codas = p t k s l n m st",
      "heavy = [+syllabic] [-syllabic]",
      "syllabify",
      ...(opts.stress === true ? ["stress from right 2"] : []),
      "",
    ].join("\n"),
  );
  return dir;
}

/** A lexicon file of invented words. */
function lexicon(text: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-lint-l-"));
  const p = join(dir, "lexicon.csv");
  writeFileSync(p, text);
  return p;
}

/** The findings of a JSON run, as `line:column code` for compact comparison. */
const where = (j: LintJson): string[] => j.findings.map((f) => `${f.line}:${f.column} ${f.code}`);

describe("strata lint: syllabification findings", () => {
  const g = tinyGrammar();
  // Invented words. Columns count code points: in "sklimo,ˈsklimoʊ" the pron field starts at column 8, its s at 9.
  const file = lexicon(
    [
      "word,pron",
      "pelta,ˈpɛltə", //     2: p ɛ l . t ə  — clean: l is a coda, t an onset
      "sklimo,ˈsklimoʊ", //  3: skl is not a declared onset (at s, column 9, 3 long)
      "tampo,ˈtæmp", //      4: final mp is not a declared coda (at m, column 10)
      "tazro,ˈtɑʒɹoʊ", //    5: no consonant of ʒɹ starts a declared onset (column 10)
      "lampta,ˈlæmptə", //   6: m p t: longest legal onset t leaves mp, not a declared coda
      "pssst,psst", //       7: no nucleus (and no stress mark: the no-nucleus error says it all)
      "",
    ].join("\n"),
  );

  it("reports each problem at the cluster, with the cluster in IPA and a span covering it", async () => {
    const o = await runLint(file, { grammar: g, json: true });
    const j = JSON.parse(o.stdout) as LintJson;
    expect(where(j)).toEqual([
      "3:9 interp/illegal-onset",
      "4:10 interp/illegal-coda",
      "5:10 interp/no-legal-split",
      "6:11 interp/illegal-coda",
      "6:11 lint/unmarked-join", // the same cluster: no legal split inside one word, so a hint (m#pt)
      "7:7 lint/no-nucleus",
    ]);
    const byLine = new Map(j.findings.filter((f) => f.severity !== "hint").map((f) => [f.line, f]));
    expect(byLine.get(3)).toMatchObject({ cluster: "skl", length: 3, severity: "warning", word: "sklimo" });
    expect(byLine.get(4)).toMatchObject({ cluster: "mp", length: 2, severity: "warning" });
    expect(byLine.get(5)).toMatchObject({ cluster: "ʒɹ", length: 2, severity: "warning" });
    expect(byLine.get(6)).toMatchObject({ cluster: "mp", length: 2 });
    expect(byLine.get(7)).toMatchObject({ cluster: "psst", length: 4, severity: "error", word: "pssst" });
    expect(byLine.get(3)!.message).toContain("'sklimo'");
    expect(byLine.get(3)!.message).toContain("'skl'");
  });

  it("counts per code and totals; exit 4 because of the error-level no-nucleus", async () => {
    const o = await runLint(file, { grammar: g, json: true });
    const j = JSON.parse(o.stdout) as LintJson;
    expect(j.counts).toEqual({ "interp/illegal-coda": 2, "interp/illegal-onset": 1, "interp/no-legal-split": 1, "lint/no-nucleus": 1, "lint/unmarked-join": 1 });
    expect(j).toMatchObject({ rows: 6, rejects: 0, rowsWithFindings: 5, errors: 1, warnings: 4, hints: 1 });
    expect(o.exitCode).toBe(4);
  });

  it("prints one line per finding as file:line:column, then the counts and totals", async () => {
    const o = await runLint(file, { grammar: g });
    const lines = o.stdout.trimEnd().split("\n");
    expect(lines[0]).toBe(`${file}:3:9: warning: 'sklimo': word-initial cluster is not a declared onset: 'skl'. [interp/illegal-onset]`);
    expect(lines).toContain("        2  interp/illegal-coda");
    expect(lines).toContain("        1  lint/no-nucleus");
    expect(lines[lines.length - 1]).toBe("lint: 6 rows read (0 rejected), 5 with findings: 1 error, 4 warnings, 1 hint");
    expect(o.exitCode).toBe(4);
  });

  it("exits 0 on warnings only, and 4 with --strict", async () => {
    const warnOnly = lexicon("word,pron\nsklimo,ˈsklimoʊ\npelta,ˈpɛltə\n");
    expect((await runLint(warnOnly, { grammar: g })).exitCode).toBe(0);
    expect((await runLint(warnOnly, { grammar: g, strict: true })).exitCode).toBe(4);
    const clean = lexicon("word,pron\npelta,ˈpɛltə\n");
    const o = await runLint(clean, { grammar: g, strict: true });
    expect(o.exitCode).toBe(0);
    expect(o.stdout).toBe("lint: 1 row read (0 rejected), 0 with findings: 0 errors, 0 warnings\n");
  });

  it("a quoted pronunciation field moves the columns by its opening quote", async () => {
    const q = lexicon('word,pron\nsklimo,"ˈsklimoʊ"\n');
    const j = JSON.parse((await runLint(q, { grammar: g, json: true })).stdout) as LintJson;
    expect(where(j)).toEqual(["2:10 interp/illegal-onset"]);
  });

  it("every word of a phrase is syllabified on its own", async () => {
    // "sklimo" after the word break: its skl is word-initial again.
    const ph = lexicon("word,pron\npelta sklimo,ˈpɛltə # ˈsklimoʊ\n");
    const j = JSON.parse((await runLint(ph, { grammar: g, json: true })).stdout) as LintJson;
    expect(where(j)).toEqual(["2:24 interp/illegal-onset"]);
  });
});

describe("strata lint: stress and unreadable rows", () => {
  it("more than one primary stress in one word is an error at the second mark; one per word of a phrase is fine", async () => {
    const g = tinyGrammar({ stress: true });
    const file = lexicon(["word,pron", "pellim,ˈpɛˈlɪm", "pel tim,ˈpɛl # ˈtɪm", "pellimas,ˈpɛˈlɪˈmæs", ""].join("\n"));
    const o = await runLint(file, { grammar: g, json: true });
    const j = JSON.parse(o.stdout) as LintJson;
    expect(where(j)).toEqual(["2:11 lint/many-primary", "4:13 lint/many-primary"]);
    expect(j.findings[1]!.message).toContain("3 primary stress marks");
    expect(o.exitCode).toBe(4);
  });

  it("an entry with only secondary stress is a warning", async () => {
    const g = tinyGrammar({ stress: true });
    const j = JSON.parse((await runLint(lexicon("word,pron\npellim,ˌpɛlɪm\n"), { grammar: g, json: true })).stdout) as LintJson;
    expect(j.findings).toMatchObject([{ line: 2, column: 8, code: "lint/no-primary", severity: "warning" }]);
  });

  it("an unmarked entry is an error only when the grammar has no stress step", async () => {
    const file = lexicon("word,pron\npellim,pɛlɪm\n");
    const without = JSON.parse((await runLint(file, { grammar: tinyGrammar(), json: true })).stdout) as LintJson;
    expect(without.findings).toMatchObject([{ line: 2, column: 8, length: 5, code: "lint/unstressed-entry", severity: "error" }]);
    const withStress = await runLint(file, { grammar: tinyGrammar({ stress: true }), json: true });
    expect((JSON.parse(withStress.stdout) as LintJson).findings).toEqual([]);
    expect(withStress.exitCode).toBe(0);
  });

  it("reader rejects are error findings with the reader's code and column", async () => {
    const g = tinyGrammar({ stress: true });
    const file = lexicon(["word,pron", "pel@,ˈpɛl@", "tima,ˈtɪmɑˈ", ",ˈpɛl", "pelta,ˈpɛltə", ""].join("\n"));
    const o = await runLint(file, { grammar: g, json: true });
    const j = JSON.parse(o.stdout) as LintJson;
    expect(where(j)).toEqual(["2:10 ipa/unknown-symbol", "3:11 lexicon/stress-without-vowel", "4:1 lexicon/empty-word"]);
    expect(j).toMatchObject({ rows: 4, rejects: 3, errors: 3, warnings: 0 });
    expect(o.exitCode).toBe(4);
  });

  it("the shipped en-us grammar finds nothing to report in plain invented words", async () => {
    const file = lexicon("word,pron\nQuillhaven,ˈkwɪlheɪvən\nSallowmede,ˈsæloʊmid\n");
    const o = await runLint(file, { grammar: EN_US });
    expect(o.exitCode).toBe(0);
    expect(o.stdout).toBe("lint: 2 rows read (0 rejected), 0 with findings: 0 errors, 0 warnings\n");
  });

  it("reads standard input when no file is given", async () => {
    const o = await runLint(undefined, { grammar: tinyGrammar(), json: true, input: Readable.from(["word,pron\nsklimo,ˈsklimoʊ\n"]) });
    const j = JSON.parse(o.stdout) as LintJson;
    expect(j.file).toBe("<stdin>");
    expect(where(j)).toEqual(["2:9 interp/illegal-onset"]);
  });
});

describe("strata lint: when it cannot run", () => {
  it("exits 1 with the grammar's diagnostics when the grammar does not load", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-lint-bad-"));
    writeFileSync(join(dir, "grammar.strata"), 'inventory "nowhere.csv"\nsyllabify\n');
    const o = await runLint(lexicon("word,pron\na,ˈa\n"), { grammar: dir });
    expect(o.exitCode).toBe(1);
    expect(o.stdout).toBe("");
    expect(o.stderr).toContain("grammar.strata:1:");
    expect(o.stderr).toContain("nothing was linted");
  });

  it("exits 1 with a positioned message when the lexicon is missing or has no pron column", async () => {
    const g = tinyGrammar();
    const missing = await runLint(join(tmpdir(), "strata-no-such-lexicon.csv"), { grammar: g });
    expect(missing.exitCode).toBe(1);
    expect(missing.stderr).toMatch(/command line:1:1: error: Cannot read the lexicon '.*strata-no-such-lexicon\.csv': there is no such file\. \[cli\/no-such-file\]/u);
    const noPron = await runLint(lexicon("word,ipa\npelta,ˈpɛltə\n"), { grammar: g });
    expect(noPron.exitCode).toBe(1);
    expect(noPron.stderr).toContain("[lexicon/missing-column]");
  });
});
