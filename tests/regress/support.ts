// Test support for the regress room: copies of the shipped lexicons to edit, in-process builds, the
// reference interpreter's results per entry key, and slices of the CMU Pronouncing Dictionary (npm
// `cmu-pronouncing-dictionary`, ISC) in broad IPA.

import { cpSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { arpabetToIpa, cmuEntries } from "../lexicons/harness.js";
import { vi } from "vitest";
import { runBuild } from "../../src/cli/build.js";
import { loadEngine } from "../../src/cli/common.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { EntryKeys } from "../../src/lexicon/keys.js";

/** `count` entries, every `every`-th of the dictionary, as `word,pron` rows (no id column). */
export function cmuSliceRows(count: number, every: number): string[] {
  return cmuEntries().filter((_, i) => i % every === 0).slice(0, count).map(([w, a]) => `${w},${arpabetToIpa(a)}`);
}

/** The same rows as a lexicon file; returns its path. */
export function cmuSliceCsv(count: number, every: number): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-cmu-slice-"));
  const file = join(dir, "lexicon.csv");
  writeFileSync(file, ["word,pron", ...cmuSliceRows(count, every), ""].join("\n"));
  return file;
}

export const ROOT = resolve(__dirname, "../..");
export const SHARED_CACHE = join(tmpdir(), "strata-test-cache");
export const buildOpts = (out: string) => ({ out, allowRejects: false, quiet: true, engine: "machine" as const, cache: true, cacheDir: SHARED_CACHE, samples: 0, workers: "0", syllableBreaks: true });

/** A copy of lexicons/ (demo and en-us) in a temporary folder; returns the copy's root. */
export function copyLexicons(): string {
  const tmp = mkdtempSync(join(tmpdir(), "strata-regress-"));
  cpSync(join(ROOT, "lexicons"), join(tmp, "lexicons"), { recursive: true });
  return tmp;
}

/** Replaces `from` by `to` in a file (throws when `from` is not there, so a scenario cannot silently do nothing). */
export function edit(file: string, from: string | RegExp, to: string): void {
  const text = readFileSync(file, "utf8");
  const next = text.replace(from, to);
  if (next === text) throw new Error(`edit: '${String(from)}' not found in ${file}`);
  writeFileSync(file, next);
}

/** Runs `strata build` in-process with stdout and stderr silenced; returns the exit code. */
export async function build(lexiconDir: string, out: string): Promise<number> {
  const spies = [vi.spyOn(process.stdout, "write").mockImplementation(() => true), vi.spyOn(process.stderr, "write").mockImplementation(() => true)];
  try {
    return await runBuild(lexiconDir, buildOpts(out));
  } finally {
    spies.forEach((s) => s.mockRestore());
  }
}

/** The reference interpreter's results for every row of a lexicon under one grammar, by entry key. */
export async function interpreted(grammarFile: string, lexiconCsv: string): Promise<Map<string, { narrow: string; variants: string[]; rules: readonly string[] }>> {
  const loaded = loadEngine(grammarFile, { kind: "interpreter" });
  if (!("engine" in loaded)) throw new Error(JSON.stringify(loaded.diagnostics));
  const engine = loaded.engine as InterpreterEngine;
  const keys = new EntryKeys();
  const out = new Map<string, { narrow: string; variants: string[]; rules: readonly string[] }>();
  for await (const item of readLexicon(lexiconCsv, { inventory: loaded.inventory })) {
    if (item.kind !== "row") continue;
    const t = engine.transcribeWord(item.symbols)!;
    out.set(keys.next(item.word, item.id), { narrow: t.narrow, variants: [...t.variants].sort(), rules: t.rules });
  }
  return out;
}

/** A lexicon folder (one variety, the en-us grammar of `root`) holding a CMU slice; returns its path. */
export function cmuFolder(root: string, count: number, every: number): string {
  const dir = join(root, "lexicons", "cmu");
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, "lexicon.csv"), ["word,pron", ...cmuSliceRows(count, every), ""].join("\n"));
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: "../en-us/grammar.strata" }] }));
  return dir;
}
