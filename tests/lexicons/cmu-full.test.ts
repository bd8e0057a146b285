// The whole CMU Pronouncing Dictionary (npm `cmu-pronouncing-dictionary` 3.0.0, ISC; 135,155 entries)
// imported through the ARPAbet import and the lexicon reader, then run through the compiled en-us grammar.

import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { dictionary } from "cmu-pronouncing-dictionary";
import { beforeAll, describe, expect, test } from "vitest";
import { importedCsv } from "../../src/cli/import.js";
import { formatDiagnostic } from "../../src/diagnostics.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { lintContext, lintRow, type LintFinding } from "../../src/lexicon/lint.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { EN_US } from "./harness.js";

/** What one entry came out as (first pronunciation of a word only, for the spot checks). */
interface Out {
  readonly narrow: string;
  readonly broad: string;
}

const count = (s: string, ch: string): number => s.split(ch).length - 1;

interface Run {
  entries: number;
  importRejects: string[];
  readerRejects: string[];
  readerDiagnostics: string[];
  /** Entries the compiled machine could not transcribe (symbol outside the alphabet, or no path). */
  unrun: string[];
  empty: string[];
  /** Marked entries whose ˈ/ˌ count changed between input and narrow or broad output. */
  stressChanged: string[];
  /** Unmarked entries with a nucleus that did not get exactly one primary stress from the stress step. */
  unmarkedWrong: string[];
  unmarked: number;
  lintErrors: LintFinding[];
  lintWarnings: number;
  first: Map<string, Out>;
  seconds: { import: number; compile: number; run: number };
}

let run: Run;

beforeAll(async () => {
  const t0 = performance.now();
  const table = loadArpabetTable(EN_US + "arpabet.csv");
  if (table.table === undefined) throw new Error(table.diagnostics.map(formatDiagnostic).join("\n"));
  const imported = importArpabetDictionary(dictionary, table.table, { file: "cmu-pronouncing-dictionary" });
  const g = loadGrammar(EN_US + "grammar.strata");
  if (g.grammar === undefined || g.inventory === undefined) throw new Error(g.diagnostics.map(formatDiagnostic).join("\n"));
  const t1 = performance.now();
  const m = machineEngine(g.grammar, g.inventory, { blame: false, cacheDir: join(tmpdir(), "strata-test-cache", "cmu-full") });
  if (m.engine === undefined) throw new Error(m.diagnostics.map(formatDiagnostic).join("\n"));
  const engine = m.engine;
  const ctx = lintContext(g.grammar, g.inventory);
  const t2 = performance.now();

  const r: Run = {
    entries: 0, importRejects: imported.rejects.map((x) => `${x.line}: ${x.code} ${x.reason} (${x.raw})`),
    readerRejects: [], readerDiagnostics: [], unrun: [], empty: [], stressChanged: [], unmarkedWrong: [], unmarked: 0,
    lintErrors: [], lintWarnings: 0, first: new Map(), seconds: { import: 0, compile: 0, run: 0 },
  };
  // The CSV the import writes, read back by the lexicon reader in chunks of 1,000 lines.
  const lines = [...importedCsv(imported.rows)];
  const chunks: string[] = [];
  for (let i = 0; i < lines.length; i += 1000) chunks.push(lines.slice(i, i + 1000).join(""));
  const reader = readLexicon(Readable.from(chunks), { inventory: g.inventory, file: "cmu.csv" });
  for await (const item of reader) {
    if (item.kind === "reject") {
      r.readerRejects.push(`${item.line}:${item.column}: ${item.code} ${item.reason} (${item.raw})`);
      continue;
    }
    r.entries++;
    const t = engine.transcribeWord(item.symbols);
    const label = `${item.word} /${item.pron}/`;
    if (t === undefined) {
      r.unrun.push(label);
      continue;
    }
    if (t.narrow === "" || t.broad === "") r.empty.push(label);
    if (!r.first.has(item.word)) r.first.set(item.word, { narrow: t.narrow, broad: t.broad });
    if (item.stressMarked) {
      for (const mark of ["ˈ", "ˌ"]) {
        const want = count(item.pron, mark);
        if (count(t.narrow, mark) !== want || count(t.broad, mark) !== want) r.stressChanged.push(`${label} → ${t.broad} → ${t.narrow}`);
      }
    } else {
      r.unmarked++;
      const hasNucleus = lintRow(item, ctx).every((f) => f.code !== "lint/no-nucleus");
      if (hasNucleus && (count(t.narrow, "ˈ") !== 1 || count(t.broad, "ˈ") !== 1)) r.unmarkedWrong.push(`${label} → ${t.narrow}`);
    }
    for (const f of lintRow(item, ctx)) {
      if (f.severity === "error") r.lintErrors.push(f);
      else r.lintWarnings++;
    }
  }
  r.readerDiagnostics = reader.diagnostics.map(formatDiagnostic);
  const t3 = performance.now();
  r.seconds = { import: (t1 - t0) / 1000, compile: (t2 - t1) / 1000, run: (t3 - t2) / 1000 };
  // Measured on a loaded 2-core machine: import 1 s, compile 4.5 s cold (cached after), run 24-40 s.
  console.info(`cmu-full: ${r.entries} entries; import ${r.seconds.import.toFixed(1)} s, compile ${r.seconds.compile.toFixed(1)} s, read + run + lint ${r.seconds.run.toFixed(1)} s`);
  run = r;
}, 600_000);

