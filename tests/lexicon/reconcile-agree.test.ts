// The build's reconciliation counts a lexicon's records with its own splitter (lexicon/reconcile.ts);
// the reader has another (lexicon/records.ts). Both state the same record grammar (README, "The
// lexicon CSV"), so on any text they must find the same data records on the same lines — or a
// correct build would be refused as unreconciled.

import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { countInputRecords, countInputRecordsText } from "../../src/lexicon/reconcile.js";
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

  it("the count read on bytes gives what the whole-text reading gives: lines and words (property)", async () => {
    // NFC cases from Unicode UAX #15: e + U+0301 composes to U+00E9; U+212B ANGSTROM SIGN becomes U+00C5.
    const wordy = fc.constantFrom("word,pron\n", "pron,word\n", "e\u0301", "\u212b", "ˈ", " x ", "\u00a0y", ",", "\n", "\r", '"', "#", "\ufeff", "z");
    let k = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(wordy, { maxLength: 40 }), fc.uint8Array({ maxLength: 6 }), fc.nat(40), async (ps, junk, at) => {
        // Bytes that are not UTF-8 too (both readings decode them with U+FFFD in the same places).
        const bytes = Buffer.from(ps.join(""));
        const cut = Math.min(at, bytes.length);
        const p = join(dir, `b${k++}.csv`);
        writeFileSync(p, Buffer.concat([bytes.subarray(0, cut), junk, bytes.subarray(cut)]));
        expect(await countInputRecords(p)).toEqual(await countInputRecordsText(p));
      }),
      { numRuns: 400 },
    );
  });

  it("reads a file of several read buffers with characters across their edges as the whole-text reading does", async () => {
    const p = join(dir, "big.csv");
    // CR LF line ends, and lone CRs that the byte reading leaves to the text reading.
    const lines = ["word,pron"];
    for (let i = 0; lines.length < 70_000; i++) lines.push(`wörd${i}e\u0301,ˈp ɹ ɒ n${i % 3 === 0 ? "\r" : ""}${i % 5 === 1 ? "\r# a comment after a lone CR" : ""}`);
    writeFileSync(p, lines.join("\n"));
    const got = await countInputRecords(p);
    expect(got).toEqual(await countInputRecordsText(p));
    expect(got.count).toBe(69_999);
    expect(got.words[0]).toBe("wörd0\u00e9");
  });

  it("found by the property above: a text that starts with an empty line (and has no CR) splits into that blank line and the rest", () => {
    expect(splitRecords("\nword,pron\n").map((r) => [r.line, r.kind, r.raw])).toEqual([[1, "blank", ""], [2, "data", "word,pron"]]);
  });
});
