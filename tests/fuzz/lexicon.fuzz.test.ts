// Fuzzing the lexicon CSV reader with mutated lexicons (CR, LF, quotes, NUL, BOM, astral characters,
// long lines, commas, bad UTF-8), fed in random chunks. Asserts: no exception, each case finishes
// within a bound, every reject and diagnostic positioned inside the file, rows read = rows yielded
// + rows rejected where "rows read" comes from an RFC 4180 record counter written here, rejects
// quote their own line, and the build's own independent counter (reconcile.ts) agrees.

import { readFileSync } from "node:fs";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { loadInventory } from "../../src/inventory/index.js";
import type { Inventory } from "../../src/inventory/types.js";
import { readLexicon } from "../../src/lexicon/read.js";
import type { LexiconItem } from "../../src/lexicon/read.js";
import { countInputRecords } from "../../src/lexicon/reconcile.js";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { chunksOf, expectPositionedInside, mutatedBytes, ownLines } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/lexicon", 20261202);
const inv: Inventory = loadInventory(fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url))).inventory!;
const demo = readFileSync(fileURLToPath(new URL("../../lexicons/demo/lexicon.csv", import.meta.url)), "utf8").split("\n");
// A valid base: the demo's header, a comment, a few rows (one quoted, one with an id column variant).
const BASE = ["# fuzz base", ...demo.slice(0, 14), ""].join("\n");
const SCRATCH = join(mkdtempSync(join(tmpdir(), "strata-fuzz-lexicon-")), "lexicon.csv");
const WITH_IDS = ['id,word,pron,note', 'a1,Kest,kɛst,', 'a2,"Brindlewick, Upper","ˌʌ.pɚ ˈbɹɪn.dəl.ˌwɪk","say ""upper"""', "a3,Fenna,ˈfɛ.nə,", ""].join("\r\n");

/**
 * The records of a lexicon text by RFC 4180 as the README restates it: a record ends at CR LF, LF
 * or a lone CR, except a lone CR inside a quoted field; an LF always ends it. Written with regular
 * expressions (the reader uses a state machine, reconcile.ts its own loop). Returns the data records
 * (after the header; comments and blank records excluded) with the line each starts on.
 */
function referenceRecords(text: string): { line: number; raw: string }[] {
  const t = text.startsWith("\ufeff") ? text.slice(1) : text;
  // A closed quoted field, matched atomically (the lookahead takes the longest run and never gives back).
  const closed = /"(?=((?:[^"\r\n]|""|\r(?!\n|$))*))\1"/y;
  const open = /"(?:[^"\r\n]|""|\r(?!\n|$))*/y;
  const bare = /[^,\r\n]*/y;
  const end = /\r\n|\n|\r|$/y;
  const records: { line: number; raw: string }[] = [];
  let i = 0;
  let line = 1;
  while (i < t.length) {
    const start = i;
    if (t[i] === "#") {
      bare.lastIndex = i;
      i = /[^\r\n]*/y.exec(t.slice(i))![0].length + i;
    } else {
      for (;;) {
        const re = t[i] === '"' ? closed : bare;
        re.lastIndex = i;
        const m = re.exec(t);
        if (m !== null && re === closed) {
          i = re.lastIndex;
          bare.lastIndex = i; // text after the closing quote, up to the comma or the line end
          bare.exec(t);
          i = bare.lastIndex;
        } else if (t[i] === '"') {
          open.lastIndex = i;
          open.exec(t);
          i = open.lastIndex;
        } else {
          i = re.lastIndex;
        }
        if (t[i] === ",") {
          i++;
          continue;
        }
        break;
      }
    }
    const raw = t.slice(start, i);
    end.lastIndex = i;
    i += end.exec(t)![0].length;
    records.push({ line, raw });
    line += 1 + (raw.match(/\r/g)?.length ?? 0);
  }
  const kept = records.filter((r) => !r.raw.startsWith("#") && !/^[ \t]*$/.test(r.raw));
  return kept.slice(1);
}

async function read(chunks: readonly Buffer[]): Promise<{ items: LexiconItem[]; diagnostics: readonly { file: string; line: number; column: number; code: string; severity: string }[] }> {
  const reader = readLexicon(Readable.from(chunks), { inventory: inv, file: "fuzz.csv" });
  const items: LexiconItem[] = [];
  for await (const x of reader) items.push(x);
  return { items, diagnostics: reader.diagnostics };
}

describe("fuzz: the lexicon CSV reader", () => {
  it("the reference record counter reads the documented cases", () => {
    expect(referenceRecords('h\nA,"x\ry"\r\nB,"a""b",c\r\rC,"open\nD\r')).toEqual([
      { line: 2, raw: 'A,"x\ry"' },
      { line: 4, raw: 'B,"a""b",c' },
      { line: 6, raw: 'C,"open' },
      { line: 7, raw: "D" },
    ]);
  });

  for (const [name, base] of [["the demo lexicon", BASE], ["a CRLF lexicon with ids", WITH_IDS]] as const) {
    it(`mutations of ${name}: nothing lost, everything positioned`, async () => {
      await fc.assert(
        fc.asyncProperty(
          mutatedBytes(base).chain((bytes) => chunksOf(bytes).map((chunks) => ({ bytes, chunks }))),
          async ({ bytes, chunks }) => {
            const text = new TextDecoder().decode(bytes);
            const { items, diagnostics } = await read(chunks);
            const fatal = diagnostics.some((d) => d.severity === "error");
            const expected = referenceRecords(text);
            writeFileSync(SCRATCH, bytes);
            const counted = await countInputRecords(SCRATCH);
            expect(counted.lines).toEqual(expected.map((r) => r.line));
            if (fatal) {
              // a header that cannot be read stops the file: nothing is yielded, and it says where
              expect(items).toEqual([]);
            } else {
              expect(items.length).toBe(expected.length);
              // the same records, in order, each at its line: a row's or reject's raw text is its own record
              expect(items.map((x) => x.line === undefined)).not.toContain(true);
              const lines = ownLines(text);
              items.forEach((x, k) => {
                const ref = expected[k]!;
                if (x.kind === "row") {
                  expect([x.line, x.raw]).toEqual([ref.line, ref.raw]);
                } else {
                  expect(x.raw).toBe(ref.raw);
                  expect(x.line).toBeGreaterThanOrEqual(ref.line);
                  expect(lines[ref.line - 1]).toBe(ref.raw.split("\r")[0]);
                }
              });
            }
            expectPositionedInside(
              [...items.filter((x) => x.kind === "reject"), ...diagnostics].map((d) => ({ file: "fuzz.csv", line: d.line, column: d.column, code: "code" in d ? d.code : "" })),
              text,
              "fuzz.csv",
            );
          },
        ),
        { numRuns: 1000, timeout: 10_000 },
      );
    }, 300_000);
  }
});