describe("the whole CMU Pronouncing Dictionary through en-us (compiled)", () => {
  test("every entry is imported and read: zero rejects", () => {
    expect(run.importRejects).toEqual([]);
    expect(run.readerRejects).toEqual([]);
    expect(run.readerDiagnostics).toEqual([]);
    // cmu-pronouncing-dictionary 3.0.0 holds 135,155 entries (its own key count).
    expect(run.entries).toBe(Object.keys(dictionary).length);
    expect(run.entries).toBe(135_155);
  });

  test("the compiled machine transcribes every entry, and no output is empty", () => {
    expect(run.unrun).toEqual([]);
    expect(run.empty).toEqual([]);
  });

  test("stress marks survive: as many ˈ and ˌ in the broad and narrow forms as the entry has", () => {
    expect(run.stressChanged).toEqual([]);
  });

  test("entries without marks get exactly one primary stress from the grammar's stress step", () => {
    console.info(`cmu-full: ${run.unmarked} entries without stress marks`);
    // The CMU entries without any stress digit 1 or 2 (only 0s, or no vowel at all).
    expect(run.unmarked).toBeGreaterThan(0);
    // Weak forms all-unstressed in the dictionary ("than(2)" DH AH0 N, "will(2)" W AH0 L) get the
    // primary on their schwa from default stress; syllabic-n / syllabic-l and schwa-deletion only
    // take an unstressed schwa (WeakSchwa in common.strata), so that stressed vowel stays.
    expect(run.unmarkedWrong).toEqual([]);
  });

  test("lint errors on the dictionary are exactly the explained kinds", () => {
    const byCode = new Map<string, string[]>();
    for (const f of run.lintErrors) byCode.set(f.code, [...(byCode.get(f.code) ?? []), f.word ?? ""]);
    expect([...byCode.keys()].sort()).toEqual(["lint/many-primary", "lint/no-nucleus"]);
    // Interjections and abbreviations written without a vowel in the CMU dictionary (checked by
    // reading their ARPAbet: HH M, SH, F S, TH S, …); they run through the grammar unsyllabified.
    expect([...new Set(byCode.get("lint/no-nucleus"))].sort()).toEqual(["fs", "hm", "hmm", "hmmm", "mm", "sh", "shh", "ths"]);
    // The CMU dictionary gives spelled-out letters and many compounds a primary stress on each part
    // ("ab" EY1 B IY1; "abbotstown" AE1 B AH0 T S T AW1 N). Lint reports them; the grammar keeps both marks.
    const many = byCode.get("lint/many-primary") ?? [];
    for (const w of ["ab", "abbotstown"]) expect(many).toContain(w);
    // One finding per dictionary entry with more than one stress digit 1, counted from the ARPAbet itself.
    const twoOnes = Object.values(dictionary as Record<string, string>).filter((p) => (p.split("#")[0]!.match(/1/g) ?? []).length > 1).length;
    expect(many.length).toBe(twoOnes);
  });
});

