// TSV lines put straight into byte chunks (src/emit/tsv-batch.ts) against `formatTsvEntry` encoded
// by TextEncoder: the same bytes for any fields (escapes, non-ASCII, astral characters, lone
// surrogates), small chunks and lines longer than a chunk included; and `putTsvLine`, the same
// line with its key as given (a build's entries), likewise.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ByteChunks } from "../../src/emit/bytes.js";
import { formatTsvEntry } from "../../src/emit/tsv.js";
import { putTsvEntry, putTsvLine } from "../../src/emit/tsv-batch.js";

const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 415263 : Date.now() % 2 ** 31));
console.log(`tsv-batch.test: fast-check seed ${SEED} (STRATA_FC_SEED replays it)`);

const text = fc.array(fc.constantFrom("a", "Z", "#", "\\", "\t", "\n", "\r", "ˈ", "ə", "é", "\u0800", "\uffff", "😀", "\ud800", "\udc00", " ", "ʃ"), { maxLength: 30 }).map((p) => p.join(""));

const joined = (parts: Uint8Array[]): Uint8Array => {
  const out = new Uint8Array(parts.reduce((k, p) => k + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
};

describe("putTsvEntry", () => {
  it("puts the bytes of formatTsvEntry's line", () => {
    const entry = fc.record({ id: fc.option(text, { nil: undefined }), n: fc.integer({ min: 1, max: 1234 }), word: text, narrow: text, broad: text });
    fc.assert(
      fc.property(fc.array(entry, { minLength: 1, maxLength: 8 }), fc.constantFrom(64, 256, 1 << 16), (entries, size) => {
        const got: Uint8Array[] = [];
        const chunks = new ByteChunks((c) => void got.push(c.slice()), size);
        let want = "";
        for (const e of entries) {
          putTsvEntry(chunks, e.id, e.n, e.word, e.narrow, e.broad);
          const key = e.id !== undefined && e.id !== "" ? e.id : `${e.word}#${e.n}`;
          want += formatTsvEntry({ key, word: e.word, narrow: e.narrow, broad: e.broad });
        }
        chunks.flush();
        expect(joined(got)).toEqual(new TextEncoder().encode(want));
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });

  it("puts the bytes of formatTsvEntry's line with the key as given (putTsvLine), and says where the line starts", () => {
    const entry = fc.record({ key: text, word: text, narrow: text, broad: text });
    fc.assert(
      fc.property(fc.array(entry, { minLength: 1, maxLength: 8 }), fc.constantFrom(64, 256, 1 << 16), (entries, size) => {
        const got: Uint8Array[] = [];
        const chunks = new ByteChunks((c) => void got.push(c.slice()), size);
        for (const e of entries) {
          const at = putTsvLine(chunks, e);
          const line = new TextEncoder().encode(formatTsvEntry(e));
          // The line is where it says (it went in as text when -1).
          if (at >= 0) expect(chunks.target.slice(at, chunks.position)).toEqual(line);
        }
        chunks.flush();
        expect(joined(got)).toEqual(new TextEncoder().encode(entries.map(formatTsvEntry).join("")));
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });
});
