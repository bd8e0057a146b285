// Tests of the PLS 1.0 writer: schema validity (our XSD, libxml2), each requirement of the
// Recommendation checked beside the section that states it, escaping, and errors for bad input.
// Section numbers of W3C PLS 1.0 (Recommendation, 14 October 2008): §2 (alphabets), §4.1 (lexicon),
// §4.4 (lexeme) and §4.5 (grapheme) were checked against secondary sources that quote them; §4.2, §4.3,
// §4.6, §4.7, §4.8 and §4.9 are from memory and marked so beside each check.

import { mkdtemp, readFile, readdir, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { XmlElement } from "libxml2-wasm";
import {
  PLS_NAMESPACE,
  findNonXmlChar,
  isWellFormedLanguageTag,
  plsChunks,
  plsToString,
  writePls,
} from "../../src/emit/pls.js";
import type { PlsEntry } from "../../src/emit/pls.js";
import { parseXml, plsSchemaErrors } from "./pls-schema.js";

// Demo words from our own invented transit network (lexicons/demo); the IPA is ours.
const DEMO: PlsEntry[] = [
  { word: "Quillhaven", phonemes: ["ˈkʰwɪl.ˌheɪ.vən"] },
  { word: "Sallowmede", phonemes: ["ˈsæ.loʊ.ˌmid", "ˈsɑ.loʊ.ˌmid"], preferred: 1 },
  { word: "Pellanor Park", phonemes: ["ˈpʰɛ.lə.ˌnɔɹ ˈpʰɑɹk"], examples: ["Change at Pellanor Park for the ferry."] },
];

const PLS = "pls";
const NS = { [PLS]: PLS_NAMESPACE };

async function write(entries: PlsEntry[], lang = "en-US"): Promise<string> {
  return plsToString(entries, { lang });
}

describe("PLS writer: structure", () => {
  it("writes a document that our XSD (from the Recommendation's §4) accepts", async () => {
    const xml = await write(DEMO);
    expect(plsSchemaErrors(xml)).toEqual([]);
  });

  it("writes the root as the Recommendation states", async () => {
    const doc = parseXml(await write(DEMO, "en-US"));
    const root = doc.root;
    // W3C PLS 1.0 (Rec. 2008-10-14) §4.1: root element 'lexicon' in namespace http://www.w3.org/2005/01/pronunciation-lexicon
    expect(root.name).toBe("lexicon");
    expect(root.namespaceUri).toBe(PLS_NAMESPACE);
    // §4.1: version="1.0" is required
    expect(root.attr("version")?.value).toBe("1.0");
    // §4.1 and §2: alphabet="ipa" names the pronunciation alphabet of every phoneme
    expect(root.attr("alphabet")?.value).toBe("ipa");
    // §4.1: xml:lang (XML 1.0 §2.12) carries the language of the lexicon
    expect(root.get("@xml:lang")?.content).toBe("en-US");
    doc.dispose();
  });
});

/**
 * The text of `el`, read through an XPath string value that starts with a marker. libxml2-wasm hands
 * strings longer than 16 bytes to a `TextDecoder`, which drops a leading U+FEFF as a byte order mark
 * (from memory; seen with a grapheme that starts with U+FEFF), so `el.content` cannot read such text back.
 */
function textOf(el: XmlElement): string {
  const marked = el.eval("concat('|', string(.))");
  if (typeof marked !== "string" || !marked.startsWith("|")) throw new Error(`unexpected XPath string value ${JSON.stringify(marked)}`);
  return marked.slice(1);
}

/** Child elements of `el` as [localName, text, prefer attribute or null]. */
function children(el: XmlElement): Array<[string, string, string | null]> {
  const out: Array<[string, string, string | null]> = [];
  for (let n = el.firstChild; n !== null; n = n.next) {
    if (n instanceof XmlElement) out.push([n.name, textOf(n), n.attr("prefer")?.value ?? null]);
  }
  return out;
}

function lexemes(xml: string): Array<Array<[string, string, string | null]>> {
  const doc = parseXml(xml);
  const out = doc.find(`/${PLS}:lexicon/${PLS}:lexeme`, NS).map((n) => children(n as XmlElement));
  doc.dispose();
  return out;
}

describe("PLS writer: lexemes", () => {
  it("writes one lexeme per entry: grapheme first, then the pronunciations, then examples", async () => {
    const got = lexemes(await write(DEMO));
    // W3C PLS 1.0 §4.4: a lexeme holds one or more grapheme, then one or more phoneme/alias, then any example
    // (the order is the Recommendation's content model for lexeme; §4.5 grapheme, §4.6 phoneme, §4.8 example) (section number from memory)
    expect(got).toEqual([
      [["grapheme", "Quillhaven", null], ["phoneme", "ˈkʰwɪl.ˌheɪ.vən", null]],
      [["grapheme", "Sallowmede", null], ["phoneme", "ˈsæ.loʊ.ˌmid", null], ["phoneme", "ˈsɑ.loʊ.ˌmid", "true"]],
      [["grapheme", "Pellanor Park", null], ["phoneme", "ˈpʰɛ.lə.ˌnɔɹ ˈpʰɑɹk", null], ["example", "Change at Pellanor Park for the ferry.", null]],
    ]);
  });

  it("marks exactly the preferred pronunciation with prefer=\"true\" when there are several", async () => {
    const got = lexemes(await write([{ word: "Brindlewick", phonemes: ["ˈbɹɪn.dəl.ˌwɪk", "ˈbɹɪn.dl̩.ˌwɪk", "ˈbɹɪ.nəl.ˌwɪk"], preferred: 2 }]));
    // W3C PLS 1.0 §4.6: prefer="true" marks the pronunciation a TTS processor must use among several (section number from memory)
    expect(got[0]!.filter(([, , p]) => p === "true").map(([, t]) => t)).toEqual(["ˈbɹɪ.nəl.ˌwɪk"]);
    // §4.6: prefer defaults to "false", so the others carry no attribute (section number from memory)
    expect(got[0]!.filter(([n, , p]) => n === "phoneme" && p === null)).toHaveLength(2);
  });

  it("writes no prefer attribute on a lone pronunciation", async () => {
    const xml = await write([{ word: "Fennamere", phonemes: ["ˈfɛ.nə.ˌmɪɹ"] }]);
    // W3C PLS 1.0 §4.6: prefer only matters among several pronunciations (common practice, no source: leave it out) (section number from memory)
    expect(xml).not.toContain("prefer");
  });

  it("writes identical pronunciations once, keeping the preferred one", async () => {
    const got = lexemes(await write([{ word: "Kest", phonemes: ["kɛst", "kɛs", "kɛst"], preferred: 2 }]));
    expect(got[0]).toEqual([["grapheme", "Kest", null], ["phoneme", "kɛst", "true"], ["phoneme", "kɛs", null]]);
  });

  it("normalises text to NFC", async () => {
    // Unicode 15 UAX #15: e + U+0301 COMBINING ACUTE ACCENT composes to U+00E9 under NFC
    const got = lexemes(await write([{ word: "Sallowme\u0301de", phonemes: ["va\u0303"] }]));
    expect(got[0]![0]![1]).toBe("Sallowm\u00e9de");
    expect(got[0]![1]![1]).toBe("v\u00e3");
  });

  it("escapes every markup character so that text reads back unchanged", async () => {
    const nasty = `a<b>c&d"e'f ]]> &lt; &amp; &#x41; \t\nz`;
    const got = lexemes(await write([{ word: nasty, phonemes: [nasty], examples: [nasty] }]));
    // W3C XML 1.0 §2.4: '<' and '&' must be escaped in character data; ']]>' must not appear unescaped
    expect(got[0]!.map(([, t]) => t)).toEqual([nasty, nasty, nasty]);
  });

  it("keeps a leading U+FEFF in text (a character like any other inside an element)", async () => {
    // XML 1.0 §2.2: U+FEFF is a Char; only at the very start of the entity is it a byte order mark (§4.3.3, from memory)
    const word = "\ufeff\u{10000}\tQuillhaven";
    const got = lexemes(await write([{ word, phonemes: ["\ufeffkʰwɪl.ˌheɪ.vən"] }]));
    expect(got[0]).toEqual([["grapheme", word, null], ["phoneme", "\ufeffkʰwɪl.ˌheɪ.vən", null]]);
  });

  it("reads back any text of XML characters unchanged (property)", async () => {
    // XML 1.0 §2.2 Char, minus U+000D (which §2.11 end-of-line handling turns into U+000A).
    const xmlChar = fc.oneof(
      fc.constantFrom("\t", "\n", "<", ">", "&", '"', "'", ";", "#", "x"),
      fc.integer({ min: 0x20, max: 0xd7ff }).map((c) => String.fromCodePoint(c)),
      fc.integer({ min: 0xe000, max: 0xfffd }).map((c) => String.fromCodePoint(c)),
      fc.integer({ min: 0x10000, max: 0x10ffff }).map((c) => String.fromCodePoint(c)),
    );
    const text = fc.array(xmlChar, { minLength: 1, maxLength: 12 }).map((a) => a.join("")).filter((s) => s.trim() !== "");
    await fc.assert(
      fc.asyncProperty(text, text, async (w, p) => {
        const xml = await write([{ word: w, phonemes: [p] }]);
        const got = lexemes(xml);
        expect(got[0]).toEqual([["grapheme", w.normalize("NFC"), null], ["phoneme", p.normalize("NFC"), null]]);
      }),
      { numRuns: 200 },
    );
  });

  it("validates against our XSD for random lexicons (property)", async () => {
    const text = fc.string({ minLength: 1, maxLength: 8, unit: "grapheme" }).filter((s) => s.trim() !== "" && findNonXmlChar(s) === undefined && !s.includes("\r"));
    const entry = fc.record({
      word: text,
      phonemes: fc.array(text, { minLength: 1, maxLength: 4 }),
      examples: fc.array(text, { maxLength: 2 }),
    }).chain((e) => fc.nat({ max: e.phonemes.length - 1 }).map((preferred) => ({ ...e, preferred })));
    await fc.assert(
      fc.asyncProperty(fc.array(entry, { maxLength: 6 }), async (entries) => {
        expect(plsSchemaErrors(await write(entries))).toEqual([]);
      }),
      { numRuns: 100 },
    );
  });
});

describe("PLS writer: the schema itself rejects what the Recommendation forbids", () => {
  const wrap = (body: string, attrs = `version="1.0" alphabet="ipa" xml:lang="en-US"`): string =>
    `<?xml version="1.0" encoding="UTF-8"?>\n<lexicon xmlns="${PLS_NAMESPACE}" ${attrs}>${body}</lexicon>`;
  const ok = `<lexeme><grapheme>a</grapheme><phoneme>ə</phoneme></lexeme>`;

  it("accepts a hand-written valid document with meta, metadata, alias and example", () => {
    const body =
      `<meta name="author" content="Strata tests"/><metadata><x:note xmlns:x="urn:example:strata">ours</x:note></metadata>` +
      `<lexeme role="noun"><grapheme>ATM</grapheme><grapheme>A.T.M.</grapheme><alias prefer="true">cash machine</alias><phoneme>ˌeɪ.tiˈɛm</phoneme><example>Use the ATM.</example></lexeme>`;
    expect(plsSchemaErrors(wrap(body))).toEqual([]);
  });

  it.each([
    // §4.4: graphemes come before pronunciations
    ["phoneme before grapheme", `<lexeme><phoneme>ə</phoneme><grapheme>a</grapheme></lexeme>`],
    // §4.4: examples come last
    ["example before phoneme", `<lexeme><grapheme>a</grapheme><example>e</example><phoneme>ə</phoneme></lexeme>`],
    // §4.4: at least one grapheme
    ["no grapheme", `<lexeme><phoneme>ə</phoneme></lexeme>`],
    // §4.4: at least one phoneme or alias
    ["no pronunciation", `<lexeme><grapheme>a</grapheme></lexeme>`],
    // §4.6: prefer is "true" or "false" (section number from memory)
    ["prefer=yes", `<lexeme><grapheme>a</grapheme><phoneme prefer="yes">ə</phoneme></lexeme>`],
    // §4.1: meta and metadata come before lexemes
    ["meta after lexeme", `${ok}<meta name="a" content="b"/>`],
    // §4.5: a grapheme holds text, not elements
    ["element in grapheme", `<lexeme><grapheme><b>a</b></grapheme><phoneme>ə</phoneme></lexeme>`],
  ])("rejects %s", (_name, body) => {
    expect(plsSchemaErrors(wrap(body))).not.toEqual([]);
  });

  it.each([
    // §4.1: version="1.0" is required
    ["no version", `alphabet="ipa" xml:lang="en-US"`],
    ["version 2.0", `version="2.0" alphabet="ipa" xml:lang="en-US"`],
    // §4.1: xml:lang is required
    ["no xml:lang", `version="1.0" alphabet="ipa"`],
    // §4.1: alphabet is required
    ["no alphabet", `version="1.0" xml:lang="en-US"`],
  ])("rejects a root with %s", (_name, attrs) => {
    expect(plsSchemaErrors(wrap(ok, attrs))).not.toEqual([]);
  });
});

describe("PLS writer: bad input gives a clear error", () => {
  it("names the entry and the code point of a character XML 1.0 does not allow", async () => {
    const out = await mkdtemp(join(tmpdir(), "strata-pls-"));
    const path = join(out, "lexicon.pls");
    const r = await writePls(
      path,
      [DEMO[0]!, { word: "Kest\u0007lemoor", phonemes: ["ˈkɛ.səl.ˌmʊɹ"], source: { file: "demo.csv", line: 7, column: 1 } }],
      { lang: "en-US" },
    );
    // W3C XML 1.0 (5th ed.) §2.2 production [2] Char excludes U+0007
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error).toMatchObject({ file: "demo.csv", line: 7, code: "pls/invalid-xml-char", severity: "error" });
    expect(r.error.message).toContain("U+0007");
    expect(r.error.message).toContain("Kest<U+0007>lemoor");
    // written whole or not at all: no file and no temporary file are left behind
    expect(await readdir(out)).toEqual([]);
  });

  it("reports a lone surrogate and a U+FFFE as not allowed", () => {
    // XML 1.0 §2.2: surrogate code points and U+FFFE/U+FFFF are outside Char
    expect(findNonXmlChar("ab\ud800c")).toEqual({ offset: 2, codePoint: 0xd800 });
    expect(findNonXmlChar("\ufffe")).toEqual({ offset: 0, codePoint: 0xfffe });
    expect(findNonXmlChar("a\u{1F600}\u0000")).toEqual({ offset: 2, codePoint: 0 });
    expect(findNonXmlChar("\t\n\r \ud7ff\ue000\ufffd\u{10000}\u{10ffff}")).toBeUndefined();
  });

  it("refuses a carriage return, which an XML parser would turn into a line feed", async () => {
    // W3C XML 1.0 §2.11: a parser passes a lone CR to the application as LF
    await expect(write([{ word: "a\rb", phonemes: ["ə"] }])).rejects.toMatchObject({ diagnostic: { code: "pls/carriage-return" } });
  });

  it("refuses an entry without pronunciations, an empty grapheme and a preferred index out of range", async () => {
    await expect(write([{ word: "a", phonemes: [] }])).rejects.toMatchObject({ diagnostic: { code: "pls/no-pronunciation", line: 1 } });
    await expect(write([DEMO[0]!, { word: "  ", phonemes: ["ə"] }])).rejects.toMatchObject({ diagnostic: { code: "pls/empty-text", line: 2 } });
    await expect(write([{ word: "a", phonemes: ["ə"], preferred: 1 }])).rejects.toMatchObject({ diagnostic: { code: "pls/bad-preferred" } });
  });

  it("refuses a language tag that is not well-formed BCP 47, before writing anything", async () => {
    const out = await mkdtemp(join(tmpdir(), "strata-pls-"));
    const r = await writePls(join(out, "x.pls"), DEMO, { lang: "en_US" });
    expect(r).toMatchObject({ ok: false, error: { code: "pls/bad-language-tag" } });
    expect(await readdir(out)).toEqual([]);
  });

  it("keeps an existing file when a later entry fails", async () => {
    const out = await mkdtemp(join(tmpdir(), "strata-pls-"));
    const path = join(out, "keep.pls");
    await writeFile(path, "previous");
    const r = await writePls(path, [...DEMO, { word: "x\u0001", phonemes: ["ə"] }], { lang: "en-US" });
    expect(r.ok).toBe(false);
    expect(await readFile(path, "utf8")).toBe("previous");
    expect(await readdir(out)).toEqual(["keep.pls"]);
  });
});

