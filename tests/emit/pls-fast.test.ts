// The PLS lexeme writer against xmlbuilder2's own serialiser: for random entries (any XML 1.0
// characters, markup characters, several pronunciations) both give the same bytes.

import fc from "fast-check";
import { createCB } from "xmlbuilder2";
import { describe, expect, it } from "vitest";
import { findNonXmlChar, plsByteChunks, plsToString, PLS_NAMESPACE, type PlsEntry } from "../../src/emit/pls.js";

/** The whole document through xmlbuilder2's callback builder, one ele()/txt() per node. */
function viaXmlbuilder2(entries: readonly PlsEntry[], lang: string, prettyPrint: boolean): string {
  const parts: string[] = [];
  const xb = createCB({ data: (c: string) => parts.push(c), prettyPrint, wellFormed: true });
  // xmlbuilder2 leaves an '&' that already starts an entity as it is; escape it first.
  const t = (s: string) => s.normalize("NFC").replace(/&/g, "&amp;");
  xb.dec({ version: "1.0", encoding: "UTF-8" });
  xb.ele(PLS_NAMESPACE, "lexicon").att("version", "1.0").att("alphabet", "ipa").att("http://www.w3.org/XML/1998/namespace", "xml:lang", lang);
  for (const e of entries) {
    const ph = [...new Set(e.phonemes.map((p) => p.normalize("NFC")))];
    xb.ele("lexeme");
    xb.ele("grapheme").txt(t(e.word)).up();
    ph.forEach((p, i) => {
      xb.ele("phoneme");
      if (ph.length > 1 && i === 0) xb.att("prefer", "true");
      xb.txt(t(p)).up();
    });
    xb.up();
  }
  xb.up().end();
  const doc = parts.join("");
  return doc.endsWith("\n") ? doc : doc + "\n";
}

const text = fc
  .string({ unit: fc.oneof(fc.constantFrom("a", "ˈ", "æ", "&", "<", ">", "\"", "'", "&lt;", " ", "\u0303", "ʰ"), fc.string({ unit: "binary", minLength: 1, maxLength: 1 })), minLength: 1, maxLength: 12 })
  .filter((s) => s.trim() !== "" && findNonXmlChar(s) === undefined && !s.includes("\r") && s.normalize("NFC").trim() !== "");

describe("PLS lexemes written directly = xmlbuilder2's serialisation", () => {
  it.each([true, false])("on random entries (prettyPrint %s)", async (prettyPrint) => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.record({ word: text, phonemes: fc.array(text, { minLength: 1, maxLength: 3 }) }), { minLength: 1, maxLength: 6 }), async (entries) => {
        const ours = await plsToString(entries.map((e) => ({ ...e, preferred: 0 })), { lang: "en-US", prettyPrint });
        expect(ours).toBe(viaXmlbuilder2(entries, "en-US", prettyPrint));
      }),
      { numRuns: 200 },
    );
  });
});

/** The document `plsByteChunks` writes, decoded. */
async function viaBytes(entries: PlsEntry[], prettyPrint: boolean): Promise<string> {
  const chunks: Uint8Array[] = [];
  // Copies: a chunk's buffer may be filled again once handed on.
  for await (const c of plsByteChunks(entries, { lang: "en-US", prettyPrint })) chunks.push(Uint8Array.from(c));
  return Buffer.concat(chunks).toString("utf8");
}

describe("PLS lexemes written as bytes (what writePls writes)", () => {
  it.each([true, false])("= xmlbuilder2's serialisation on random entries (prettyPrint %s)", async (prettyPrint) => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.record({ word: text, phonemes: fc.array(text, { minLength: 1, maxLength: 3 }) }), { minLength: 1, maxLength: 6 }), async (entries) => {
        expect(await viaBytes(entries.map((e) => ({ ...e, preferred: 0 })), prettyPrint)).toBe(viaXmlbuilder2(entries, "en-US", prettyPrint));
      }),
      { numRuns: 200 },
    );
  });

  it("= the text writer with preferred phonemes, examples and astral characters", async () => {
    const astral = fc.constantFrom("\u{1d11e}", "\u{20000}", "x");
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.record({ word: text, phonemes: fc.array(fc.tuple(text, astral).map(([a, b]) => a + b), { minLength: 1, maxLength: 3 }), examples: fc.array(text, { maxLength: 2 }), pick: fc.nat(2) }), { minLength: 1, maxLength: 6 }),
        fc.boolean(),
        async (raw, prettyPrint) => {
          const entries = raw.map(({ pick, ...e }) => ({ ...e, preferred: pick % e.phonemes.length }));
          expect(await viaBytes(entries, prettyPrint)).toBe(await plsToString(entries, { lang: "en-US", prettyPrint }));
        },
      ),
      { numRuns: 200 },
    );
  });

  it("writes a lexeme longer than a chunk whole", async () => {
    const entries = [{ word: "a&b".repeat(120_000), phonemes: ["ˈæ<"] }, { word: "b", phonemes: ["bi"] }];
    expect(await viaBytes(entries, true)).toBe(await plsToString(entries, { lang: "en-US" }));
  });
});
