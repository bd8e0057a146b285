// Opening a lexicon file (src/lexicon/open-file.ts): a regular file's bytes come back whole and in
// order in reads of 8 KiB (read synchronously), a pipe's through a stream; a missing file and a
// folder say why; a reader that stops early closes the file.

import { execFileSync } from "node:child_process";
import { mkdtempSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { openFile } from "../../src/lexicon/open-file.js";

const dir = mkdtempSync(join(tmpdir(), "strata-open-"));

async function bytesOf(path: string): Promise<{ whole: Buffer; sizes: number[] }> {
  const o = await openFile(path);
  if ("why" in o) throw new Error(o.why);
  const parts: Buffer[] = [];
  for await (const b of o.chunks) parts.push(Buffer.from(b));
  return { whole: Buffer.concat(parts), sizes: parts.map((p) => p.length) };
}

describe("openFile", () => {
  it("gives a regular file's bytes whole, in reads of at most 8 KiB (property)", async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 40_000 }), async (data) => {
        const path = join(dir, "f.bin");
        writeFileSync(path, data);
        const { whole, sizes } = await bytesOf(path);
        expect(whole.equals(Buffer.from(data))).toBe(true);
        expect(sizes.every((n) => n > 0 && n <= 8192)).toBe(true);
      }),
      { numRuns: 40 },
    );
  });

  it("says why a missing file or a folder cannot be read", async () => {
    expect(await openFile(join(dir, "none.csv"))).toEqual({ why: "there is no such file" });
    expect(await openFile(dir)).toEqual({ why: "it is a folder" });
  });

  it("reads a named pipe as a stream", async () => {
    const fifo = join(dir, "pipe");
    execFileSync("mkfifo", [fifo]);
    const text = "word,pron\nkat,k a t\n".repeat(2000);
    // The writer opens the pipe in its own process once the reader has it open.
    const writer = import("node:child_process").then(({ spawn }) => spawn("sh", ["-c", `cat > '${fifo}'`], { stdio: ["pipe", "ignore", "ignore"] }));
    (await writer).stdin!.end(text);
    const { whole } = await bytesOf(fifo);
    expect(whole.toString("utf8")).toBe(text);
  });

  it("closes the file when the reader stops early, and closing again is harmless", async () => {
    const path = join(dir, "big.txt");
    writeFileSync(path, "x".repeat(100_000));
    // Open descriptors of this process (Linux), before and after.
    const fds = (): number => readdirSync("/proc/self/fd").length;
    const before = fds();
    const o = await openFile(path);
    if ("why" in o) throw new Error(o.why);
    expect(fds()).toBe(before + 1);
    for await (const b of o.chunks) {
      expect(b.length).toBe(8192);
      break;
    }
    expect(fds()).toBe(before);
    expect(() => o.close()).not.toThrow();
    // Opened and never read: close gives the descriptor back.
    const p = await openFile(path);
    if ("why" in p) throw new Error(p.why);
    p.close();
    expect(fds()).toBe(before);
  });
});
