// Marks on diphthongs (issue 10, section 5): the writer puts a diphthong's diacritics after its
// first letter (common practice, no source; inventory/diphthong.ts), the tokeniser and the fast
// reader read them back from there (and from after the whole symbol, and across tie bars), and
// tie bars are written on request. Real words from the CMU Pronouncing Dictionary (npm
// cmu-pronouncing-dictionary 3.0.0) through lexicons/en-us/grammar.strata.

import { join, resolve } from "node:path";
import { tmpdir } from "node:os";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { loadGrammar } from "../../src/grammar/index.js";
import { realise, tokenise } from "../../src/inventory/index.js";
import type { Bundle, FeatureValue } from "../../src/inventory/types.js";
import { withTieBars } from "../../src/inventory/diphthong.js";
import { applyStress } from "../../src/lexicon/stress.js";
import { pronReader } from "../../src/lexicon/pron.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { readLexicon } from "../../src/lexicon/read.js";
import { csvLine } from "../../src/emit/csv.js";
import { NARROW_ONLY } from "../../src/lexicon/engine.js";

const ROOT = resolve(__dirname, "../..");
const loaded = loadGrammar(join(ROOT, "lexicons", "en-us", "grammar.strata"));
const grammar = loaded.grammar!;
const inv = loaded.inventory!;
const f = (name: string): number => inv.featureIndex.get(name)!;
const seg = (sym: string): Bundle => inv.segments.find((s) => s.symbol === sym)!.bundle;
const set = (b: Bundle, values: Record<string, FeatureValue>): Bundle => {
  const c = b.slice();
  for (const [k, v] of Object.entries(values)) c[f(k)] = v;
  return c;
};
const one = (ipa: string): Bundle => {
  const t = tokenise(inv, ipa);
  if (!t.ok) throw new Error(t.error.message);
  const segs = t.tokens.filter((x) => x.kind === "segment");
  expect(segs, ipa).toHaveLength(1);
  return (segs[0] as { bundle: Bundle }).bundle;
};

describe("the writer", () => {
  it("puts a diphthong's nasalisation and length after its first letter, an affricate's marks after the whole symbol", () => {
    const write = (b: Bundle): string => {
      const r = realise(inv, b);
      if (!r.ok) throw new Error(r.error);
      return r.text;
    };
    expect(write(set(seg("aɪ"), { nasal: "+" }))).toBe("ãɪ");
    expect(write(set(seg("aɪ"), { long: "+" }))).toBe("aːɪ");
    expect(write(set(seg("aɪ"), { nasal: "+", long: "+" }))).toBe("ãːɪ");
    expect(write(set(seg("oʊ"), { nasal: "+" }))).toBe("õʊ");
    expect(write(set(seg("ɔɪ"), { nasal: "+" }))).toBe("ɔ̃ɪ");
    expect(write(set(seg("eɪ"), { nasal: "+", long: "+" }))).toBe("ẽːɪ");
    expect(write(set(seg("tʃ"), { spread_glottis: "+" }))).toBe("tʃʰ");
    // monophthongs as before
    expect(write(set(seg("æ"), { nasal: "+", long: "+" }))).toBe("æ̃ː");
  });

  it("writes tie bars between the letters of one segment only, after a first letter's marks", () => {
    expect(withTieBars("tʃ")).toBe("t\u0361ʃ");
    expect(withTieBars("tʃʰ")).toBe("t\u0361ʃʰ");
    expect(withTieBars("aɪ")).toBe("a\u0361ɪ");
    expect(withTieBars("ãɪ")).toBe("ã\u0361ɪ");
    expect(withTieBars("aːɪ")).toBe("aː\u0361ɪ");
    expect(withTieBars("tʰ")).toBe("tʰ");
    expect(withTieBars("ɫ̩")).toBe("ɫ̩");
    expect(withTieBars("æ̃ː")).toBe("æ̃ː");
  });
});

