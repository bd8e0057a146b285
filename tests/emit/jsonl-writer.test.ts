// The JSON Lines record writer (emit/jsonl.ts) against JSON.stringify of the documented object: on random
// records of random strings (quotes, backslashes, control characters, astral-plane characters, lone
// surrogates, U+2028/U+2029) it writes the text JSON.stringify gives for the same object with the
// same key order, with only U+2028/U+2029 escaped in addition.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { formatJsonRecord, jsonRecord, type JsonlEntry } from "../../src/emit/jsonl.js";

/** What the writer must give: JSON.stringify of the record's object, keys in the documented order. */
function reference(e: JsonlEntry): string {
  const o: Record<string, unknown> = {};
  if (e.key !== undefined) o["key"] = e.key;
  o["word"] = e.word;
  o["narrow"] = e.narrow;
  o["broad"] = e.broad;
  o["variants"] = e.variants;
  o["rules"] = e.rules;
  if (e.id !== undefined) o["id"] = e.id;
  if (e.source !== undefined) o["source"] = { file: e.source.file, line: e.source.line };
  if (e.derivation !== undefined) o["derivation"] = e.derivation.map((d) => ({ step: d.step, form: d.form }));
  if (e.variantSteps !== undefined) o["variantSteps"] = e.variantSteps;
  if (e.input !== undefined) o["input"] = e.input.pos !== undefined ? { pron: e.input.pron, pos: e.input.pos, tags: e.input.tags } : { pron: e.input.pron, tags: e.input.tags };
  if (e.capped === true) o["capped"] = true;
  if (e.ambiguous === true) o["ambiguous"] = true;
  return JSON.stringify(o).replace(/\u2028/g, "\\u2028").replace(/\u2029/g, "\\u2029");
}

// Strings drawn from every kind of UTF-16 unit: "binary" gives any code point, lone surrogates
// and control characters included; the constants make the special cases frequent.
const special = fc.constantFrom('"', "\\", "\u0000", "\u001f", "\b", "\f", "\n", "\r", "\t", "\u007f", "\u2028", "\u2029", "\ud800", "\udfff", "\ud83d\ude00", "ˈ", "ɾ", "/");
const text = fc.oneof(
  fc.string({ unit: "binary", maxLength: 12 }),
  fc.string({ unit: "grapheme", maxLength: 8 }),
  fc.array(fc.oneof(special, fc.string({ unit: "binary-ascii", maxLength: 3 })), { maxLength: 8 }).map((xs) => xs.join("")),
);
const texts = fc.array(text, { maxLength: 4 });

const entry: fc.Arbitrary<JsonlEntry> = fc.record(
  {
    key: text, word: text, narrow: text, broad: text, variants: texts, rules: texts, id: text,
    source: fc.record({ file: text, line: fc.nat() }),
    derivation: fc.array(fc.record({ step: text, form: text }), { maxLength: 3 }),
    variantSteps: fc.array(texts, { maxLength: 3 }),
    input: fc.record({ pron: text, pos: text, tags: texts }, { requiredKeys: ["pron", "tags"] }),
    capped: fc.boolean(), ambiguous: fc.boolean(),
  },
  { requiredKeys: ["word", "narrow", "broad", "variants", "rules"] },
);

describe("JSON Lines record writer", () => {
  it("writes a record as JSON.stringify writes its object (property)", () => {
    fc.assert(
      fc.property(entry, (e) => {
        const line = formatJsonRecord(e);
        expect(line).toBe(reference(e));
        expect(line).not.toMatch(/[\n\r\u2028\u2029]/);
      }),
      { numRuns: 2000 },
    );
  });

  it("takes the source flat as the same record", () => {
    fc.assert(
      fc.property(entry, fc.record({ file: text, line: fc.nat() }), (e, src) => {
        const { source: _drop, ...rest } = e;
        expect(jsonRecord(rest, src.file, src.line)).toBe(reference({ ...rest, source: src }));
      }),
      { numRuns: 500 },
    );
  });
});
