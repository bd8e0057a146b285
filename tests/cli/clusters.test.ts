// `strata clusters` on small invented lexicons: which clusters are counted and how often, the order,
// --min-count, the comparison with a grammar's declared lists, and that the printed lines load back.

import { copyFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { runClusters } from "../../src/cli/clusters.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { ClusterCounter, grammarLine } from "../../src/lexicon/clusters.js";
import { readLexicon } from "../../src/lexicon/read.js";

const ROOT = resolve(__dirname, "../..");
const EN_US = join(ROOT, "lexicons", "en-us");

/** A grammar folder over the en-us inventory; `decl` holds its onsets/codas lines. */
function grammarDir(decl: string[]): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-clusters-g-"));
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(join(dir, "grammar.strata"), ['inventory "segments.csv"', ...decl, "syllabify", ""].join("\n"));
  return dir;
}

function lexicon(text: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-clusters-l-"));
  const p = join(dir, "lexicon.csv");
  writeFileSync(p, text);
  return p;
}

// Invented words. Word-initial clusters: pl ×3 (plenta, plaust, plik), st, t, ʃɹ; word-final:
// st ×2 (plaust, est), mp, k, b. "psst" has no nucleus and is skipped; "ti plik" is a phrase of two words.
const WORDS = [
  "word,pron",
  "plenta,ˈplɛntə",
  "stimp,ˈstɪmp",
  "plaust,ˈplaʊst",
  "est,ˈɛst",
  "ti plik,ˈtɪ # ˈplɪk",
  "shrub,ˈʃɹʌb",
  "psst,psst",
  "bad@,ˈbæd@",
  "",
].join("\n");

const lineOf = (out: string, name: string): string => {
  const lines = out.split("\n");
  const i = lines.findIndex((l) => l.startsWith(`${name} = `));
  let s = lines[i]!;
  for (let k = i + 1; k < lines.length && lines[k]!.startsWith(" "); k++) s += " " + lines[k]!.trim();
  return s;
};

