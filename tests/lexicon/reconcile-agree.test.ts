// The build's reconciliation counts a lexicon's records with its own splitter (lexicon/reconcile.ts);
// the reader has another (lexicon/records.ts). Both state the same record grammar (README, "The
// lexicon CSV"), so on any text they must find the same data records on the same lines — or a
// correct build would be refused as unreconciled.

import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { countInputRecords } from "../../src/lexicon/reconcile.js";
import { splitRecords } from "../../src/lexicon/records.js";
import { useSeed } from "../fuzz/seed.js";

useSeed("lexicon/reconcile-agree", 51_202);

/** Texts made of the characters the grammar cares about, plus a little of everything else. */
const piece = fc.constantFrom("word,pron\n", "a", "ab", ",", '"', '""', "\r", "\n", "\r\n", "#", " ", "\t", "\ufeff", "é", "x,y", "\u00a0");
const text = fc.array(piece, { maxLength: 40 }).map((ps) => ps.join(""));

describe("record counters agree", () => {
  const dir = mkdtempSync(join(tmpdir(), "strata-agree-"));
  it("reconcile's splitter and the reader's splitter find the same data records", async () => {
    let k = 0;
    await fc.assert(
      fc.asyncProperty(text, async (t) => {
        const p = join(dir, `t${k++}.csv`);
        writeFileSync(p, t);
        const mine = await countInputRecords(p);
        const records = splitRecords(t).filter((r) => r.kind === "data");
        const theirs = records.slice(1).map((r) => r.line);
        expect(mine.lines).toEqual(theirs);
        expect(mine.count).toBe(theirs.length);
      }),
      { numRuns: 400 },
    );
  });

  it("found by the property above: a text that starts with an empty line (and has no CR) splits into that blank line and the rest", () => {
    expect(splitRecords("\nword,pron\n").map((r) => [r.line, r.kind, r.raw])).toEqual([[1, "blank", ""], [2, "data", "word,pron"]]);
  });
});
