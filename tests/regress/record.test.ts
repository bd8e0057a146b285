// build.json: what produced a build — hashes of the lexicon, of every grammar file (includes
// followed) and of the inventory, the compiler version, the varieties — with no absolute path.

import { createHash } from "node:crypto";
import { cpSync, mkdtempSync, readFileSync, writeFileSync, appendFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { runBuild } from "../../src/cli/build.js";
import { COMPILER_VERSION } from "../../src/compile/index.js";

const ROOT = resolve(__dirname, "../..");
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");
const opts = (out: string) => ({ out, allowRejects: false, quiet: true, engine: "machine" as const, cache: true, cacheDir: SHARED_CACHE, samples: 0, workers: "0", syllableBreaks: true });
const sha = (p: string) => createHash("sha256").update(readFileSync(p)).digest("hex");

let spies: ReturnType<typeof vi.spyOn>[] = [];
beforeAll(() => {
  spies = [vi.spyOn(process.stdout, "write").mockImplementation(() => true), vi.spyOn(process.stderr, "write").mockImplementation(() => true)];
});
afterAll(() => spies.forEach((s) => s.mockRestore()));

describe("build.json", () => {
  it("records the lexicon, grammar files (with includes), inventory, compiler and varieties, relative to the lexicon folder", async () => {
    const tmp = mkdtempSync(join(tmpdir(), "strata-record-"));
    cpSync(join(ROOT, "lexicons"), join(tmp, "lexicons"), { recursive: true });
    const demo = join(tmp, "lexicons", "demo");
    expect(await runBuild(demo, opts(join(tmp, "a")))).toBe(0);
    const text = readFileSync(join(tmp, "a", "demo", "build.json"), "utf8");
    expect(text).not.toContain(tmp);
    expect(text.endsWith("\n")).toBe(true);
    const rec = JSON.parse(text);
    expect(rec).toMatchObject({ format: 2, compiler: COMPILER_VERSION, lexicon: { name: "demo", file: "lexicon.csv", sha256: sha(join(demo, "lexicon.csv")) } });
    expect(rec.varieties.map((v: { name: string }) => v.name)).toEqual(["general", "careful", "regional"]);
    const general = rec.varieties[0];
    expect(general.grammar.files.map((f: { path: string }) => f.path)).toEqual([
      "../en-us/grammar.strata", "../en-us/common.strata", "../en-us/reductions.strata", "../en-us/coarticulation.strata", "../en-us/nasal-flap.strata",
    ]);
    for (const f of general.grammar.files) expect(f.sha256).toBe(sha(join(demo, f.path)));
    expect(general.inventory.files.map((f: { path: string }) => f.path)).toEqual(["../en-us/segments.csv", "../en-us/diacritics.csv"]);
    expect(general.steps).toContain("flapping");

    // An edit to an included file changes that file's hash and nothing else's.
    appendFileSync(join(tmp, "lexicons", "en-us", "coarticulation.strata"), "\n-- a comment\n");
    expect(await runBuild(demo, opts(join(tmp, "b")))).toBe(0);
    const again = JSON.parse(readFileSync(join(tmp, "b", "demo", "build.json"), "utf8"));
    const changed = again.varieties[0].grammar.files.filter((f: { sha256: string }, i: number) => f.sha256 !== general.grammar.files[i].sha256);
    expect(changed.map((f: { path: string }) => f.path)).toEqual(["../en-us/coarticulation.strata"]);
    expect(again.lexicon.sha256).toBe(rec.lexicon.sha256);
  }, 120_000);
});
