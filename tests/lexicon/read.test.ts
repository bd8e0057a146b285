// Tests of the lexicon CSV reader: format details (BOM, CRLF, quoting, comments), rejects with
// positions, header errors, stress marks turned into nucleus features, reconciliation and streaming.

import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { PassThrough, Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parse } from "csv-parse/sync";
import { loadInventory } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { checkQuoting, readLexicon, writeRejects } from "../../src/lexicon/read.js";
import type { LexiconItem, LexiconReader, LexiconRow, RejectedRow } from "../../src/lexicon/read.js";
import { csvLine } from "../../src/emit/csv.js";

const SEGMENTS = fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url));
const loaded = loadInventory(SEGMENTS);
if (loaded.inventory === undefined) throw new Error(`en-us inventory did not load: ${loaded.diagnostics.map((d) => d.message).join("; ")}`);
const inv: Inventory = loaded.inventory;

async function readText(text: string | Buffer, file = "demo.csv"): Promise<{ items: LexiconItem[]; reader: LexiconReader }> {
  const reader = readLexicon(Readable.from([typeof text === "string" ? Buffer.from(text, "utf8") : text]), { inventory: inv, file });
  const items: LexiconItem[] = [];
  for await (const x of reader) items.push(x);
  return { items, reader };
}
const rows = (items: LexiconItem[]): LexiconRow[] => items.filter((x): x is LexiconRow => x.kind === "row");
const rejects = (items: LexiconItem[]): RejectedRow[] => items.filter((x): x is RejectedRow => x.kind === "reject");

const f = (name: string): number => inv.featureIndex.get(name)!;
/** [symbol kind or segment text, stress, primary] per symbol, for readable assertions. */
function stressOf(row: LexiconRow): string[] {
  return row.symbols.map((s) => (s.kind === "boundary" ? (s.which === "word" ? "#" : ".") : `${s.bundle[f("syllabic")]}${s.bundle[f("stress")]}${s.bundle[f("primary")]}`));
}

describe("lexicon reader: the format", () => {
  it("reads rows with optional columns, in any column order", async () => {
    const { items, reader } = await readText("pron,word,id,pos,tags,note\nˈkwɪl.ˌheɪ.vən,Quillhaven,q1,noun,place; rail,\"terminus, north\"\n");
    expect(reader.diagnostics).toEqual([]);
    expect(rows(items)).toHaveLength(1);
    const r = rows(items)[0]!;
    expect(r).toMatchObject({ word: "Quillhaven", pron: "ˈkwɪl.ˌheɪ.vən", id: "q1", pos: "noun", tags: ["place", "rail"], note: "terminus, north", line: 2, pronColumn: 1 });
  });

  it("accepts a byte-order mark and CRLF line ends", async () => {
    // Unicode 15 §23.8: U+FEFF at the start of a UTF-8 stream is a byte-order mark, not text
    const { items, reader } = await readText(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from("word,pron\r\nSallowmede,ˈsæ.loʊ.ˌmid\r\nFennamere,ˈfɛ.nə.ˌmɪɹ\r\n")]));
    expect(reader.diagnostics).toEqual([]);
    expect(rows(items).map((r) => [r.word, r.line, r.pron])).toEqual([["Sallowmede", 2, "ˈsæ.loʊ.ˌmid"], ["Fennamere", 3, "ˈfɛ.nə.ˌmɪɹ"]]);
  });

  it("skips comment lines (# first on the line) and blank lines but reads # inside a pronunciation as a word break", async () => {
    const text = "# demo lexicon\nword,pron\n\n# a comment\nPellanor Park,ˈpɛ.lə.ˌnɔɹ # ˈpɑɹk\n   \n";
    const { items, reader } = await readText(text);
    expect(reader.stats).toMatchObject({ lines: 6, commentLines: 2, blankLines: 2, headerLine: 2, dataLines: 1, rows: 1, rejects: 0 });
    expect(stressOf(rows(items)[0]!)).toContain("#");
  });

  it("reads quoted fields with commas, doubled quotes and a secondary stress written as ASCII comma", async () => {
    const { items } = await readText('word,pron,note\n"Brindlewick, Upper","ˌʌ.pɚ ˈbɹɪn.dəl.ˌwɪk","say ""upper"""\n');
    const r = rows(items)[0]!;
    expect(r.word).toBe("Brindlewick, Upper");
    expect(r.note).toBe('say "upper"');
    expect(r.pronColumn).toBe(23);
  });

  it("splits several rows of one word into alternatives, in file order", async () => {
    const { items } = await readText("word,pron\nSallowmede,ˈsæ.loʊ.ˌmid\nSallowmede,ˈsɑ.loʊ.ˌmid\n");
    expect(rows(items).map((r) => r.pron)).toEqual(["ˈsæ.loʊ.ˌmid", "ˈsɑ.loʊ.ˌmid"]);
  });

  it("reads a last line without a line break", async () => {
    const { items } = await readText("word,pron\nCorvellan,kɔɹˈvɛlən");
    expect(rows(items).map((r) => r.word)).toEqual(["Corvellan"]);
  });
});

