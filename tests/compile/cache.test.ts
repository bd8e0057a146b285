// The compiled-machine cache: a miss writes, a hit reads the same machines back, a corrupt or
// truncated file is detected and rebuilt, and a changed grammar or inventory gets another key.

import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { compileGrammar, type Compiled } from "../../src/compile/index.js";
import { probeCacheDir, readCache, writeCache } from "../../src/compile/cache.js";
import { FORMAT_VERSION, serialise } from "../../src/fst/index.js";
import type { Grammar } from "../../src/grammar/ast.js";
import { wordKey } from "../../src/interp/index.js";
import { bun, chBun, classDef, env, grammar, rule, seg, syllabifyStep, stressStep, clusters } from "../support/ast.js";
import { tinyInventory as inv } from "../support/tiny-inventory.js";
import { symsOf } from "../support/words.js";

const dirs: string[] = [];
const tmp = (): string => {
  const d = mkdtempSync(join(tmpdir(), "strata-cache-"));
  dirs.push(d);
  return d;
};
afterEach(() => {
  for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});

const g: Grammar = grammar(
  [
    syllabifyStep(),
    stressStep("right", 2),
    rule("voicing", [bun("-syllabic -nasal")], [chBun("+voice")], [env([bun("+syllabic")], [bun("+syllabic -stress")])]),
    rule("nasal", [seg("a")], [chBun("+nasal")], [env([], [seg("n")])], { optional: true }),
  ],
  { classes: [classDef("V", [bun("+syllabic")])], onsets: clusters("p t k b d n pt"), codas: clusters("p t k n") },
);

const WORDS = ["#pataka#", "#anta#", "#tapan#", "#ipta#"];

function outputs(c: Compiled): string[] {
  return WORDS.map((w) => {
    const ids = c.encode(symsOf(w, inv))!;
    const out: number[] = [];
    c.preferred.run(ids, out);
    return `${wordKey(c.decode(out))} / ${c.variants(ids).outputs.map((o) => wordKey(c.decode(o))).join(" | ")}`;
  });
}

function compiled(dir: string | undefined, gr: Grammar = g): Compiled {
  const r = compileGrammar(gr, inv, dir === undefined ? {} : { cacheDir: dir });
  expect(r.diagnostics).toEqual([]);
  return r.compiled!;
}

/** A compilation that must rebuild a damaged cache file: one warning naming the file, never an error. */
function rebuilt(dir: string): Compiled {
  const r = compileGrammar(g, inv, { cacheDir: dir });
  expect(r.diagnostics.map((d) => [d.severity, d.code])).toEqual([["warning", "cache/unusable"]]);
  expect(r.diagnostics[0]!.file).toBe(join(dir, `${r.compiled!.cacheKey}.bin`));
  expect(r.compiled!.cache).toBe("rebuilt");
  return r.compiled!;
}