describe("textbook allophones on real CMU words (narrow form has them, broad form does not)", () => {
  const get = (w: string): Out => {
    const o = run.first.get(w);
    if (o === undefined) throw new Error(`'${w}' is not in the CMU dictionary`);
    return o;
  };

  test("aspiration of a voiceless stop starting a stressed syllable, none after s", () => {
    // From memory: Kahn 1976; Ladefoged & Johnson 2011, ch. 3: "pin" [pʰ] vs "spin" [p].
    // Unicode IPA: U+02B0 MODIFIER LETTER SMALL H marks aspiration (IPA Handbook 1999).
    for (const w of ["pin", "top", "kit"]) {
      expect(get(w).narrow).toMatch(/^ˈ[ptk]ʰ/u);
      expect(get(w).broad).not.toContain("ʰ");
    }
    for (const w of ["spin", "stop", "skit"]) expect(get(w).narrow).not.toContain("ʰ");
  });

  test("flap for t and d between a vowel and an unstressed vowel", () => {
    // From memory: Kahn 1976; Ladefoged & Johnson 2011, ch. 3: "water", "city", "ladder" with [ɾ].
    for (const [w, stop] of [["water", "t"], ["city", "t"], ["butter", "t"], ["ladder", "d"], ["rider", "d"]] as const) {
      expect(get(w).narrow).toContain("ɾ");
      expect(get(w).broad).toContain(stop);
      expect(get(w).broad).not.toContain("ɾ");
    }
  });

  test("dark l in the coda, clear l in the onset", () => {
    // From memory: Giegerich 1992, ch. 9; Ladefoged & Johnson 2011, ch. 3: "feel" [ɫ], "leaf" [l].
    for (const w of ["feel", "pool", "full"]) {
      expect(get(w).narrow).toMatch(/ɫ$/u);
      expect(get(w).broad).toMatch(/l$/u);
    }
    for (const w of ["leaf", "lake"]) expect(get(w).narrow).toMatch(/^ˈl/u);
  });

  test("a vowel before a nasal consonant of its syllable is nasalised", () => {
    // From memory: Ladefoged & Johnson 2011, ch. 4: "man" [mæ̃n]. U+0303 COMBINING TILDE marks nasalisation.
    for (const w of ["man", "ten", "clean"]) {
      // NFD: the writer gives precomposed letters where Unicode has them ("ĩ" U+0129).
      expect(get(w).narrow.normalize("NFD")).toMatch(/\u0303n/u);
      expect(get(w).broad.normalize("NFD")).not.toContain("\u0303");
    }
  });

  test("l, ɹ and w are devoiced after an aspirated stop", () => {
    // From memory: Ladefoged & Johnson 2011, ch. 3: "play", "pray", "twin" with voiceless approximants.
    // U+0325 COMBINING RING BELOW marks voicelessness (IPA Handbook 1999).
    expect(get("play").narrow).toContain("pʰl\u0325");
    expect(get("pray").narrow).toContain("pʰɹ\u0325");
    expect(get("cry").narrow).toContain("kʰɹ\u0325");
    expect(get("twin").narrow).toContain("tʰw\u0325");
    expect(get("play").broad).not.toContain("\u0325");
  });

  test("a stressed vowel is longer before a voiced obstruent", () => {
    // From memory: Peterson & Lehiste 1960: "bead" longer than "beat". U+02D0 MODIFIER LETTER TRIANGULAR COLON.
    expect(get("bead").narrow).toContain("iːd");
    expect(get("beat").narrow).not.toContain("ː");
    expect(get("sid").narrow).toContain("ɪːd");
  });

  test("glottal stop and syllabic nasal in 'button'; syllabic dark l in 'bottle'", () => {
    // From memory: Ladefoged & Johnson 2011, ch. 3 (glottal stop before syllabic n in "button");
    // syllabic l̩ in "bottle": common practice, no source. U+0329 COMBINING VERTICAL LINE BELOW.
    expect(get("button").narrow).toContain("ʔn\u0329");
    expect(get("bottle").narrow).toContain("ɫ\u0329");
  });

  test("n is dental before θ", () => {
    // Common practice, no source: place assimilation of n to a following dental ("tenth").
    // U+032A COMBINING BRIDGE BELOW marks a dental.
    expect(get("tenth").narrow).toContain("n\u032Aθ");
    expect(get("tenth").broad).toContain("nθ");
  });
});