describe("lexicon reader: stress marks become nucleus features", () => {
  it("puts ˈ and ˌ on the next nucleus and makes every other nucleus unstressed", async () => {
    const { items } = await readText("word,pron\nKestlemoor,ˈkɛ.səl.ˌmʊɹ\n");
    // segment summaries: syllabic, stress, primary
    expect(stressOf(rows(items)[0]!)).toEqual(["-00", "+++", ".", "-00", "+--", "-00", ".", "-00", "++-", "-00"]);
    expect(rows(items)[0]!.stressMarked).toBe(true);
  });

  it("leaves every nucleus unassigned when the entry has no mark", async () => {
    const { items } = await readText("word,pron\nKestlemoor,kɛsəlmʊɹ\n");
    expect(stressOf(rows(items)[0]!)).toEqual(["-00", "+00", "-00", "+00", "-00", "-00", "+00", "-00"]);
    expect(rows(items)[0]!.stressMarked).toBe(false);
  });

  it("reads ASCII ' as primary stress", async () => {
    const { items } = await readText("word,pron\nKest,'kɛst\n");
    expect(stressOf(rows(items)[0]!)).toEqual(["-00", "+++", "-00", "-00"]);
  });
});

describe("lexicon reader: rejects", () => {
  it("rejects an unknown symbol with its line and column, and goes on", async () => {
    const { items, reader } = await readText("word,pron\nQuillhaven,ˈkwɪl.ˌheɪ.vən\nDovrenny,ˈdɑv.ɹɛ.nQ\nFennamere,ˈfɛ.nə.ˌmɪɹ\n");
    expect(rows(items).map((r) => r.word)).toEqual(["Quillhaven", "Fennamere"]);
    expect(rejects(items)).toEqual([
      expect.objectContaining({ line: 3, column: 19, code: "ipa/unknown-symbol", raw: "Dovrenny,ˈdɑv.ɹɛ.nQ" }),
    ]);
    expect(rejects(items)[0]!.reason).toContain("Q");
    expect(reader.stats).toMatchObject({ dataLines: 3, rows: 2, rejects: 1 });
  });

  it("rejects an empty word and an empty pronunciation", async () => {
    const { items } = await readText("word,pron\n,ˈkæt\nFennamere,\nKest,  \n");
    expect(rejects(items).map((r) => [r.line, r.column, r.code])).toEqual([
      [2, 1, "lexicon/empty-word"],
      [3, 11, "lexicon/empty-pron"],
      [4, 6, "lexicon/empty-pron"],
    ]);
  });

  it("rejects a line with broken quoting without losing the lines after it", async () => {
    const text = [
      "word,pron,note",
      'Quillhaven,"ˈkwɪl.ˌheɪ.vən,unclosed',
      'Sallowmede,"ˈsæ.loʊ.ˌmid"x,',
      'Fennamere,ˈfɛ.nə.ˌmɪɹ,"fine ""quoted"""',
      'Kest,kɛst,5" tall',
      "Kestlemoor,ˈkɛ.səl.ˌmʊɹ,",
    ].join("\n");
    const { items, reader } = await readText(text);
    expect(rows(items).map((r) => [r.line, r.word])).toEqual([[4, "Fennamere"], [5, "Kest"], [6, "Kestlemoor"]]);
    expect(rejects(items).map((r) => [r.line, r.column, r.code])).toEqual([
      [2, 12, "lexicon/unclosed-quote"],
      [3, 26, "lexicon/text-after-quote"],
    ]);
    expect(reader.stats).toMatchObject({ dataLines: 5, rows: 3, rejects: 2 });
  });

  it("gives the column inside a quoted field correctly after doubled quotes", async () => {
    const { items } = await readText('word,pron\nDovrenny,"ˈdɑv""Q"\n');
    // the pron value is ˈdɑv"Q; its '"' is the unknown symbol at raw column 15 (the first of the doubled pair)
    expect(rejects(items).map((r) => [r.column, r.code])).toEqual([[15, "ipa/unknown-symbol"]]);
  });

  it("rejects a stress mark with no vowel after it, two marks before one vowel, and stray word breaks", async () => {
    const { items } = await readText("word,pron\nA,kæˈt\nB,ˈˌkæt\nC,#kæt\nD,kæt # # kæt\nE,ˈkæt ˈ# dɔɡ\n");
    expect(rejects(items).map((r) => [r.line, r.column, r.code])).toEqual([
      [2, 5, "lexicon/stress-without-vowel"],
      [3, 4, "lexicon/double-stress"],
      [4, 3, "lexicon/empty-phrase-word"],
      [5, 9, "lexicon/empty-phrase-word"],
      [6, 8, "lexicon/stress-without-vowel"],
    ]);
  });

  it("rejects a row with more fields than the header", async () => {
    const { items } = await readText("word,pron\nKest,kɛst,extra\n");
    expect(rejects(items).map((r) => [r.column, r.code])).toEqual([[11, "lexicon/extra-fields"]]);
  });

  it("rejects a line that is not valid UTF-8", async () => {
    const { items } = await readText(Buffer.concat([Buffer.from("word,pron\nKe"), Buffer.from([0xff]), Buffer.from("st,kɛst\nFennamere,ˈfɛ.nə.ˌmɪɹ\n")]));
    expect(rejects(items).map((r) => [r.line, r.column, r.code])).toEqual([[2, 3, "lexicon/bad-encoding"]]);
    expect(rows(items).map((r) => r.word)).toEqual(["Fennamere"]);
  });

  it("writes rejects as CSV that reads back to the same fields", async () => {
    const { items } = await readText('word,pron\nDovrenny,"ˈdɑv, ""Q"""\nA,kæˈt\n');
    const dir = await mkdtemp(join(tmpdir(), "strata-rejects-"));
    const path = join(dir, "rejects.csv");
    expect(await writeRejects(path, rejects(items))).toBe(2);
    const back = parse(await readFile(path, "utf8")) as string[][];
    expect(back[0]).toEqual(["file", "line", "column", "code", "reason", "raw"]);
    expect(back.slice(1).map((r) => [r[0], r[1], r[3], r[5]])).toEqual([
      ["demo.csv", "2", "ipa/unknown-symbol", 'Dovrenny,"ˈdɑv, ""Q"""'],
      ["demo.csv", "3", "lexicon/stress-without-vowel", "A,kæˈt"],
    ]);
  });
});