describe("strata clusters", () => {
  const g = grammarDir(["onsets = p t k s l pl st", "codas = p t k s st mp"]);
  const file = lexicon(WORDS);

  it("counts word-initial and word-final clusters, most frequent first, then by IPA", async () => {
    const o = await runClusters(file, { grammar: g });
    expect(o.exitCode).toBe(3); // one row rejected (exit-code table: 3)
    expect(lineOf(o.stdout, "onsets")).toBe("onsets = pl st t ʃɹ");
    expect(lineOf(o.stdout, "codas")).toBe("codas = st b k mp");
    // The comment block gives the counts and marks clusters the grammar does not declare.
    expect(o.stdout).toContain("--  pl 3   st 1   t 1   ʃɹ* 1\n");
    expect(o.stdout).toContain("--  st 2   b* 1   k 1   mp 1\n");
    expect(o.stdout).toContain("(8 words of 7 rows; 1 without a nucleus skipped)");
    expect(o.stderr).toBe("clusters: 8 rows read, 1 rejected (see 'strata lint'); 4 onsets, 4 codas\n");
  });

  it("--min-count leaves out rare clusters and says how many", async () => {
    const o = await runClusters(file, { grammar: g, minCount: 2 });
    expect(lineOf(o.stdout, "onsets")).toBe("onsets = pl");
    expect(lineOf(o.stdout, "codas")).toBe("codas = st");
    expect(o.stdout).toContain("clusters seen fewer than 2 times are left out");
    expect(o.stderr).toContain("1 onset, 1 coda, 6 rarer than 2 left out");
  });

  it("prints lines that load back as the grammar's onsets and codas, segment for segment", async () => {
    const o = await runClusters(file, { grammar: g });
    const dir = grammarDir([lineOf(o.stdout, "onsets"), lineOf(o.stdout, "codas")]);
    // The whole output pasted (comments included) must load too.
    writeFileSync(join(dir, "pasted.strata"), `inventory "segments.csv"\n${o.stdout}syllabify\n`);
    for (const f of ["grammar.strata", "pasted.strata"]) {
      const r = loadGrammar(join(dir, f));
      expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
      expect(r.grammar!.onsets!.map((c) => c.segments.join(" "))).toEqual(["p l", "s t", "t", "ʃ ɹ"]);
      expect(r.grammar!.codas!.map((c) => c.segments.join(" "))).toEqual(["s t", "b", "k", "m p"]);
    }
  });

  it("a cluster whose joined IPA reads as another segment (t + ʃ vs the affricate tʃ) is listed but left out of the line", async () => {
    // "kutsh" ends in t followed by ʃ (written apart); "kutch" in the affricate tʃ.
    const o = await runClusters(lexicon("word,pron\nkutsh,ˈkʌt ʃ\nkutch,ˈkʌtʃ\n"), { grammar: g });
    expect(o.stdout).toContain("--  t+ʃ* 1   tʃ* 1\n");
    expect(o.stdout).toContain("left out of the lines below: these read back as other segments when written together: t + ʃ\n");
    expect(lineOf(o.stdout, "codas")).toBe("codas = tʃ");
  });

  it("without -g uses the shipped en-us inventory and compares with its declared lists", async () => {
    const o = await runClusters(file, { allowRejects: true });
    expect(o.exitCode).toBe(0);
    expect(o.stdout).toContain("'*' marks a cluster that grammar.strata does not declare yet.");
    // en-us declares ʃɹ as an onset and b as a coda.
    expect(o.stdout).toContain("--  pl 3   st 1   t 1   ʃɹ 1\n");
    expect(o.stdout).toContain("--  st 2   b 1   k 1   mp 1\n");
  });

  it("without declared lists there is nothing to compare, and no '*'", async () => {
    const o = await runClusters(file, { grammar: grammarDir([]) });
    expect(o.stdout).not.toContain("*");
    expect(lineOf(o.stdout, "onsets")).toBe("onsets = pl st t ʃɹ");
  });

  it("reads standard input for '-', and exits 1 on an unreadable lexicon", async () => {
    const o = await runClusters("-", { grammar: g, input: Readable.from(["word,pron\nstimp,ˈstɪmp\n"]) });
    expect(lineOf(o.stdout, "onsets")).toBe("onsets = st");
    expect(o.stdout).toContain("from <stdin>");
    const bad = await runClusters(join(tmpdir(), "strata-no-such-lexicon.csv"), { grammar: g });
    expect(bad.exitCode).toBe(1);
    expect(bad.stderr).toContain("[cli/no-such-file]");
  });
});

describe("ClusterCounter and grammarLine", () => {
  it("counts a phrase's words separately and ignores syllable dots", async () => {
    const r = loadGrammar(join(EN_US, "grammar.strata"));
    const inv = r.inventory!;
    const counter = new ClusterCounter(inv);
    for await (const item of readLexicon(Readable.from(["word,pron\nx,ˈspɹɪŋ.təd # ˈstɹɛŋkθs\n"]), { inventory: inv })) {
      if (item.kind === "row") counter.add(item.symbols);
    }
    const d = counter.result();
    expect(d.onsets.map((c) => [c.text, c.count])).toEqual([["spɹ", 1], ["stɹ", 1]]);
    expect(d.codas.map((c) => [c.text, c.count])).toEqual([["d", 1], ["ŋkθs", 1]]);
    expect(d.words).toBe(2);
    expect(d.onsets[0]!.declared).toBeUndefined();
  });

  it("wraps long lines under the first cluster", () => {
    const cs = Array.from({ length: 30 }, (_, i) => "p".repeat(1 + (i % 3)));
    const text = grammarLine("codas", cs, 40);
    const lines = text.trimEnd().split("\n");
    expect(lines.length).toBeGreaterThan(1);
    for (const l of lines) expect(l.length).toBeLessThanOrEqual(40);
    for (const l of lines.slice(1)) expect(l.startsWith("        ") && l[8] !== " ").toBe(true);
    expect(lines.join(" ").replace(/^codas = /u, "").split(/\s+/u)).toEqual(cs);
  });
});
