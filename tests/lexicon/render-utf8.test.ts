// The TSV fast path (lexicon/narrow-tsv.ts, render.ts `renderIpaUtf8`) writes exactly the bytes of
// the path through strings: renderIpa, the writability check, TSV escaping and UTF-8 encoding. On
// random symbol views (texts with spaces, backslashes, tabs, surrogates, white space of every kind),
// random grammars and words, the shipped en-us grammar on a CMU slice, and rows made to need the
// slow path (phrases, compounds, unwritable words, ids, homographs), each line is the same.

import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { renderIpa, renderIpaUtf8, utf8Bound, type SymbolView } from "../../src/lexicon/render.js";
import { plsTextProblem } from "../../src/emit/pls.js";
import { ByteChunks } from "../../src/emit/bytes.js";
import { putTsvEntry } from "../../src/emit/tsv-batch.js";
import { putNarrowTsv } from "../../src/lexicon/narrow-tsv.js";
import { narrowForms } from "../../src/lexicon/runner.js";
import { machineEngine, type MachineEngine } from "../../src/lexicon/engine-machine.js";
import { readLexicon, type LexiconRow } from "../../src/lexicon/read.js";
import { WORD_EDGE, type Word } from "../../src/interp/index.js";
import { arbGrammar, arbInventory, arbWord } from "../support/arb-grammar.js";
import { variety } from "../lexicons/harness.js";

const utf8 = (s: string): string => Buffer.from(s, "utf8").toString("hex");

/** A random symbol view: ids 0–3 as the alphabet has them (ε, '#', '.', '+'), then segments. */
const arbView = fc
  .array(
    fc.record({
      text: fc.oneof(
        fc.constantFrom("p", "tʰ", "ɪ̃", "aɪ", "ə", "ɫ̩", "t͡ʃ", "x\\y", "a b", "\t", "\u3000", "\u00a0", "", "𝄞", "\ud800", "ˈ", "&<"),
        fc.string({ maxLength: 3 }),
      ),
      stress: fc.constantFrom(0, 0, 1, 2),
      nucleus: fc.boolean(),
    }),
    { minLength: 1, maxLength: 12 },
  )
  .map((segs): SymbolView => {
    const n = 4 + segs.length;
    const kind = new Uint8Array(n);
    kind[1] = 1;
    kind[2] = 2;
    kind[3] = 4;
    const stress = new Uint8Array(n);
    const nucleus = new Uint8Array(n);
    const texts = ["", "#", ".", "+"];
    segs.forEach((s, i) => {
      kind[4 + i] = 3;
      texts.push(s.text);
      if (s.nucleus) {
        nucleus[4 + i] = 1;
        stress[4 + i] = s.stress;
      }
    });
    return { texts, kind, stress, nucleus };
  });

describe("renderIpaUtf8", () => {
  test("writes renderIpa's text as UTF-8, or -1; what it writes needs no escape and no check (property)", () => {
    let written = 0;
    let left = 0;
    fc.assert(
      fc.property(
        arbView.chain((view) => fc.tuple(fc.constant(view), fc.array(fc.nat(view.texts.length - 1), { maxLength: 14 }), fc.boolean(), fc.boolean())),
        ([view, ids, syllables, joins]) => {
          const opts = { syllables, joins };
          const buf = new Uint8Array(utf8Bound(ids, view) + 8).fill(0xee);
          const end = renderIpaUtf8(ids, view, opts, buf, 3);
          const text = renderIpa(ids, view, opts);
          if (end < 0) {
            left++;
            return;
          }
          written++;
          expect(Buffer.from(buf.subarray(3, end)).toString("hex")).toBe(utf8(text));
          expect(end).toBeLessThanOrEqual(3 + utf8Bound(ids, view));
          expect(plsTextProblem(text)).toBeUndefined();
          expect(text).not.toMatch(/[\\\t\n\r ]/);
        },
      ),
      { numRuns: 3000 },
    );
    // Both branches are taken often enough to mean something.
    expect(written).toBeGreaterThan(300);
    expect(left).toBeGreaterThan(300);
  });

  test("leaves a phrase (a space between words) to the text", () => {
    const view: SymbolView = { texts: ["", "#", ".", "+", "a"], kind: Uint8Array.from([0, 1, 2, 4, 3]), stress: new Uint8Array(5), nucleus: Uint8Array.from([0, 0, 0, 0, 1]) };
    expect(renderIpa([4, 1, 4], view)).toBe("a a");
    expect(renderIpaUtf8([4, 1, 4], view, {}, new Uint8Array(32), 0)).toBe(-1);
    expect(renderIpaUtf8([1, 4, 2, 4, 1], view, {}, new Uint8Array(32), 0)).toBe(3);
  });
});