describe("lexicon reader: the header", () => {
  it("stops with an error when a required column is missing", async () => {
    const { items, reader } = await readText("word,ipa\nKest,kɛst\n");
    expect(items).toEqual([]);
    expect(reader.diagnostics).toEqual([
      expect.objectContaining({ severity: "warning", code: "lexicon/unknown-column", line: 1, column: 6 }),
      expect.objectContaining({ severity: "error", code: "lexicon/missing-column", line: 1 }),
    ]);
  });

  it("warns about an unknown column and reads on", async () => {
    const { items, reader } = await readText("word,pron,frequency\nKest,kɛst,12\n");
    expect(rows(items)).toHaveLength(1);
    expect(reader.diagnostics.map((d) => [d.severity, d.code, d.column])).toEqual([["warning", "lexicon/unknown-column", 11]]);
  });

  it("reports a duplicate column, an empty file and a missing file", async () => {
    expect((await readText("word,pron,word\n")).reader.diagnostics.map((d) => d.code)).toContain("lexicon/duplicate-column");
    expect((await readText("# only a comment\n")).reader.diagnostics.map((d) => d.code)).toEqual(["lexicon/no-header"]);
    const reader = readLexicon("/nonexistent/strata/lexicon.csv", { inventory: inv });
    for await (const _ of reader) throw new Error("no items expected");
    expect(reader.diagnostics).toEqual([expect.objectContaining({ code: "lexicon/unreadable", file: "/nonexistent/strata/lexicon.csv", line: 1 })]);
  });

  it("reads a file whose lines end in a bare CR line by line", async () => {
    const { items, reader } = await readText("word,pron\rKest,kɛst\rFenna,ˈfɛ.nə\r");
    expect(reader.diagnostics).toEqual([]);
    expect(rows(items).map((r) => [r.line, r.word])).toEqual([[2, "Kest"], [3, "Fenna"]]);
    expect(reader.stats).toMatchObject({ lines: 3, dataLines: 2 });
  });

  it("reports a header with broken quoting as an error for the file", async () => {
    const { reader } = await readText('"word,pron\nKest,kɛst\n');
    expect(reader.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([["lexicon/unclosed-quote", 1, 1]]);
  });

  it("reads a file from a path", async () => {
    const dir = await mkdtemp(join(tmpdir(), "strata-read-"));
    const path = join(dir, "demo.csv");
    await writeFile(path, "word,pron\nKest,kɛst\n");
    const reader = readLexicon(path, { inventory: inv });
    const got: LexiconItem[] = [];
    for await (const x of reader) got.push(x);
    expect(got).toEqual([expect.objectContaining({ kind: "row", file: path, word: "Kest" })]);
  });
});

describe("lexicon reader: reconciliation and streaming", () => {
  // Random lines: good rows, bad symbols, broken quotes, comments, blanks, empty prons.
  const lineArb = fc.oneof(
    fc.constantFrom("Kest,kɛst", "Fennamere,ˈfɛ.nə.ˌmɪɹ", '"Brindlewick, Upper","ˌʌ.pɚ ˈbɹɪn.dəl.ˌwɪk"', "Sallowmede,ˈsæ.loʊ.ˌmid,"),
    fc.constantFrom("Dovrenny,dQ", 'Quill,"ˈkwɪl', 'Quill,"a"b', "Fenna,", ",kɛst", "A,kæˈt", "Kest,kɛst,x,y"),
    fc.constantFrom("# comment", "", "  ", "#,kɛst"),
    fc.string({ maxLength: 12 }).filter((s) => !/[\r\n]/.test(s)),
  );

  it("every data line is either read or rejected, in line order (property)", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(lineArb, { maxLength: 40 }), fc.boolean(), async (lines, crlf) => {
        const text = ["word,pron,note", ...lines].join(crlf ? "\r\n" : "\n");
        const { items, reader } = await readText(text);
        const s = reader.stats;
        expect(s.rows + s.rejects).toBe(s.dataLines);
        expect(items.length).toBe(s.dataLines);
        const order = items.map((x) => x.line);
        expect(order).toEqual([...order].sort((a, b) => a - b));
        expect(new Set(order).size).toBe(order.length);
        expect(s.lines).toBe(lines.length + 1 - (lines.length > 0 && lines[lines.length - 1] === "" ? 1 : 0));
      }),
      { numRuns: 150 },
    );
  });

  it("yields rows before the input has ended", async () => {
    // csv-parse keeps the last complete record back until more input (or the end) arrives, so rows
    // come one line behind the writer: write three, receive two, then end and receive the third.
    const input = new PassThrough();
    const reader = readLexicon(input, { inventory: inv, file: "live.csv" });
    const it = reader[Symbol.asyncIterator]();
    input.write("word,pron\nKest,kɛst\nFennamere,ˈfɛ.nə.ˌmɪɹ\nKestlemoor,ˈkɛ.səl.ˌmʊɹ\n");
    expect((await it.next()).value).toMatchObject({ kind: "row", word: "Kest" });
    expect((await it.next()).value).toMatchObject({ kind: "row", word: "Fennamere" });
    input.end();
    expect((await it.next()).value).toMatchObject({ word: "Kestlemoor" });
    expect((await it.next()).done).toBe(true);
  }, 10_000);

  it("holds only a bounded number of lines in memory however long the file", async () => {
    function* big(): Generator<string> {
      yield "word,pron\n";
      for (let i = 0; i < 40000; i++) yield i % 1000 === 7 ? `Bad${i},zQ\n` : `Word${i},ˈkɛ.lə.bi\n`;
    }
    const reader = readLexicon(Readable.from(big()), { inventory: inv, file: "big.csv" });
    let n = 0;
    for await (const _ of reader) n++;
    expect(n).toBe(40000);
    expect(reader.stats).toMatchObject({ rows: 39960, rejects: 40 });
    expect(reader.stats.maxInFlight).toBeLessThan(2000);
  });
});

