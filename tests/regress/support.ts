// Test support for the regress room: a CSV slice of the CMU Pronouncing Dictionary (npm
// `cmu-pronouncing-dictionary`, ISC) in broad IPA, written to a temporary file.

import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { arpabetToIpa, cmuEntries } from "../lexicons/harness.js";

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
