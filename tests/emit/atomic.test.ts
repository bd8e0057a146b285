// Tests of atomic file writing: whole or nothing, no temporary file left behind, folders created.

import { mkdtemp, readFile, readdir, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { writeFileAtomic } from "../../src/emit/atomic.js";

const fresh = (): Promise<string> => mkdtemp(join(tmpdir(), "strata-atomic-"));

describe("writeFileAtomic", () => {
  it("writes a string, creating missing folders, and returns the byte count", async () => {
    const dir = await fresh();
    const path = join(dir, "build", "demo", "casual", "out.tsv");
    const bytes = await writeFileAtomic(path, "ˈkʰæt\n");
    expect(await readFile(path, "utf8")).toBe("ˈkʰæt\n");
    expect(bytes).toBe(Buffer.byteLength("ˈkʰæt\n", "utf8"));
    expect(await readdir(join(dir, "build", "demo", "casual"))).toEqual(["out.tsv"]);
  });

  it("writes chunks from a synchronous or asynchronous sequence, in order", async () => {
    const dir = await fresh();
    async function* chunks(): AsyncGenerator<string> {
      for (let i = 0; i < 5000; i++) yield `line ${i}\n`;
    }
    await writeFileAtomic(join(dir, "a.txt"), chunks());
    const text = await readFile(join(dir, "a.txt"), "utf8");
    expect(text.split("\n")).toHaveLength(5001);
    expect(text.startsWith("line 0\nline 1\n")).toBe(true);
    expect(text.endsWith("line 4999\n")).toBe(true);
    await writeFileAtomic(join(dir, "b.txt"), ["x", "y", "z"]);
    expect(await readFile(join(dir, "b.txt"), "utf8")).toBe("xyz");
  });

  it("replaces an existing file whole", async () => {
    const dir = await fresh();
    const path = join(dir, "out.txt");
    await writeFile(path, "old content that is longer than the new one");
    await writeFileAtomic(path, "new");
    expect(await readFile(path, "utf8")).toBe("new");
  });

  it("leaves the old file and no temporary file when the chunk source fails half-way", async () => {
    const dir = await fresh();
    const path = join(dir, "out.txt");
    await writeFile(path, "previous");
    async function* failing(): AsyncGenerator<string> {
      for (let i = 0; i < 20000; i++) yield "x".repeat(10); // more than one buffered write
      throw new Error("source broke");
    }
    await expect(writeFileAtomic(path, failing())).rejects.toThrow("source broke");
    expect(await readFile(path, "utf8")).toBe("previous");
    expect(await readdir(dir)).toEqual(["out.txt"]);
  });

  it("leaves nothing when the target cannot be created", async () => {
    const dir = await fresh();
    await writeFile(join(dir, "file"), "");
    // a path below a regular file cannot exist
    await expect(writeFileAtomic(join(dir, "file", "out.txt"), "x")).rejects.toThrow();
    expect(await readdir(dir)).toEqual(["file"]);
  });
});
