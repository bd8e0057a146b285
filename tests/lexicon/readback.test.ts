// Reading written files back on bytes (src/lexicon/readback.ts) gives what the line-by-line text
// reading with regular expressions gave: for random JSON Lines records (escapes, quotes, non-ASCII,
// astral characters, the field names inside values, CR LF line ends, a last line without LF) and
// random TSV files, split into chunks at every size. fast-check's seed is the run's
// (tests/support/fc-setup.ts: STRATA_FC_SEED replays one).

import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { countTag, eachLineBytes, readBackJsonl, readBackTsv } from "../../src/lexicon/readback.js";

const dir = mkdtempSync(join(tmpdir(), "strata-readback-"));

// The reading the byte version replaced (reconcile.ts before it): text lines and two regular expressions.
const SOURCE_LINE = /"source":\{"file":("(?:[^"\\]|\\.)*"),"line":(\d+)\}/;
const WORD = /"word":("(?:[^"\\]|\\.)*")/;
function textLines(text: string): string[] {
  const lines = text.split("\n").map((l) => (l.endsWith("\r") ? l.slice(0, -1) : l));
  if (lines[lines.length - 1] === "") lines.pop();
  return lines;
}
function byText(text: string): { count: number; lines: number[]; files: string[]; words: string[] } {
  const ls = textLines(text);
  return {
    count: ls.length,
    lines: ls.map((l) => Number(SOURCE_LINE.exec(l)?.[2] ?? 0)),
    files: ls.map((l) => {
      const m = SOURCE_LINE.exec(l);
      return m === null ? "" : (JSON.parse(m[1]!) as string);
    }),
    words: ls.map((l) => {
      const w = WORD.exec(l);
      return w === null ? "" : (JSON.parse(w[1]!) as string);
    }),
  };
}

const piece = fc.oneof(
  fc.constantFrom("a", "ˈ", "æ", '"', "\\", "\u2028", "😀", ",", "\t", '"word":"', '"source":{"file":"x","line":7}', "é"),
  fc.string({ maxLength: 3 }),
);
const text = fc.array(piece, { maxLength: 6 }).map((xs) => xs.join(""));
const record = fc.record({ key: text, word: text, narrow: text, file: text, line: fc.nat({ max: 200_000 }), withSource: fc.boolean(), withWord: fc.boolean() })
  .map((r) => JSON.stringify({ key: r.key, ...(r.withWord ? { word: r.word } : {}), narrow: r.narrow, ...(r.withSource ? { source: { file: r.file, line: r.line } } : {}) }));
const lineEnd = fc.constantFrom("\n", "\r\n");

describe("written files read back on bytes", () => {
  it("JSON Lines: the line count, each record's source line and word, as the regular expressions read them", async () => {
    let n = 0;
    await fc.assert(
      // Free text lines too (no control characters: JSON.stringify never writes one raw; no
      // backslash: an escape JSON does not know is no line a writer makes, and neither reading parses it).
      fc.asyncProperty(fc.array(fc.tuple(fc.oneof(record, text.filter((t) => !/[\u0000-\u001f\\]/.test(t))), lineEnd), { maxLength: 12 }), fc.boolean(), async (rows, lastLf) => {
        let body = rows.map(([r, e]) => r + e).join("");
        if (!lastLf && rows.length > 0) body = body.slice(0, -rows[rows.length - 1]![1].length);
        const p = join(dir, `r${n++}.jsonl`);
        writeFileSync(p, body);
        expect(await readBackJsonl(p)).toEqual(byText(body));
      }),
      { numRuns: 300 },
    );
  });

  it("TSV: entry lines and distinct values of the word column", async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(fc.tuple(text, text), { maxLength: 12 }), fc.constantFrom(0, 1, 2), async (rows, wordAt) => {
        const header = ["key", "word", "narrow"].map((h, i) => (i === wordAt ? "word" : i === 1 ? "other" : h)).join("\t");
        const body = [header, ...rows.map(([a, b]) => `${a}\t${b}\tz`)].join("\n") + "\n";
        const p = join(dir, `t${n++}.tsv`);
        writeFileSync(p, body);
        const lines = textLines(body);
        const at = lines[0]!.split("\t").indexOf("word");
        const words = new Set(lines.slice(1).map((l) => (at < 0 ? "" : l.split("\t")[at] ?? "")));
        const got = await readBackTsv(p);
        expect(got.entries).toBe(lines.length - 1);
        if (at >= 0) expect(got.words).toBe(words.size);
      }),
      { numRuns: 200 },
    );
  });

  it("a file larger than one read chunk: lines across chunk boundaries are read whole", async () => {
    const rows = Array.from({ length: 30_000 }, (_, i) => JSON.stringify({ key: `w${i}`, word: `wörd ${i} ˈ😀`, source: { file: "lexicon.csv", line: i + 2 } }));
    const p = join(dir, "big.jsonl");
    writeFileSync(p, rows.join("\n") + "\n");
    const got = await readBackJsonl(p);
    expect(got.count).toBe(30_000);
    expect(got.lines[29_999]).toBe(30_001);
    expect(got.words[12_345]).toBe("wörd 12345 ˈ😀");
    expect(got).toEqual(byText(rows.join("\n") + "\n"));
  });

  it("lines split on bytes read a few at a time (one buffer, grown for a longer line) are the text's lines", async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(fc.oneof(fc.constantFrom("\n", "\r\n", "\r", "é", "😀", "<lexeme>", "<lex"), fc.string({ maxLength: 5 })), { maxLength: 20 }), fc.integer({ min: 1, max: 12 }), async (parts, size) => {
        const body = parts.join("");
        const p = join(dir, `l${n++}.txt`);
        writeFileSync(p, body);
        const got: string[] = [];
        await eachLineBytes(p, (buf, start, end) => void got.push(buf.toString("utf8", start, end)), size);
        // Lines end at LF (a CR before it dropped); a last piece without LF is a line when not empty.
        const pieces = body.split("\n");
        if (pieces[pieces.length - 1] === "") pieces.pop();
        const want = pieces.map((l) => (l.endsWith("\r") ? l.slice(0, -1) : l));
        expect(got).toEqual(want);
        // The tag counted in the bytes as a search of the whole text counts it (not overlapping).
        expect(await countTag(p, "<lexeme>", size)).toBe(body.split("<lexeme>").length - 1);
      }),
      { numRuns: 400 },
    );
  });
});
