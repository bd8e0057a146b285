// The shipped demo (lexicons/demo): the manifest loads, every lexicon row reads, and every entry
// runs through both varieties with no diagnostics, no syllabification lints and writable output.

import { describe, expect, test } from "vitest";
import { loadManifest } from "../../src/lexicon/manifest.js";
import { readLexicon, type LexiconRow, type RejectedRow } from "../../src/lexicon/read.js";
import { WORD_EDGE, type Sym } from "../../src/interp/index.js";
import { applyGrammar } from "../../src/interp/index.js";
import { DEMO, EN_US, derive, grammarAt, ipaOf, variety, type Variety } from "./harness.js";
import { CANADIAN } from "./variety-build.js";

async function readDemo(): Promise<{ rows: LexiconRow[]; rejects: RejectedRow[]; diagnostics: readonly unknown[] }> {
  const reader = readLexicon(DEMO + "lexicon.csv", { inventory: variety("grammar.strata").inventory });
  const rows: LexiconRow[] = [];
  const rejects: RejectedRow[] = [];
  for await (const item of reader) {
    if (item.kind === "row") rows.push(item);
    else rejects.push(item);
  }
  return { rows, rejects, diagnostics: reader.diagnostics };
}

describe("the demo manifest", () => {
  test("names the lexicon and the three varieties with their grammars", () => {
    const { manifest, diagnostics } = loadManifest(DEMO);
    expect(diagnostics).toEqual([]);
    expect(manifest?.lexicon).toBe(DEMO + "lexicon.csv");
    expect(manifest?.varieties.map((v) => [v.name, v.lang, v.grammar])).toEqual([
      ["general", "en-US", EN_US + "grammar.strata"],
      ["careful", "en-US", EN_US + "careful.strata"],
      ["regional", "en-CA", CANADIAN],
    ]);
  });
});

describe("the demo lexicon", () => {
  test("every row reads, with no rejects and no file-level diagnostics", async () => {
    const { rows, rejects, diagnostics } = await readDemo();
    expect(rejects).toEqual([]);
    expect(diagnostics).toEqual([]);
    expect(rows.length).toBeGreaterThanOrEqual(300);
    // ids are unique
    expect(new Set(rows.map((r) => r.id)).size).toBe(rows.length);
  });

  test("has phrases, words with two pronunciations and entries left to default stress", async () => {
    const { rows } = await readDemo();
    expect(rows.filter((r) => r.pron.includes("#")).length).toBeGreaterThanOrEqual(5);
    const perWord = new Map<string, number>();
    for (const r of rows) perWord.set(r.word, (perWord.get(r.word) ?? 0) + 1);
    expect([...perWord.values()].filter((n) => n === 2).length).toBeGreaterThanOrEqual(5);
    expect(rows.filter((r) => !r.stressMarked).map((r) => r.word).sort()).toEqual(["Caddow", "Dovrenny", "Keswin", "Odalie", "Tallowmere", "Wendaby"]);
  });

  const VARIETIES: [string, () => Variety][] = [
    ["grammar.strata", () => variety("grammar.strata")],
    ["careful.strata", () => variety("careful.strata")],
    ["the regional (Canadian) grammar", () => grammarAt(CANADIAN)],
  ];
  for (const [file, load] of VARIETIES) {
    test(`every entry runs through ${file}: no diagnostics, no lints, no cap, every segment writable`, async () => {
      const v = load();
      const { rows } = await readDemo();
      const problems: string[] = [];
      for (const r of rows) {
        const word: Sym[] = [WORD_EDGE, ...r.symbols, WORD_EDGE];
        const run = applyGrammar(v.prepared, v.inventory, word);
        for (const d of run.diagnostics) problems.push(`${r.word}: ${d.message}`);
        for (const l of run.lints) problems.push(`${r.word}: ${l.code} ${l.message}`);
        if (run.capped) problems.push(`${r.word}: variants capped`);
        for (const o of run.outputs) if (ipaOf(v, o).includes("?")) problems.push(`${r.word}: unwritable segment in ${ipaOf(v, o)}`);
        // every word of every output has exactly one primary stress (default stress included)
        const words = ipaOf(v, run.preferred).split(" ");
        for (const w of words) if (r.stressMarked === false && [...w].filter((c) => c === "ˈ").length !== 1) problems.push(`${r.word}: ${w} has no single primary stress`);
      }
      expect(problems).toEqual([]);
    });
  }

  test("every step of each variety has work to do in the demo lexicon", async () => {
    const { rows } = await readDemo();
    for (const [file, load] of VARIETIES) {
      const v = load();
      const used = new Set<string>();
      for (const r of rows) {
        const run = applyGrammar(v.prepared, v.inventory, [WORD_EDGE, ...r.symbols, WORD_EDGE]);
        for (const t of run.trace) if (t.changed) used.add(t.step);
      }
      expect([...used].sort(), file).toEqual(v.grammar.steps.map((s) => s.name).sort());
    }
  });

  test("the scenario's showcase entries, read from the lexicon", async () => {
    const { rows } = await readDemo();
    const general = variety("grammar.strata");
    const careful = variety("careful.strata");
    const pron = (word: string): string => {
      const row = rows.find((r) => r.word === word);
      if (row === undefined) throw new Error(`${word} is not in the demo lexicon`);
      return row.pron;
    };
    // Ladefoged & Johnson, ch. 3 (from memory): glottal stop before syllabic n in casual speech, t in careful
    expect(derive(general, pron("Tasperton")).preferred).toBe("ˈtʰæ.spɚ.ʔn̩");
    expect(derive(careful, pron("Tasperton")).preferred).toBe("ˈtʰæ.spɚ.tn̩");
    // same source: dental t before θ in the phrase's first word; the space is the phrase's word break
    expect(derive(general, pron("Eighth Street")).preferred).toBe("ˈeɪt̪θ ˈstɹit");
    // Kahn 1976 (from memory): flap in "thirty", not in careful speech
    expect(derive(general, pron("thirty")).preferred).toBe("ˈθɝ.ɾi");
    expect(derive(careful, pron("thirty")).preferred).toBe("ˈθɝ.ti");
    // Chomsky & Halle 1968 (from memory): default stress on the antepenult when the penult is light
    expect(derive(general, pron("Dovrenny")).preferred).toBe("ˈdɑːv.ɹɛ.ni");
    // Kahn 1976 (from memory): the t of an s + t onset stays plain (the phrase "next stop")
    expect(derive(general, pron("next stop")).preferred).toBe("ˈnɛkst ˈstɑp");
  });
});
