// Lexicon reader robustness (issue 15): carriage returns (RFC 4180: CR LF and LF end lines, a CR
// inside a quoted field is data, a lone CR elsewhere ends the line), exact line numbers and raw text
// of rejects, characters no field may hold, duplicate ids, linear quote checking on astral text,
// and the same result however the input is cut into chunks.

import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { renderDiagnostic } from "../../src/diagnostics.js";
import { loadInventory } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { RecordSplitter, checkQuoting, readLexicon, rejectDiagnostic, splitRecords } from "../../src/lexicon/read.js";
import type { LexiconItem, LexiconReader } from "../../src/lexicon/read.js";
import { useSeed } from "../fuzz/seed.js";

const SEGMENTS = fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url));
const inv: Inventory = loadInventory(SEGMENTS).inventory!;
useSeed("lexicon/read-robust", 415061);

async function readChunks(chunks: readonly (string | Buffer)[]): Promise<{ items: LexiconItem[]; reader: LexiconReader }> {
  const reader = readLexicon(Readable.from(chunks.map((c) => (typeof c === "string" ? Buffer.from(c, "utf8") : c))), { inventory: inv, file: "demo.csv" });
  const items: LexiconItem[] = [];
  for await (const x of reader) items.push(x);
  return { items, reader };
}
const readText = (text: string) => readChunks([text]);
/** Each item as `row LINE WORD` or `reject LINE:COLUMN CODE RAW`. */
const brief = (items: LexiconItem[]): string[] =>
  items.map((x) => (x.kind === "row" ? `row ${x.line} ${x.word}` : `reject ${x.line}:${x.column} ${x.code} ${JSON.stringify(x.raw)}`));

describe("lexicon reader: carriage returns (RFC 4180)", () => {
  it("a CR inside a quoted field does not end the record: one reject at the CR, and every later line keeps its number", async () => {
    const text = 'word,pron,note\nKest,kɛst,"a\rb"\nFenna,ˈfɛ.nə\nLast,læst\n';
    const { items, reader } = await readText(text);
    // line 2 is `Kest,kɛst,"a`, line 3 is `b"` (an editor shows the lone CR as a line end)
    expect(brief(items)).toEqual([`reject 2:13 lexicon/control-character ${JSON.stringify('Kest,kɛst,"a\rb"')}`, "row 4 Fenna", "row 5 Last"]);
    expect(reader.stats).toMatchObject({ lines: 5, dataLines: 3, rows: 2, rejects: 1 });
  });

  it("a line ending CR CR LF is the row and then a blank line; nothing dropped or doubled", async () => {
    const { items, reader } = await readText("word,pron\nKest,kɛst\r\r\nFenna,ˈfɛ.nə\nLast,læst\n");
    expect(brief(items)).toEqual(["row 2 Kest", "row 4 Fenna", "row 5 Last"]);
    expect(reader.stats).toMatchObject({ lines: 5, blankLines: 1, dataLines: 3 });
  });

  it("a lone CR in an unquoted field ends the line there (both halves are read at their own lines)", async () => {
    const { items } = await readText("word,pron\nKe\rst,kɛst\nLast,læst\n");
    expect(brief(items)).toEqual(['reject 2:3 lexicon/empty-pron "Ke"', "row 3 st", "row 4 Last"]);
  });

  it("rejects quote their own record's text, and render with their own source line", async () => {
    const text = 'word,pron\nA,"kæ\rt"\nDovrenny,dQ\r\nB,kæt\n';
    const { items } = await readText(text);
    const rej = items.filter((x) => x.kind === "reject");
    expect(rej.map((r) => [r.line, r.raw])).toEqual([[2, 'A,"kæ\rt"'], [4, "Dovrenny,dQ"]]);
    const shown = renderDiagnostic(rejectDiagnostic(rej[1]!), text).split("\n");
    expect(shown[1]).toBe("    4 | Dovrenny,dQ");
    expect(shown[2]).toBe("      |           ^");
  });

  it("a CR LF split across two chunks is one line end; a CR at a chunk's end followed by text is a line end", async () => {
    const a = await readChunks(["word,pron\r", "\nKest,kɛst\r", "Last,læst\r", "\n"]);
    expect(brief(a.items)).toEqual(["row 2 Kest", "row 3 Last"]);
    expect(a.reader.stats.lines).toBe(3);
  });

  it("gives the same items however the bytes are cut into chunks (property)", async () => {
    const text = 'word,pron,note\n# c\rKest,kɛst,"a\r\rb"\r\n\r\nFenna,ˈfɛ.nə,"x ""y"""\rDovrenny,dQ\n"unclosed,kæt\r\nLast,læst';
    const whole = brief((await readText(text)).items);
    const bytes = Buffer.from(text, "utf8");
    await fc.assert(
      fc.asyncProperty(fc.uniqueArray(fc.integer({ min: 1, max: bytes.length - 1 }), { maxLength: 8 }), async (cuts) => {
        const at = [0, ...[...cuts].sort((x, y) => x - y), bytes.length];
        const chunks = at.slice(1).map((end, i) => bytes.subarray(at[i]!, end));
        expect(brief((await readChunks(chunks)).items)).toEqual(whole);
      }),
      { numRuns: 100 },
    );
  });

  it("a chunk that starts with a line end is a blank line, not part of the next record", () => {
    const s = new RecordSplitter();
    const recs = [...s.push("w,p\n"), ...s.push("\none,x\n"), ...s.end()];
    expect(recs.map((r) => [r.line, r.kind, r.raw])).toEqual([[1, "data", "w,p"], [2, "blank", ""], [3, "data", "one,x"]]);
  });

  it("splits records by the documented grammar", () => {
    const recs = splitRecords('\ufeffa,b\r\n"x\ry",z\r\r# q "\rw\n  \n');
    expect(recs.map((r) => [r.line, r.lines, r.kind, r.raw])).toEqual([
      [1, 1, "data", "a,b"],
      [2, 2, "data", '"x\ry",z'],
      [4, 1, "blank", ""],
      [5, 1, "comment", '# q "'],
      [6, 1, "data", "w"],
      [7, 1, "blank", "  "],
    ]);
  });
});

