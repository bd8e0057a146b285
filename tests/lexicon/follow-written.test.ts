// Reading a written file back while it is written (check-written.ts, `FollowedFiles`; readback.ts,
// `LineFeeder`): fed in steps of any size, as a file writer reports its bytes (emit/atomic.ts), the
// read-back is the one of the finished file read whole, also when the file is renamed after the
// last step; and a file that cannot be followed gives no read-back (the check then reads the
// finished file afresh). fast-check's seed is the run's (tests/support/fc-setup.ts).

import { appendFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { open } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { eachLineBytes, LineFeeder, readBackJsonl, readBackTsv } from "../../src/lexicon/readback.js";
import { FollowedFiles } from "../../src/lexicon/check-written.js";
import { writeFileAtomic } from "../../src/emit/atomic.js";

const dir = mkdtempSync(join(tmpdir(), "strata-follow-"));

const piece = fc.oneof(
  fc.constantFrom("\n", "\r\n", "\r", "é", "😀", "\t", '"word":"', '"source":{"file":"x.csv","line":12}', "ˈ"),
  fc.string({ maxLength: 5 }),
);

/** `bytes` cut at `cuts` (positions, any order, repeats allowed): the pieces in order. */
function cutAt(bytes: Buffer, cuts: readonly number[]): Buffer[] {
  const at = [...new Set(cuts.map((c) => c % (bytes.length + 1)))].sort((a, b) => a - b);
  const out: Buffer[] = [];
  let from = 0;
  for (const c of [...at, bytes.length]) {
    if (c > from) out.push(bytes.subarray(from, c));
    from = Math.max(from, c);
  }
  return out;
}

describe("a file read back while it is written", () => {
  it("fed in steps of any size (one buffer, grown for a longer line), gives the lines of the whole file (property)", async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(piece, { maxLength: 24 }), fc.array(fc.nat(), { maxLength: 8 }), fc.integer({ min: 1, max: 16 }), async (parts, cuts, size) => {
        const body = Buffer.from(parts.join(""), "utf8");
        const p = join(dir, `f${n++}.txt`);
        writeFileSync(p, "");
        const got: string[] = [];
        const lines = new LineFeeder((buf, start, end) => void got.push(buf.toString("utf8", start, end)), size);
        const h = await open(p, "r");
        try {
          let written = 0;
          for (const c of cutAt(body, cuts)) {
            appendFileSync(p, c);
            written += c.length;
            await lines.feed(h, written);
          }
          await lines.feed(h);
          lines.end();
        } finally {
          await h.close();
        }
        const whole: string[] = [];
        await eachLineBytes(p, (buf, start, end) => void whole.push(buf.toString("utf8", start, end)), size);
        expect(got).toEqual(whole);
      }),
      { numRuns: 300 },
    );
  });

  const jsonl = fc.array(
    fc.record({ word: fc.array(piece, { maxLength: 4 }).map((xs) => xs.join("")), line: fc.nat({ max: 200_000 }), file: fc.constantFrom("lexicon.csv", "extra/ov.csv") }).map((r) => JSON.stringify({ key: `${r.word}#1`, word: r.word, source: { file: r.file, line: r.line } })),
    { maxLength: 40 },
  );

  it("followed as the atomic writer writes it, chunk by chunk, the read-back is the finished file's (TSV and JSON Lines; property)", async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(jsonl, fc.array(fc.nat(), { maxLength: 6 }), async (records, cuts) => {
        const followed = new FollowedFiles();
        const kinds = [
          { kind: "jsonl" as const, body: records.map((r) => r + "\n").join(""), read: readBackJsonl },
          { kind: "tsv" as const, body: ["key\tword\tnarrow", ...records.map((r, i) => `k${i}\t${JSON.parse(r).word}\tz`)].join("\n") + "\n", read: readBackTsv },
        ];
        for (const [key, k] of kinds.entries()) {
          const path = join(dir, `a${n++}.${k.kind}`);
          let started = false;
          await writeFileAtomic(path, cutAt(Buffer.from(k.body, "utf8"), cuts), {
            written: (temp, bytes) => {
              if (!started) followed.take({ follow: { key, path: temp, kind: k.kind } });
              started = true;
              followed.take({ grown: { key, bytes } });
            },
          });
          // Renamed by now: the handle opened on the temporary file reads the finished file.
          const got = await followed.finish(key);
          if (k.body.length > 0) expect(got).toEqual(await k.read(path));
          else expect(got).toBeUndefined();
        }
      }),
      { numRuns: 100 },
    );
  });

  it("a file that cannot be followed gives no read-back, and a dropped one is closed", async () => {
    const followed = new FollowedFiles();
    followed.take({ follow: { key: 1, path: join(dir, "no-such-file.jsonl"), kind: "jsonl" } });
    followed.take({ grown: { key: 1, bytes: 100 } });
    expect(await followed.finish(1)).toBeUndefined();
    // Not followed at all (a key the worker was never told of).
    expect(await followed.finish(7)).toBeUndefined();
    const p = join(dir, "dropped.tsv");
    writeFileSync(p, "key\tword\n");
    followed.take({ follow: { key: 2, path: p, kind: "tsv" } });
    followed.take({ grown: { key: 2, bytes: 9 } });
    followed.take({ drop: 2 });
    expect(await followed.finish(2)).toBeUndefined();
  });
});
