// Chunk buffers used again once written (emit/bytes.ts, releaseChunk; emit/atomic.ts gives them
// back): files several chunks long, written as a build writes them (lines encoded into chunks
// while earlier chunks are being written), hold exactly their text, also when several files are
// written at once from one thread's pool of buffers.

import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { writeFileAtomic } from "../../src/emit/atomic.js";
import { ByteChunks, CHUNK_BYTES } from "../../src/emit/bytes.js";

const dir = mkdtempSync(join(tmpdir(), "strata-bytes-"));

/** Lines of text, different in every file and line (ASCII, IPA and astral characters). */
const lineOf = (file: number, i: number): string => `${file}\t${i}\tˈkʰæt.ɾɚ ${"😀".repeat(i % 3)} ${"x".repeat(i % 97)}`;

/** Chunks as a ByteChunks makes them, handed over one by one while the writer writes (an async queue). */
async function* streamed(file: number, lines: number): AsyncGenerator<Uint8Array> {
  const ready: Uint8Array[] = [];
  const b = new ByteChunks((c) => void ready.push(c));
  for (let i = 0; i < lines; i++) {
    b.pushLine(lineOf(file, i));
    while (ready.length > 0) {
      yield ready.shift()!;
      await new Promise((res) => setImmediate(res));
    }
  }
  b.flush();
  yield* ready;
}

describe("chunk buffers used again", () => {
  it("files of several chunks, six written at once, hold exactly their lines", async () => {
    const lines = 40_000; // about 3 MiB each: several chunks, buffers given back and taken again
    const paths = Array.from({ length: 6 }, (_, f) => join(dir, `f${f}.txt`));
    await Promise.all(paths.map((p, f) => writeFileAtomic(p, streamed(f, lines))));
    for (let f = 0; f < paths.length; f++) {
      const text = readFileSync(paths[f]!, "utf8");
      expect(Buffer.byteLength(text)).toBeGreaterThan(2 * CHUNK_BYTES);
      const want = Array.from({ length: lines }, (_, i) => lineOf(f, i) + "\n").join("");
      expect(text === want).toBe(true);
    }
  });
});