describe("lexicon reader: characters no field may hold", () => {
  it("rejects NUL, a byte-order mark inside a line and control characters, each at its column", async () => {
    const { items, reader } = await readText("word,pron,note\nKe\u0000st,kɛst\nFenna,ˈfɛ.nə,x\ufeff\nB\u0007,kæt\nLast,læst\n");
    expect(brief(items)).toEqual([
      `reject 2:3 lexicon/nul ${JSON.stringify("Ke\u0000st,kɛst")}`,
      `reject 3:15 lexicon/bom ${JSON.stringify("Fenna,ˈfɛ.nə,x\ufeff")}`,
      `reject 4:2 lexicon/control-character ${JSON.stringify("B\u0007,kæt")}`,
      "row 5 Last",
    ]);
    expect(reader.stats).toMatchObject({ dataLines: 4, rows: 1, rejects: 3 });
  });

  it("reports a NUL in the header as an error for the file", async () => {
    const { reader } = await readText("word,pr\u0000on\nKest,kɛst\n");
    expect(reader.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([["lexicon/nul", 1, 8]]);
  });
});

describe("lexicon reader: duplicate ids", () => {
  it("rejects a second row with the same id, naming the line of the first", async () => {
    const { items } = await readText("id,word,pron\nk1,Kest,kɛst\nk2,Fenna,ˈfɛ.nə\n# comment\nk1,Kest,ˈkɛst\n  k2 ,Other,kæt\nk3,Last,læst\n");
    expect(brief(items)).toEqual(["row 2 Kest", "row 3 Fenna", 'reject 5:1 lexicon/duplicate-id "k1,Kest,ˈkɛst"', 'reject 6:1 lexicon/duplicate-id "  k2 ,Other,kæt"', "row 7 Last"]);
    const r = items[2]!;
    expect(r.kind === "reject" && r.reason).toContain("line 2");
  });

  it("does not treat rows without an id as duplicates", async () => {
    const { items } = await readText("id,word,pron\n,Kest,kɛst\n,Fenna,ˈfɛ.nə\n");
    expect(brief(items)).toEqual(["row 2 Kest", "row 3 Fenna"]);
  });
});

describe("lexicon reader: quote checking is linear", () => {
  // One 120 KB line of quoted fields holding characters outside the Basic Multilingual Plane took
  // over a minute before (a column computed from the line's start for every field).
  const astral = "\u{1D538}\u{1F600}";
  const line = Array.from({ length: 18_000 }, () => `"${astral}"`).join(",") + `,"${astral}`;

  it("checks a 120 KB line of astral quoted fields and positions its error in code points", () => {
    expect(line.length).toBeGreaterThan(120_000);
    const q = checkQuoting(line);
    expect(q).toMatchObject({ ok: false, code: "lexicon/unclosed-quote", column: 18_000 * 5 + 1 });
    const good = checkQuoting(line + '"');
    expect(good.ok && good.fields.length).toBe(18_001);
    expect(good.ok && good.fields[1]!.column).toBe(7);
  }, 20_000);

  it("reads a lexicon holding that line", async () => {
    const { items } = await readText(`word,pron\n${line}\nLast,læst\n`);
    expect(brief(items).map((s) => s.slice(0, 30))).toEqual(["reject 2:90001 lexicon/unclose", "row 3 Last"]);
  }, 20_000);
});