describe("the tokeniser and the fast reader", () => {
  const nasalLong = set(seg("aɪ"), { nasal: "+", long: "+" });
  it("read marks after a diphthong's first letter, after the whole symbol, and across tie bars, as one segment", () => {
    for (const ipa of ["ãːɪ", "aɪ̃ː", "ã͡ːɪ", "ãː͡ɪ", "a\u0303\u02D0ɪ", "a\u0361ɪ\u0303ː"]) expect(one(ipa), ipa).toEqual(nasalLong);
    expect(one("a͡ɪ")).toEqual(seg("aɪ"));
    expect(one("t͡ʃ")).toEqual(seg("tʃ"));
    expect(one("d͜ʒ")).toEqual(seg("dʒ"));
    expect(one("t͡ʃʰ")).toEqual(set(seg("tʃ"), { spread_glottis: "+" }));
    // ɔ is a symbol of its own: nasal ɔ then ɪ would be written ɔ̃.ɪ or with a space; ɔ̃ɪ is the diphthong
    expect(one("ɔ̃ɪ")).toEqual(set(seg("ɔɪ"), { nasal: "+" }));
  });

  it("the fast reader gives the general path's symbols for these spellings", () => {
    for (const pron of ["ˈtaːɪm", "ˈtãɪm", "ˈt͡ʃeɪn", "ˈɔ̃ɪl", "ˈɔːl", "ˈbɔː.ɪŋ", "ˈtaɪm"]) {
      const t = tokenise(inv, pron);
      if (!t.ok) throw new Error(pron);
      const general = applyStress(inv, t.tokens);
      const fast = pronReader(inv).read(pron);
      if (fast !== undefined && general.ok) expect(fast.symbols, pron).toEqual(general.symbols);
      expect(general.ok).toBe(true);
    }
  });
});

describe("on real CMU words", () => {
  it("no narrow form puts a mark on a diphthong's offglide, and every narrow form reads back with its diphthongs whole", async () => {
    const table = loadArpabetTable().table!;
    const dict = dictionary as Readonly<Record<string, string>>;
    // Every 15th entry with a diphthong (AY AW OY EY OW), and five words checked by name.
    const named = ["time", "ride", "mind", "town", "rain"];
    const kept = Object.fromEntries(Object.entries(dict).filter(([w, p], i) => named.includes(w) || (i % 15 === 0 && /\b(AY|AW|OY|EY|OW)[012]/.test(p))));
    const imported = importArpabetDictionary(kept, table, { file: "cmu" });
    const csv = [csvLine(["word", "pron"]), ...imported.rows.map((r) => csvLine([r.word, r.pron]))].join("");
    const engine = machineEngine(grammar, inv, { cacheDir: join(tmpdir(), "strata-test-cache"), blame: false }).engine!;
    const byWord = new Map<string, string>();
    let entries = 0;
    let marked = 0;
    const diphthong = f("diphthong");
    const diphthongs = (ipa: string): number => {
      const t = tokenise(inv, ipa);
      if (!t.ok) throw new Error(`${ipa}: ${t.error.message}`);
      return t.tokens.filter((x) => x.kind === "segment" && x.bundle[diphthong] === "+").length;
    };
    for await (const batch of readLexicon(Readable.from([csv]), { inventory: inv, file: "cmu.csv" }).batches()) {
      for (const x of batch) {
        if (x.kind !== "row") continue;
        const t = engine.transcribeWord(x.symbols, NARROW_ONLY)!;
        entries++;
        byWord.set(x.word, t.narrow);
        const nfd = t.narrow.normalize("NFD");
        // the offglide of aɪ aʊ ɔɪ eɪ oʊ followed by a combining mark or the length mark
        expect(nfd, x.word).not.toMatch(/(a[ɪʊ]|ɔɪ|eɪ|oʊ)[\u0300-\u036f\u02D0]/u);
        if (/[aeoɔ][\u0300-\u036f\u02D0]+[ɪʊ]/u.test(nfd)) marked++;
        expect(diphthongs(t.narrow), `${x.word} ${t.narrow}`).toBe(diphthongs(t.broad));
      }
    }
    expect(entries).toBeGreaterThan(1500);
    expect(marked).toBeGreaterThan(entries / 10);
    // CMU: time T AY1 M, ride R AY1 D, mind M AY1 N D, town T AW1 N, rain R EY1 N
    expect([...named].map((w) => byWord.get(w))).toEqual(["ˈtʰãɪm", "ˈɹaːɪd", "ˈmãːɪnd", "ˈtʰãʊn", "ˈɹẽɪn"]);
  }, 300_000);
});