describe("quoting check", () => {
  it("agrees with csv-parse on lines it accepts (property)", () => {
    const cell = fc.oneof(fc.constantFrom("", "a", '"', '""', ",", " ", "ə", '"a"', 'x"y'), fc.string({ maxLength: 4 }).filter((s) => !/[\r\n]/.test(s)));
    fc.assert(
      fc.property(fc.array(cell, { minLength: 1, maxLength: 5 }), (parts) => {
        const line = parts.join("");
        const q = checkQuoting(line);
        if (!q.ok) return;
        const viaCsvParse = parse(line + "\n", { relax_quotes: true, relax_column_count: true, record_delimiter: "\n" }) as string[][];
        expect(viaCsvParse[0]?.length ?? 1).toBe(q.fields.length);
      }),
      { numRuns: 500 },
    );
  });

  it("round-trips fields written by our CSV writer", () => {
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 6 }).filter((s) => !/[\r\n]/.test(s)), { minLength: 1, maxLength: 5 }), (fields) => {
        const line = csvLine(fields).slice(0, -1);
        const q = checkQuoting(line);
        expect(q.ok).toBe(true);
        const back = parse(line + "\n", { relax_quotes: true, relax_column_count: true, record_delimiter: "\n" }) as string[][];
        expect(back[0] ?? [""]).toEqual(fields.length === 1 && fields[0] === "" ? [""] : fields);
      }),
      { numRuns: 300 },
    );
  });
});
