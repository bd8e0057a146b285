// The reader's field splitting (`lineFields`) against csv-parse, which it replaces in the common
// case: on random lines (commas, quotes, doubled quotes, white space, non-ASCII letters), every line
// that passes the reader's quoting check has the fields csv-parse gives it, both read alone and
// inside a whole file read the way the reader used to call csv-parse (one record per line).

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parse } from "csv-parse/sync";
import { checkQuoting, lineFields } from "../../src/lexicon/read.js";

// A run's seed (set STRATA_FC_SEED to replay one), printed first; fixed under CI.
const SEED = Number(process.env["STRATA_FC_SEED"] ?? (process.env["CI"] ? 731905 : Date.now() % 2 ** 31));
fc.configureGlobal({ seed: SEED });
process.stderr.write(`lexicon/read-fields: fast-check seed ${SEED}\n`);

const OPTIONS = { record_delimiter: "\n", relax_quotes: true, relax_column_count: true, skip_empty_lines: true } as const;
const piece = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom("tram", "ˈtræm", "t ɹ æ m", "é", "x", " ", "", "#", "'", "ɡ", "\t") },
  { weight: 4, arbitrary: fc.constantFrom(",", ",,", '"', '""', '"a,b"', '"a""b"', "a\"b") },
  { weight: 1, arbitrary: fc.string({ maxLength: 3 }).map((s) => s.replace(/[\n\r]/g, "")) },
);
const line = fc.array(piece, { minLength: 1, maxLength: 10 }).map((p) => p.join("")).filter((l) => l.trim() !== "");

describe("lineFields", () => {
  it("gives csv-parse's fields for every line the quoting check accepts", () => {
    let split = 0;
    fc.assert(
      fc.property(line, (raw) => {
        if (!checkQuoting(raw).ok) return;
        const got = lineFields(raw);
        const want = parse(raw + "\n", OPTIONS) as string[][];
        expect(got).toEqual({ ok: true, fields: want[0] });
        if (!raw.includes('"')) split++;
      }),
      { numRuns: 4000 },
    );
    expect(split).toBeGreaterThan(200);
  });

  it("gives, line by line, the records csv-parse reads from the whole file", () => {
    fc.assert(
      fc.property(fc.array(line, { minLength: 1, maxLength: 30 }), (lines) => {
        const ok = lines.filter((l) => checkQuoting(l).ok);
        if (ok.length === 0) return;
        const whole = parse(ok.join("\n") + "\n", OPTIONS) as string[][];
        expect(ok.map((l) => lineFields(l))).toEqual(whole.map((fields) => ({ ok: true, fields })));
      }),
      { numRuns: 500 },
    );
  });

  it("reads a carriage return inside a line as an ordinary character", () => {
    expect(lineFields("a\rb,c")).toEqual({ ok: true, fields: ["a\rb", "c"] });
  });
});
