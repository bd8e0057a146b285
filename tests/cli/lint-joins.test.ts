// `strata lint` and joins: the unmarked-join hint on the command line (text and JSON), counted
// apart from errors and warnings. Invented words over a small grammar of our own.

import { copyFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { runLint, type LintJson } from "../../src/cli/lint.js";

const EN_US = join(resolve(__dirname, "../.."), "lexicons", "en-us");

function grammarDir(): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-lint-joins-g-"));
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(join(dir, "grammar.strata"), ['inventory "segments.csv"', "onsets = p t k s l n m pl st", "codas = p t k s l n m mp", "joins = closed", "syllabify", "stress from right 2", ""].join("\n"));
  return dir;
}

function lexicon(text: string): string {
  const p = join(mkdtempSync(join(tmpdir(), "strata-lint-joins-l-")), "lexicon.csv");
  writeFileSync(p, text);
  return p;
}

describe("strata lint: unmarked joins", () => {
  // "Kamptlo": mptl has no legal split under these lists (no tl, ptl or mptl onset; mpt is no coda);
  // mp is the longest declared coda it starts with, so the hint names mp#tl.
  const file = lexicon("word,pron\nKamptlo,ˈkæmptloʊ\nKamp+tlo,ˈkæmp+tloʊ\n");

  it("prints a hint at the cluster and counts it apart from the warnings", async () => {
    const r = await runLint(file, { grammar: grammarDir(), strict: false });
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toMatch(/lexicon\.csv:2:12: hint: 'Kamptlo': no legal split of 'mptl' inside one word: .*'mp#tl' or 'mp\+tl'.* \[lint\/unmarked-join\]/);
    expect(r.stdout).toMatch(/0 errors, 2 warnings, 1 hint\n/);
    // The same cluster with its join marked gets no hint.
    expect(r.stdout).not.toMatch(/:3:\d+: hint/);
  });

  it("--json carries the hint with its severity, position and cluster", async () => {
    const r = await runLint(file, { grammar: grammarDir(), json: true });
    const j = JSON.parse(r.stdout) as LintJson;
    expect(j.hints).toBe(1);
    expect(j.findings.find((f) => f.code === "lint/unmarked-join")).toMatchObject({ severity: "hint", line: 2, column: 12, length: 4, cluster: "mptl" });
  });
});
