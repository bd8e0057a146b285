// CMU slices for tests of the outputs (npm `cmu-pronouncing-dictionary`, ISC), converted with
// lexicons/en-us/arpabet.csv as the bench converts the whole dictionary, and a variety folder's
// files read for byte comparison.

import { readdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { dictionary } from "cmu-pronouncing-dictionary";
import { csvLine } from "../../src/emit/csv.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";

/** Writes every `step`-th CMU entry as a lexicon CSV (word, pron, note) to `path`. */
export function writeCmuSlice(root: string, step: number, path: string): void {
  const table = loadArpabetTable(join(root, "lexicons", "en-us", "arpabet.csv")).table!;
  const dict = dictionary as Readonly<Record<string, string>>;
  const kept = Object.fromEntries(Object.entries(dict).filter((_, i) => i % step === 0));
  const imported = importArpabetDictionary(kept, table, { file: "cmu-pronouncing-dictionary" });
  writeFileSync(path, [csvLine(["word", "pron", "note"]), ...imported.rows.map((r) => csvLine([r.word, r.pron, r.note ?? ""]))].join(""));
}

/** Every file of an output folder; run records left out and summaries without their timings and absolute paths. */
export function folderBytes(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of readdirSync(dir).sort()) {
    if (name.startsWith(".")) continue;
    const text = readFileSync(join(dir, name), "utf8");
    if (name === "run.json") continue; // timings and the machine, by design (compared nowhere)
    if (name === "summary.json") {
      const { seconds: _s, files: _f, lexicon: _l, ...rest } = JSON.parse(text) as Record<string, unknown>;
      out[name] = JSON.stringify(rest);
    } else out[name] = text;
  }
  return out;
}
