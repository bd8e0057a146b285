// The reader's fast path (src/lexicon/row.ts) against the general path it stands in for (fields.ts
// and `readRow`): the same fields on every plain record, and the same rows, rejects and remembered
// ids on random files, plain or not.

import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { loadInventory } from "../../src/inventory/index.js";
import { checkQuoting, findForbidden, idBook, readHeaderRecord, readRow, recordTaker, type LexiconItem } from "../../src/lexicon/read.js";
import { plainFieldEnds } from "../../src/lexicon/row.js";
import type { Diagnostic } from "../../src/diagnostics.js";

const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 415263 : Date.now() % 2 ** 31));
console.log(`row.test: fast-check seed ${SEED} (STRATA_FC_SEED replays it)`);

const ROOT = resolve(__dirname, "../..");
const inv = loadInventory(join(ROOT, "lexicons", "en-us", "segments.csv")).inventory!;

// Pieces of records: IPA of the en-us inventory, stress marks, separators, quotes, spaces, tags,
// characters the reader refuses, a surrogate pair and lone halves, non-ASCII spellings.
const PIECES = ["k", "æ", "t", "ə", "ˈ", "ˌ", ".", "#", "ɹ", "oʊ", "aɪ", "x", " ", "\t", ",", ",", ",", '"', '""', "weak", "noun", ";", "a", "é", "e\u0301", "\u0000", "\u0085", "\ufeff", "\ufffd", "😀", "\ud800", "id1", "id2"];
const record = fc.array(fc.constantFrom(...PIECES), { minLength: 1, maxLength: 12 }).map((p) => p.join(""));

describe("the plain fields splitter", () => {
  it("gives checkQuoting's fields (values and columns) for every record it takes", () => {
    fc.assert(
      fc.property(record, fc.integer({ min: 1, max: 7 }), (raw, most) => {
        const ends: number[] = [];
        const n = plainFieldEnds(raw, most, ends);
        const q = checkQuoting(raw);
        if (n === undefined) {
          // It leaves a record only for a reason: a quote, a refused character, a surrogate or too many fields.
          expect(raw.includes('"') || findForbidden(raw) !== undefined || /[\ud800-\udfff]/.test(raw) || (q.ok && q.fields.length > most)).toBe(true);
          return;
        }
        expect(findForbidden(raw)).toBeUndefined();
        expect(q.ok).toBe(true);
        if (!q.ok) return;
        expect(q.fields.length).toBe(n);
        for (let k = 0; k < n; k++) {
          const from = k === 0 ? 0 : ends[k - 1]! + 1;
          expect(q.fields[k]).toEqual({ value: raw.slice(from, ends[k]), column: from + 1, quoted: false });
        }
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });
});

const HEADERS = ["word,pron", "word,pron,id", "id,word,pron,tags,pos,note", "pron,word,tags", "word,pron,note"];

/** The general path alone, as `recordTaker` took records before the fast path. */
function general(header: string, lines: readonly string[]): LexiconItem[] {
  const out: Diagnostic[] = [];
  const h = readHeaderRecord({ line: 1, lines: 1, raw: header, kind: "data" }, "x.csv", out)!;
  const ids = idBook();
  return lines.map((raw, i) => {
    const line = i + 2;
    const bad = findForbidden(raw);
    if (bad !== undefined) return { kind: "reject", file: "x.csv", line, column: bad.column, code: bad.code, reason: bad.reason, raw };
    const q = checkQuoting(raw);
    if (!q.ok) return { kind: "reject", file: "x.csv", line, column: q.column, code: q.code, reason: q.reason, raw };
    return readRow(inv, "x.csv", { line, raw, fields: q.fields }, q.fields.map((f) => f.value), h.map, h.fields, ids);
  });
}

function taken(header: string, lines: readonly string[]): LexiconItem[] {
  const stats = { commentLines: 0, blankLines: 0, headerLine: 0, dataLines: 0 };
  const t = recordTaker(inv, "x.csv", stats, [], idBook());
  t.take({ line: 1, lines: 1, raw: header, kind: "data" });
  return lines.map((raw, i) => t.take({ line: i + 2, lines: 1, raw, kind: "data" })!);
}

describe("the reader's fast path", () => {
  it("gives the general path's rows and rejects, in order, on random files", () => {
    // Records made of fields: mostly well-formed rows (so the fast path is taken), some of anything.
    const field = fc.oneof(
      { weight: 4, arbitrary: fc.constantFrom("kˈæt", "ðə", "ˈeɪ.bəl", "kæt # ˈæt", " kæt ", "ˈkæt", "tˌi", "ˈˈk", "q", "") },
      { weight: 2, arbitrary: fc.constantFrom("cat", "the", " é ", "Zoë", "weak", "noun weak", "id1", "id2", "id1 ", "") },
      { weight: 1, arbitrary: record },
    );
    const line = fc.array(field, { minLength: 1, maxLength: 7 }).map((f) => f.join(","));
    fc.assert(
      fc.property(fc.constantFrom(...HEADERS), fc.array(line, { minLength: 1, maxLength: 12 }), (header, lines) => {
        const ok = lines.filter((l) => !/^[ \t]*$/.test(l) && !l.startsWith("#"));
        expect(taken(header, ok)).toEqual(general(header, ok));
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });

  it("takes the usual rows (so the comparison above is not empty)", () => {
    const lines = ["cat,kˈæt,c1,noun,,a note", "the,ðə,,,weak,", "cat,kæt,c2,,,"];
    const ends: number[] = [];
    for (const l of lines) expect(plainFieldEnds(l, 6, ends)).toBe(6);
    expect(taken("word,pron,id,pos,tags,note", lines)).toEqual(general("word,pron,id,pos,tags,note", lines));
    expect(taken("word,pron,id", ["a,kæt,x", "b,kæt,x"]).map((r) => r.kind)).toEqual(["row", "reject"]);
  });
});
