// The ARPAbet import's join overrides (--joins, lexicons/en-us/joins.csv) on real words of the CMU
// Pronouncing Dictionary (cmudict via the cmu-pronouncing-dictionary package): the overrides add
// joins and nothing else, and with the joins the en-us grammar syllabifies, aspirates, devoices and
// lengthens these words as a phonetician expects, where without them it does not.

import { readFileSync } from "node:fs";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadGrammar } from "../../src/grammar/index.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { applyJoinOverrides, readJoinOverrides, withoutJoins } from "../../src/lexicon/arpabet-joins.js";
import { readLexicon, type LexiconRow } from "../../src/lexicon/read.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { transcribeRow } from "../../src/lexicon/runner.js";
import { importedCsv } from "../../src/cli/import.js";

const EN_US = fileURLToPath(new URL("../../lexicons/en-us/", import.meta.url));
const JOINS = `${EN_US}joins.csv`;
const g = loadGrammar(EN_US);
if (g.grammar === undefined || g.inventory === undefined) throw new Error(g.diagnostics.map((d) => d.message).join("\n"));
const table = loadArpabetTable().table!;

const WORDS = ["network", "handrail", "bedroom", "whatever", "sixteen", "misplace", "mistake", "nonstop", "footnote"];
const cmu = Object.fromEntries(WORDS.map((w) => [w, (dictionary as Record<string, string>)[w]!]));
const overrides = readJoinOverrides(readFileSync(JOINS, "utf8"), JOINS);
const plain = importArpabetDictionary(cmu, table, { file: "cmu" });
const joined = applyJoinOverrides(plain.rows, overrides.overrides, JOINS);

async function rowsOf(rows: typeof plain.rows): Promise<Map<string, LexiconRow>> {
  const text = [...importedCsv(rows)].join("");
  const out = new Map<string, LexiconRow>();
  for await (const x of readLexicon(Readable.from([Buffer.from(text)]), { inventory: g.inventory!, file: "cmu.csv" })) {
    if (x.kind !== "row") throw new Error(`${x.code}: ${x.reason}`);
    out.set(x.word, x);
  }
  return out;
}

describe("the shipped join overrides", () => {
  it("read without problems, and only add joins to the CMU pronunciations they replace", () => {
    expect(overrides.diagnostics).toEqual([]);
    expect(joined.applied).toBe(WORDS.length - 1); // every word but "mistake"
    joined.rows.forEach((r, i) => expect(withoutJoins(r.pron)).toBe(withoutJoins(plain.rows[i]!.pron)));
  });

  it("report an override that would change more than joins, at its line", () => {
    const bad = readJoinOverrides("word,pron\nnetwork,n ˈɛ d # w ˌɝ k\n", "bad.csv");
    const r = applyJoinOverrides(plain.rows, bad.overrides, "bad.csv");
    expect(r.applied).toBe(0);
    expect(r.diagnostics).toMatchObject([{ severity: "warning", code: "import/joins-unmatched", line: 2, column: 9 }]);
  });
});

describe("CMU words with and without their joins, through the en-us grammar", () => {
  const interp = new InterpreterEngine(g.grammar!, g.inventory!);
  const narrow = async (rows: typeof plain.rows): Promise<Map<string, string>> => {
    const out = new Map<string, string>();
    for (const [w, row] of await rowsOf(rows)) {
      const e = transcribeRow(interp, row, w);
      if (e.kind !== "entry") throw new Error(`${w} rejected`);
      out.set(w, e.narrow);
    }
    return out;
  };

  it("fixes syllabification, aspiration, devoicing and length at the join", async () => {
    const before = await narrow(plain.rows);
    const after = await narrow(joined.rows);
    // Aspiration only syllable-initially, and a compound's or prefix's join blocks the onset from
    // reaching back (Kahn 1976, from memory): network's t is a coda, not an aspirated onset, and
    // w after it is not devoiced (devoicing after an aspirated stop: Ladefoged 2006, from memory).
    expect(before.get("network")).toContain("tʰw̥");
    expect(after.get("network")).toMatch(/^ˈnɛ[tʔ]ˌwɝk$/); // t a coda (casual speech may glottalise it), w voiced
    // sixteen: t starts the second part, so it is aspirated (after s in one onset it is not, as in
    // "mistake"; Kahn 1976, from memory).
    expect(before.get("sixteen")).not.toContain("tʰ");
    expect(after.get("sixteen")).toContain("sˈtʰ");
    // misplace vs mistake: the prefix keeps its s (joins = closed-before-consonant), so p is
    // aspirated and l devoiced after it; mistake has no join and keeps the unaspirated st onset.
    expect(after.get("misplace")).toContain("pʰl̥");
    expect(before.get("misplace")).not.toContain("pʰ");
    expect(after.get("mistake")).toBe(before.get("mistake"));
    expect(after.get("mistake")).not.toContain("tʰ");
    // handrail, bedroom: d closes the first part (no dɹ onset): the vowel before it is lengthened
    // before a voiced obstruent in the same syllable (Peterson & Lehiste 1960, from memory).
    expect(before.get("handrail")).toContain("ˌdɹ");
    expect(after.get("handrail")).toMatch(/ːnd.?ˌɹ|nd.?ˌɹ/);
    expect(after.get("bedroom")).toContain("ɛːd");
    // whatever: t ends "what", so it is not an aspirated onset of the stressed syllable.
    expect(before.get("whatever")).toContain("tʰ");
    expect(after.get("whatever")).not.toContain("tʰ");
    // nonstop: s t stays one onset after the prefix (unaspirated t), and n is a coda.
    expect(after.get("nonstop")).not.toContain("tʰ");
  });

  it("the compiled machines give the interpreter's forms for every entry, joins included", async () => {
    const m = machineEngine(g.grammar!, g.inventory!, { cacheDir: fileURLToPath(new URL("../../build/cache/", import.meta.url)) });
    expect(m.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    for (const [w, row] of await rowsOf(joined.rows)) {
      const a = transcribeRow(m.engine!, row, w);
      const b = transcribeRow(interp, row, w);
      expect(a, w).toEqual(b);
    }
  });
});
