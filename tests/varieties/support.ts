// Test support for the varieties room: lexicon folders of CMU words with several varieties, built
// in-process, and a plain all-pairs enumeration of mergers (the oracle the hashing is checked against).

import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { arpabetToIpa, cmuEntries } from "../lexicons/harness.js";
import { normalForm } from "../../src/varieties/homophones.js";
import type { VarietyEntry } from "../../src/varieties/load.js";

/** The first CMU pronunciation of each word named, as `word,pron` rows (lower case, as the dictionary has them). */
export function cmuRows(words: readonly string[], every = 0): string[] {
  const entries = cmuEntries();
  const byWord = new Map<string, string>();
  for (const [w, a] of entries) if (!byWord.has(w)) byWord.set(w, a);
  const named = words.map((w) => {
    const a = byWord.get(w);
    if (a === undefined) throw new Error(`not in the CMU dictionary: ${w}`);
    return `${w},${arpabetToIpa(a)}`;
  });
  const slice = every > 0 ? entries.filter((_, i) => i % every === 0 && !words.includes(entries[i]![0])).map(([w, a]) => `${w},${arpabetToIpa(a)}`) : [];
  return [...named, ...slice];
}

/** A lexicon folder under `root/lexicons/` (beside the copied grammars) with these rows and varieties (name → grammar file, relative to lexicons/ when it holds a slash, else in en-us/). */
export function lexiconFolder(root: string, name: string, rows: readonly string[], varieties: Readonly<Record<string, string>>): string {
  const dir = join(root, "lexicons", name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, "lexicon.csv"), ["word,pron", ...rows, ""].join("\n"));
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: Object.entries(varieties).map(([n, g]) => ({ name: n, lang: "en-US", grammar: g.includes("/") ? `../${g}` : `../en-us/${g}` })) }, null, 2));
  return dir;
}

/**
 * Every pair of entries (keys in both maps) with different normalised broad forms in `here` that
 * is homophonous in `here` and not in `there`: the definition of a merger, by enumeration.
 */
export function mergerPairsByEnumeration(here: ReadonlyMap<string, VarietyEntry>, there: ReadonlyMap<string, VarietyEntry>): Set<string> {
  const keys = [...here.keys()].filter((k) => there.has(k));
  const out = new Set<string>();
  for (let i = 0; i < keys.length; i++) for (let j = i + 1; j < keys.length; j++) {
    const x = keys[i]!, y = keys[j]!;
    const hx = here.get(x)!, hy = here.get(y)!;
    if (normalForm(hx.narrow) !== normalForm(hy.narrow) || normalForm(hx.broad) === normalForm(hy.broad)) continue;
    if (normalForm(there.get(x)!.narrow) === normalForm(there.get(y)!.narrow)) continue;
    out.add([x, y].sort().join("|"));
  }
  return out;
}
