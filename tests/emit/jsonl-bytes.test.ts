// JSON Lines records written as bytes (emit/jsonl-bytes.ts) against the text writer (emit/jsonl.ts):
// on random records of random strings (quotes, backslashes, control characters, astral-plane
// characters, lone surrogates, U+2028/U+2029) the bytes are `jsonRecord(...) + "\n"` as UTF-8, in
// small chunks (records cut across them, or too long for one) as in large.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ByteChunks } from "../../src/emit/bytes.js";
import { jsonRecord, type JsonlEntry } from "../../src/emit/jsonl.js";
import { putJsonRecord, putJsonString } from "../../src/emit/jsonl-bytes.js";

const special = fc.constantFrom('"', "\\", "\u0000", "\u001f", "\b", "\f", "\n", "\r", "\t", "\u007f", "\u0080", "\u07ff", "\u0800", "\uffff", "\u2028", "\u2029", "\ud800", "\udbff", "\udc00", "\udfff", "\ud83d\ude00", "ˈ", "ɾ", "/");
const text = fc.oneof(
  fc.string({ unit: "binary", maxLength: 12 }),
  fc.string({ unit: "grapheme", maxLength: 8 }),
  fc.array(fc.oneof(special, fc.string({ unit: "binary-ascii", maxLength: 3 })), { maxLength: 8 }).map((xs) => xs.join("")),
);
const texts = fc.array(text, { maxLength: 4 });

type Rec = Omit<JsonlEntry, "source">;
const entry: fc.Arbitrary<Rec> = fc.record(
  {
    key: text, word: text, narrow: text, broad: text, variants: texts, rules: texts, id: text,
    derivation: fc.array(fc.record({ step: text, form: text }), { maxLength: 3 }),
    variantSteps: fc.array(texts, { maxLength: 3 }),
    input: fc.record({ pron: text, pos: text, tags: texts }, { requiredKeys: ["pron", "tags"] }),
    capped: fc.boolean(), ambiguous: fc.boolean(),
  },
  { requiredKeys: ["word", "narrow", "broad", "variants", "rules"] },
);
// As the engines make them: the narrow form is the first variant and the last derivation form, the
// rules array is the first variant's steps (the writer copies the bytes it wrote for them).
const shared: fc.Arbitrary<Rec> = entry.map((e) => ({
  ...e,
  variants: [e.narrow, ...e.variants, e.narrow],
  derivation: [...(e.derivation ?? []), { step: "last", form: e.narrow }],
  variantSteps: [e.rules, ...(e.variantSteps ?? []), e.rules],
}));
const record = fc.oneof(entry, shared);
const source = fc.option(fc.record({ file: text, line: fc.nat() }), { nil: undefined });

/** Everything `write` puts into chunks of `size` bytes, as one buffer. */
function bytesOf(size: number, write: (out: ByteChunks) => void): Buffer {
  const chunks: Uint8Array[] = [];
  const out = new ByteChunks((c) => chunks.push(c.slice()), size);
  write(out);
  out.flush();
  return Buffer.concat(chunks);
}

describe("JSON Lines records as bytes", () => {
  it("are jsonRecord's line as UTF-8 (property)", () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(record, source), { minLength: 1, maxLength: 4 }), fc.constantFrom(64, 300, 1 << 16), (recs, size) => {
        const got = bytesOf(size, (out) => {
          for (const [e, src] of recs) putJsonRecord(out, e, src?.file, src?.line);
        });
        const want = Buffer.from(recs.map(([e, src]) => jsonRecord(e, src?.file, src?.line) + "\n").join(""), "utf8");
        expect(got.equals(want)).toBe(true);
      }),
      { numRuns: 2000 },
    );
  });

  it("give the record's start in the chunk, or -1 when it went in as text", () => {
    const e: Rec = { key: "kèy#1", word: "kèy", narrow: "ˈkʰiː", broad: "ˈki", variants: ["ˈkʰiː"], rules: ["aspiration"] };
    const want = Buffer.from(jsonRecord(e, "a.csv", 7) + "\n", "utf8");
    bytesOf(1 << 16, (out) => {
      out.push("abc");
      const start = putJsonRecord(out, e, "a.csv", 7);
      expect(start).toBe(3);
      expect(Buffer.from(out.target.subarray(start, out.position)).equals(want)).toBe(true);
    });
    // A chunk too small for the record's bound: the text writer's line goes in instead.
    const small = bytesOf(64, (out) => expect(putJsonRecord(out, e, "a.csv", 7)).toBe(-1));
    expect(small.equals(want)).toBe(true);
  });

  it("escape a string as JSON.stringify does (property)", () => {
    fc.assert(
      fc.property(text, (s) => {
        const buf = new Uint8Array(6 * s.length + 2);
        const end = putJsonString(buf, 0, s);
        const want = JSON.stringify(s).replace(/\u2028/g, "\\u2028").replace(/\u2029/g, "\\u2029");
        expect(Buffer.from(buf.subarray(0, end)).toString("utf8")).toBe(want);
      }),
      { numRuns: 3000 },
    );
  });
});