describe("BCP 47 well-formedness (RFC 5646 §2.1)", () => {
  it.each([
    "en", "en-US", "en-us", "es-419", "zh-Hant-TW", "sl-rozaj-biske", "de-CH-1901", "zh-yue-HK",
    "en-a-bbb-x-a-ccc", "x-whatever", "i-klingon", "en-GB-oed", "qaa-Qaaa-QM-x-southern", "sgn-BE-FR",
  ])("accepts %s", (t) => {
    // RFC 5646 §2.1 ABNF and its appendix A examples (from memory)
    expect(isWellFormedLanguageTag(t)).toBe(true);
  });
  it.each(["", "en_US", "e", "englishlanguage", "en-", "-en", "en--US", "en-US-", "a-DE", "ar-a-aaa-b-bbb-a-ccc-x", "en-x", "abcdefghi"])(
    "rejects %s",
    (t) => {
      expect(isWellFormedLanguageTag(t)).toBe(false);
    },
  );
});

describe("PLS writer: streaming", () => {
  it("yields the document piece by piece, pulling entries lazily (memory stays flat)", async () => {
    let produced = 0;
    function* many(): Generator<PlsEntry> {
      for (let i = 0; i < 5000; i++) {
        produced++;
        yield { word: `Stop ${i}`, phonemes: ["ˈstɑp"] };
      }
    }
    const gen = plsChunks(many(), { lang: "en-US" });
    const head = await gen.next();
    expect(head.value).toContain("<?xml");
    expect(head.value).toContain("<lexicon");
    expect(produced).toBe(0);
    const first = await gen.next();
    expect(first.value).toContain("Stop 0<");
    expect(String(first.value).endsWith("</lexeme>")).toBe(true);
    // One chunk holds about 64 KiB of lexemes, not the whole lexicon.
    expect(produced).toBeGreaterThan(1);
    expect(produced).toBeLessThan(5000);
    await gen.return(0);
  });

  it("writes the same bytes for the same input", async () => {
    const out = await mkdtemp(join(tmpdir(), "strata-pls-"));
    await writePls(join(out, "a.pls"), DEMO, { lang: "en-US" });
    await writePls(join(out, "b.pls"), DEMO, { lang: "en-US" });
    expect(await readFile(join(out, "a.pls"))).toEqual(await readFile(join(out, "b.pls")));
  });
});
