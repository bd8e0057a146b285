// Utf8Decoder (src/files.ts) against node:string_decoder, which the readers used before: the same
// text for any bytes cut into chunks anywhere, ill-formed sequences included (each ill-formed
// sequence one U+FFFD, as the Encoding Standard's UTF-8 decoder gives it; a byte-order mark kept).

import { StringDecoder } from "node:string_decoder";
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { Utf8Decoder } from "../src/files.js";

/** Pieces of text: random bytes, characters of one to four bytes, and sequences cut short or ill-formed. */
const piece = fc.oneof(
  fc.uint8Array({ maxLength: 8 }),
  fc.constantFrom(...["a,b\n", "é", "ɪ̃", "ˈ", "𝄞", "\uFEFF", "\r\n"].map((s) => new Uint8Array(Buffer.from(s)))),
  // cut short (of 4, 3 and 2 bytes), an encoded surrogate, past U+10FFFF, an overlong NUL, a lone continuation byte
  fc.constantFrom(...[[0xf0, 0x9d], [0xe2, 0x82], [0xc3], [0xed, 0xa0, 0x80], [0xf4, 0x90, 0x80, 0x80], [0xc0, 0x80], [0x80]].map((b) => Uint8Array.from(b))),
);

const cut = (bytes: Uint8Array, at: readonly number[]): Uint8Array[] => {
  const ends = [...new Set(at.map((a) => Math.min(a, bytes.length)))].sort((a, b) => a - b);
  const chunks: Uint8Array[] = [];
  let from = 0;
  for (const e of ends) {
    chunks.push(bytes.subarray(from, e));
    from = e;
  }
  chunks.push(bytes.subarray(from));
  return chunks;
};

describe("Utf8Decoder", () => {
  test("gives node:string_decoder's text for any bytes in any chunks (property)", () => {
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 30 }), fc.array(fc.nat(60), { maxLength: 10 }), (pieces, at) => {
        const bytes = Buffer.concat(pieces);
        const chunks = cut(bytes, at);
        const old = new StringDecoder("utf8");
        const mine = new Utf8Decoder();
        let want = "";
        let got = "";
        for (const c of chunks) {
          want += old.write(Buffer.from(c));
          got += mine.write(c);
        }
        want += old.end();
        got += mine.end();
        expect(got).toBe(want);
        // Whole, in one call, the same again.
        expect(new Utf8Decoder().end(bytes)).toBe(want);
      }),
      { numRuns: 3000 },
    );
  });

  test("keeps a character split across chunks whole, and a byte-order mark", () => {
    const d = new Utf8Decoder();
    const bytes = Buffer.from("\uFEFFpʰɪ̃n");
    expect([d.write(bytes.subarray(0, 2)), d.write(bytes.subarray(2, 5)), d.write(bytes.subarray(5)), d.end()].join("")).toBe("\uFEFFpʰɪ̃n");
  });

  test("ends an unfinished character as U+FFFD, then starts afresh", () => {
    const d = new Utf8Decoder();
    expect(d.write(Uint8Array.from([0x61, 0xe2, 0x82]))).toBe("a");
    expect(d.end()).toBe("\uFFFD");
    expect(d.write(Buffer.from("é"))).toBe("é");
  });
});