/** The line putNarrowTsv writes for a row, or null when it leaves the row to the caller. */
function fast(engine: MachineEngine, row: LexiconRow, n: number): string | null {
  const got: Uint8Array[] = [];
  const out = new ByteChunks((c) => void got.push(c.slice()));
  if (!putNarrowTsv(out, engine, row, n)) {
    out.flush();
    expect(got.reduce((k, c) => k + c.length, 0)).toBe(0);
    return null;
  }
  out.flush();
  return Buffer.concat(got).toString("hex");
}

/** The line the path through strings writes, or null for a reject. */
function slow(engine: MachineEngine, row: LexiconRow, n: number): string | null {
  const t = narrowForms(engine, row);
  if ("kind" in t) return null;
  const got: Uint8Array[] = [];
  const out = new ByteChunks((c) => void got.push(c.slice()));
  putTsvEntry(out, row.id, n, row.word, t.narrow, t.broad);
  out.flush();
  return Buffer.concat(got).toString("hex");
}

const rowOf = (word: string, symbols: Word, id?: string): LexiconRow =>
  ({ kind: "row", file: "t.csv", line: 2, word, pron: "x", pronColumn: 1, tags: [], symbols, raw: "", stressMarked: false, ...(id !== undefined ? { id } : {}) }) as LexiconRow;

describe("putNarrowTsv", () => {
  test("writes the line of the path through strings, or leaves the row to it (random grammars, property)", () => {
    let fastLines = 0;
    fc.assert(
      fc.property(
        arbGrammar({ maxRules: 4 }),
        fc.array(fc.tuple(arbWord(arbInventory, { maxLength: 6 }), fc.constantFrom("w", "a b", "x\\y", "t\tu", "\u0001", "ok"), fc.option(fc.constantFrom("id1", "", "i\\d")), fc.nat(12)), { minLength: 1, maxLength: 10 }),
        ({ grammar }, rows) => {
          const { engine } = machineEngine(grammar, arbInventory);
          if (engine === undefined) return;
          for (const [w, word, id, n] of rows) {
            const symbols = w[0] === WORD_EDGE ? w.slice(1, -1) : w;
            const row = rowOf(word, symbols, id ?? undefined);
            const f = fast(engine, row, n + 1);
            if (f === null) continue;
            fastLines++;
            expect(f).toBe(slow(engine, row, n + 1));
          }
        },
      ),
      { numRuns: 150 },
    );
    expect(fastLines).toBeGreaterThan(100);
  });

  test("the en-us grammar on a CMU slice and on rows that need the slow path: the same lines", async () => {
    const v = variety("grammar.strata");
    const { engine } = machineEngine(v.grammar, v.inventory);
    const csv = new URL("../fixtures/speed/cmu-slice.csv", import.meta.url).pathname;
    let fastLines = 0;
    let all = 0;
    for await (const item of readLexicon(csv, { inventory: v.inventory })) {
      if (item.kind !== "row") continue;
      all++;
      const f = fast(engine!, item, 1);
      if (f !== null) fastLines++;
      expect(f ?? slow(engine!, item, 1)).toBe(slow(engine!, item, 1));
    }
    expect(fastLines).toBe(all);
    // A phrase, a compound and a word PLS cannot hold take the slow path.
    const { Readable } = await import("node:stream");
    const text = "word,pron\nice cream,ˈaɪs # ˈkɹim\nairport,ˈɛɹ#ˌpɔɹt\n\"a\u0001\",ˈeɪ\n";
    for await (const item of readLexicon(Readable.from([text]), { inventory: v.inventory })) {
      if (item.kind !== "row") continue;
      expect(fast(engine!, item, 1)).toBeNull();
    }
  });
});
