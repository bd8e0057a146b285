// Tests of the line formatters: TSV escaping, JSON Lines key order and escaping, CSV quoting.

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parse } from "csv-parse/sync";
import { escapeTsvField, formatTsvEntry, tsvHeader, tsvLine, unescapeTsvField } from "../../src/emit/tsv.js";
import { formatJsonLine } from "../../src/emit/jsonl.js";
import { csvField, csvLine, csvLineStringified } from "../../src/emit/csv.js";

describe("TSV", () => {
  it("writes word, narrow and broad in that order under a header", () => {
    expect(tsvHeader()).toBe("key\tword\tnarrow\tbroad\n");
    expect(formatTsvEntry({ key: "ct0200", word: "Sallowmede", narrow: "ˈsæ.ɫoʊ.ˌmid", broad: "ˈsæ.loʊ.ˌmid" })).toBe("ct0200\tSallowmede\tˈsæ.ɫoʊ.ˌmid\tˈsæ.loʊ.ˌmid\n");
  });

  it("escapes tab, line feed, carriage return and backslash", () => {
    expect(escapeTsvField("a\tb\nc\rd\\e")).toBe("a\\tb\\nc\\rd\\\\e");
    expect(escapeTsvField("ˈkʰæt")).toBe("ˈkʰæt");
  });

  it("never lets a field break the line or the columns, and unescapes back (property)", () => {
    fc.assert(
      fc.property(fc.array(fc.string({ unit: "binary", maxLength: 10 }), { minLength: 1, maxLength: 4 }), (fields) => {
        const line = tsvLine(fields);
        expect(line.endsWith("\n")).toBe(true);
        const body = line.slice(0, -1);
        expect(body).not.toMatch(/[\n\r]/);
        expect(body.split("\t").map(unescapeTsvField)).toEqual(fields);
      }),
      { numRuns: 300 },
    );
  });
});

describe("JSON Lines", () => {
  it("writes keys in a fixed order, leaving out absent optional ones", () => {
    const line = formatJsonLine({ rules: ["flap"], variants: ["ˈwɔ.ɾɚ", "ˈwɔ.tɚ"], broad: "ˈwɔ.tɚ", narrow: "ˈwɔ.ɾɚ", word: "water" });
    expect(line).toBe('{"word":"water","narrow":"ˈwɔ.ɾɚ","broad":"ˈwɔ.tɚ","variants":["ˈwɔ.ɾɚ","ˈwɔ.tɚ"],"rules":["flap"]}\n');
    const withAll = formatJsonLine({
      input: { pron: "b", tags: [] }, variantSteps: [["r"]], derivation: [{ step: "r", form: "n" }], word: "w", id: "7", narrow: "n", broad: "b", variants: ["n"], rules: ["r"], source: { file: "demo.csv", line: 3 }, key: "7",
    });
    expect(Object.keys(JSON.parse(withAll) as object)).toEqual(["key", "word", "narrow", "broad", "variants", "rules", "id", "source", "derivation", "variantSteps", "input"]);
  });

  it("is always one line of JSON that parses back (property)", () => {
    fc.assert(
      fc.property(fc.string({ unit: "binary", maxLength: 12 }), fc.array(fc.string({ unit: "binary", maxLength: 6 }), { maxLength: 3 }), (w, vs) => {
        const line = formatJsonLine({ word: w, narrow: w, broad: w, variants: vs, rules: vs });
        const body = line.slice(0, -1);
        // RFC 8259 §7 allows U+2028/U+2029 raw; we escape them so no line reader splits the record
        expect(body).not.toMatch(/[\n\r\u2028\u2029]/);
        const back = JSON.parse(body) as { word: string; variants: string[] };
        expect(back.word).toBe(w);
        expect(back.variants).toEqual(vs);
      }),
      { numRuns: 300 },
    );
  });
});

describe("CSV", () => {
  it("quotes only when needed, and always a leading # (our comment marker)", () => {
    // RFC 4180 §2 rules 6 and 7: fields with commas, quotes or line breaks are quoted; quotes doubled
    expect(csvField("plain")).toBe("plain");
    expect(csvField("a,b")).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField("#hashtag")).toBe('"#hashtag"');
    expect(csvField(" padded")).toBe('" padded"');
    expect(csvField("")).toBe("");
  });

  it("round-trips through csv-parse (property)", () => {
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 8 }), { minLength: 2, maxLength: 5 }), (fields) => {
        const back = parse(csvLine(fields), { relax_quotes: true }) as string[][];
        expect(back).toEqual([fields]);
      }),
      { numRuns: 300 },
    );
  });

  it("writes every record as csv-stringify does, plain fields included (property)", () => {
    // The characters that decide quoting (delimiter, quote, line breaks, '#', space, tab) made common.
    const field = fc.array(fc.oneof(fc.constantFrom(",", '"', "\n", "\r", "#", " ", "\t", "a", "ˈ", ""), fc.string({ maxLength: 3 })), { maxLength: 5 }).map((a) => a.join(""));
    fc.assert(
      fc.property(fc.array(field, { maxLength: 6 }), (fields) => {
        expect(csvLine(fields)).toBe(csvLineStringified(fields));
      }),
      { numRuns: 2000 },
    );
    for (const f of [[], [""], ["", ""], ["a b", "x#", "#x"], ["a ", "b"], ["\tb"], ["ʰ", "1", "note"]]) expect(csvLine(f)).toBe(csvLineStringified(f));
  });
});
