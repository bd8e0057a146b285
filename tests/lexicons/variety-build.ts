// The shipped varieties other than General American (lexicons/en-ca, lexicons/en-us-nonrhotic): where
// their grammars are, and a run of words through the real `strata build` (manifest, compiled machine,
// TSV), so the tests check each fact both with the reference interpreter and through the build.

import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join } from "node:path";
import { fileURLToPath } from "node:url";
import { cli } from "../cli/helpers.js";

const LEXICONS = fileURLToPath(new URL("../../lexicons/", import.meta.url));
export const CANADIAN = join(LEXICONS, "en-ca", "grammar.strata");
export const NON_RHOTIC = join(LEXICONS, "en-us-nonrhotic", "grammar.strata");

/** One cache for every test file of a run (keys are content hashes, so sharing is safe). */
const CACHE = join(tmpdir(), "strata-test-cache");

export interface Row {
  /** The key the build gives the entry (also its id). */
  readonly id: string;
  readonly word: string;
  /** Broad IPA; `#` between the words of a phrase. */
  readonly pron: string;
}

/**
 * Builds `rows` with `strata build` as one variety named `name` of a lexicon folder made for the
 * test, and returns the narrow form per id (the TSV's key column). Throws with the command's
 * output if the build does not exit 0.
 */
export async function buildNarrow(grammar: string, name: string, rows: readonly Row[]): Promise<Map<string, string>> {
  const dir = mkdtempSync(join(tmpdir(), "strata-variety-"));
  const quote = (s: string): string => `"${s.replace(/"/g, '""')}"`;
  writeFileSync(join(dir, "lexicon.csv"), ["word,pron,id", ...rows.map((r) => [r.word, r.pron, r.id].map(quote).join(","))].join("\n") + "\n");
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name, lang: "en", grammar }] }));
  const out = join(dir, "out");
  const run = await cli(["build", dir, "-o", out, "--format", "tsv", "-q", "--cache-dir", CACHE]);
  if (run.exitCode !== 0) throw new Error(`strata build exited ${run.exitCode}:\n${run.stdout}\n${run.stderr}`);
  const tsv = readFileSync(join(out, basename(dir), name, "lexicon.tsv"), "utf8").trimEnd().split("\n").slice(1);
  return new Map(tsv.map((line) => {
    const [key, , narrow] = line.split("\t") as [string, string, string];
    return [key, narrow];
  }));
}