describe("compiled-machine cache", () => {
  it("misses, then hits with the same machines and results", () => {
    const dir = tmp();
    const first = compiled(dir);
    expect(first.cache).toBe("miss");
    expect(readdirSync(dir)).toEqual([`${first.cacheKey}.bin`]);
    const second = compiled(dir);
    expect(second.cache).toBe("hit");
    expect(second.cacheKey).toBe(first.cacheKey);
    expect(second.preferredSize).toEqual(first.preferredSize);
    expect(second.steps).toEqual(first.steps);
    expect(outputs(second)).toEqual(outputs(first));
    expect(outputs(first)).toEqual(outputs(compiled(undefined)));
  });

  it("is off without a folder", () => {
    expect(compiled(undefined).cache).toBe("off");
  });

  it("detects a flipped byte and rebuilds", () => {
    const dir = tmp();
    const first = compiled(dir);
    const file = join(dir, `${first.cacheKey}.bin`);
    const bytes = readFileSync(file);
    bytes[bytes.length - 5] = bytes[bytes.length - 5]! ^ 0xff;
    writeFileSync(file, bytes);
    const again = rebuilt(dir);
    expect(outputs(again)).toEqual(outputs(first));
    expect(compiled(dir).cache).toBe("hit");
  });

  it("detects a truncated file and a foreign file", () => {
    const dir = tmp();
    const first = compiled(dir);
    const file = join(dir, `${first.cacheKey}.bin`);
    writeFileSync(file, readFileSync(file).subarray(0, 40));
    rebuilt(dir);
    writeFileSync(file, "not a cache file at all");
    rebuilt(dir);
    expect(compiled(dir).cache).toBe("hit");
  });

  it("gives a changed grammar another key (stale files are never read)", () => {
    const dir = tmp();
    const first = compiled(dir);
    const changed: Grammar = { ...g, steps: g.steps.slice(0, 3) };
    const other = compiled(dir, changed);
    expect(other.cache).toBe("miss");
    expect(other.cacheKey).not.toBe(first.cacheKey);
    expect(readdirSync(dir).sort()).toEqual([`${first.cacheKey}.bin`, `${other.cacheKey}.bin`].sort());
    const invChanged = compileGrammar(g, { ...inv, segments: inv.segments.slice(0, 7) }, { cacheDir: dir });
    expect(invChanged.compiled?.cacheKey ?? "errors").not.toBe(first.cacheKey);
  });

  it("writes whole files: no temporary file is left behind", () => {
    const dir = tmp();
    compiled(dir);
    expect(readdirSync(dir).filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });
});

describe("frozen runners in the cache", () => {
  it("a hit reads the preferred runners' tables back and runs the same", () => {
    const dir = tmp();
    const first = compiled(dir);
    const second = compiled(dir);
    expect(second.cache).toBe("hit");
    expect(second.preferred.kinds).toEqual(first.preferred.kinds);
    expect(second.preferred.frozenBytes().map((b) => b?.length ?? 0)).toEqual(first.preferred.frozenBytes().map((b) => b?.length ?? 0));
    expect(outputs(second)).toEqual(outputs(first));
  });

  it("a hit gives the same block machines, decoded when first asked for", () => {
    const dir = tmp();
    const first = compiled(dir);
    const second = compiled(dir);
    const bytes = (c: Compiled): Uint8Array[] => [...c.preferredBlocks, ...c.variantBlocks].map((b) => serialise(b.machine));
    expect(bytes(second)).toEqual(bytes(first));
    expect(second.variantBlocks.map((b) => [b.from, b.to, b.states, b.arcs])).toEqual(first.variantBlocks.map((b) => [b.from, b.to, b.states, b.arcs]));
  });

  it("a runner stored in another format is made again from its machine, without a warning", () => {
    const dir = tmp();
    const first = compiled(dir);
    const read = readCache(dir, first.cacheKey, () => first.preferredBlocks.length + first.variantBlocks.length);
    if (read.state !== "ok") throw new Error(read.state);
    // Bytes 4–5 of a runner's bytes hold the format version (fst/serialise.ts).
    const older = read.blobs.map((b) => { if (b === null) return null; const c = b.slice(); c[4] = FORMAT_VERSION - 1; c[5] = 0; return c; });
    expect(older.some((b) => b !== null)).toBe(true);
    expect(writeCache(dir, first.cacheKey, read.meta, read.machines.map((m) => m.machine()), older)).toBeUndefined();
    const again = compiled(dir);
    expect(again.cache).toBe("hit");
    expect(again.preferred.frozenBytes()).toEqual(first.preferred.frozenBytes());
    expect(outputs(again)).toEqual(outputs(first));
  });
});

describe("cache keys", () => {
  it("do not depend on where the grammar file lies or on source positions", () => {
    const moved: Grammar = JSON.parse(JSON.stringify(g).replaceAll("test.strata", "/elsewhere/other.strata")) as Grammar;
    const a = compileGrammar(g, inv).compiled!;
    const b = compileGrammar(moved, inv).compiled!;
    expect(b.cacheKey).toBe(a.cacheKey);
  });
});

describe("a cache that cannot be used", () => {
  it("a cache folder that is a file: compiles without caching, with a warning, never an error", () => {
    const dir = tmp();
    const blocker = join(dir, "file");
    writeFileSync(blocker, "x");
    const r = compileGrammar(g, inv, { cacheDir: blocker });
    expect(r.compiled).not.toBeNull();
    expect(r.diagnostics.map((d) => [d.severity, d.code])).toEqual([["warning", "cache/unusable"]]);
    expect(outputs(r.compiled!)).toEqual(outputs(compiled(undefined)));
  });

  it("a cache file that is a folder: rebuilt with a warning, never an error", () => {
    const dir = tmp();
    const first = compiled(dir);
    const file = join(dir, `${first.cacheKey}.bin`);
    rmSync(file);
    mkdirSync(file);
    const r = compileGrammar(g, inv, { cacheDir: dir });
    expect(r.compiled!.cache).toBe("rebuilt");
    expect(r.diagnostics.every((d) => d.severity === "warning" && d.code === "cache/unusable")).toBe(true);
    expect(r.diagnostics.length).toBeGreaterThan(0);
  });

  it("probeCacheDir: one warning for an unusable folder; stale temporaries of dead processes removed", () => {
    const dir = tmp();
    const blocker = join(dir, "file");
    writeFileSync(blocker, "x");
    const bad = probeCacheDir(join(blocker, "cache"));
    expect(bad.dir).toBeUndefined();
    expect(bad.diagnostics.map((d) => [d.severity, d.code])).toEqual([["warning", "cache/unusable"]]);
    const dead = deadPid();
    writeFileSync(join(dir, `.abc.bin.${dead}.0123456789ab.tmp`), "half");
    writeFileSync(join(dir, `.abc.bin.${process.pid}.0123456789ab.tmp`), "mine, still being written");
    const ok = probeCacheDir(dir);
    expect(ok).toEqual({ dir, diagnostics: [] });
    expect(readdirSync(dir).sort()).toEqual([`.abc.bin.${process.pid}.0123456789ab.tmp`, "file"]);
  });
});

/** The id of a process that has exited (a child run to completion). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ["-e", "process.stdout.write(String(process.pid))"], { encoding: "utf8" });
  return Number(r.stdout);
}
