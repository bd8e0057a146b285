// The checked-grammar cache: a hit gives the same grammar as loading afresh; any change to a
// grammar file, an included file or the inventory is seen; a broken entry or a grammar with
// errors never comes from the cache.

import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, appendFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { loadGrammar, loadGrammarCached } from "../../src/grammar/index.js";

const EN_US = resolve(__dirname, "../../lexicons/en-us");

/** A private copy of the shipped en-us folder and an empty cache folder. */
function copy(): { dir: string; cache: string } {
  const dir = mkdtempSync(join(tmpdir(), "strata-gcache-"));
  cpSync(EN_US, dir, { recursive: true });
  return { dir, cache: join(dir, ".cache") };
}

const indexFiles = (cache: string) => readdirSync(cache).filter((f) => f.startsWith("grammar-"));

/** Drops the last row of a CSV table (keeps the header and comments). */
function dropLastRow(file: string): void {
  const lines = readFileSync(file, "utf8").split("\n");
  const last = lines.map((l, i) => [l, i] as const).filter(([l]) => l.trim() !== "" && !l.startsWith("#")).pop()![1];
  writeFileSync(file, lines.filter((_, i) => i !== last).join("\n"));
}

describe("loadGrammarCached", () => {
  it("a hit gives the grammar and inventory that loading afresh gives", () => {
    const { dir, cache } = copy();
    const fresh = loadGrammar(join(dir, "grammar.strata"));
    const first = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(indexFiles(cache).length).toBe(1);
    const hit = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(JSON.parse(JSON.stringify(hit.grammar))).toEqual(JSON.parse(JSON.stringify(fresh.grammar)));
    expect(hit.grammar).toEqual(first.grammar);
    expect(hit.inventory!.segments).toEqual(fresh.inventory!.segments);
    // The whole inventory, maps included, comes back from the entry as the loader made it.
    expect(hit.inventory).toEqual(fresh.inventory);
    expect(JSON.stringify([...hit.inventory!.featureIndex])).toBe(JSON.stringify([...fresh.inventory!.featureIndex]));
    expect(JSON.stringify(hit.inventory!.diacritics.map((d) => [...d.sets]))).toBe(JSON.stringify(fresh.inventory!.diacritics.map((d) => [...d.sets])));
    expect(hit.diagnostics).toEqual(fresh.diagnostics);
  });

  it("sees a change in the diacritics file", () => {
    const { dir, cache } = copy();
    const before = loadGrammarCached(join(dir, "grammar.strata"), cache);
    dropLastRow(join(dir, "diacritics.csv"));
    const after = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(after.inventory?.diacritics.length ?? 0).toBe(before.inventory!.diacritics.length - 1);
  });

  it("sees a change in an included file", () => {
    const { dir, cache } = copy();
    loadGrammarCached(join(dir, "grammar.strata"), cache);
    appendFileSync(join(dir, "coarticulation.strata"), "\nrule extra-rule:\n  ʔ -> t / _ #\n");
    const again = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(again.grammar!.steps.map((s) => s.name)).toContain("extra-rule");
  });

  it("sees a change in the inventory", () => {
    const { dir, cache } = copy();
    const before = loadGrammarCached(join(dir, "grammar.strata"), cache);
    dropLastRow(join(dir, "segments.csv"));
    const after = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(after.inventory?.segments.length ?? 0).not.toBe(before.inventory!.segments.length);
  });

  it("ignores a broken entry, and never caches a grammar with errors", () => {
    const { dir, cache } = copy();
    loadGrammarCached(join(dir, "grammar.strata"), cache);
    writeFileSync(join(cache, indexFiles(cache)[0]!), "{ not json");
    expect(loadGrammarCached(join(dir, "grammar.strata"), cache).grammar?.steps.length).toBeGreaterThan(5);

    const bad = copy();
    writeFileSync(join(bad.dir, "broken.strata"), 'inventory "segments.csv"\nrule oops:\n  [+nosuchfeature] -> [-voice]\n');
    const r1 = loadGrammarCached(join(bad.dir, "broken.strata"), bad.cache);
    expect(r1.diagnostics.some((d) => d.severity === "error")).toBe(true);
    const r2 = loadGrammarCached(join(bad.dir, "broken.strata"), bad.cache);
    expect(r2.diagnostics).toEqual(r1.diagnostics);
    expect(existsSync(bad.cache) ? indexFiles(bad.cache) : []).toEqual([]);
  });
});

describe("loadGrammarCached: the cache file's own checksum", () => {
  it("never uses an edited cache file: it warns, loads the grammar afresh and rewrites the entry", () => {
    const { dir, cache } = copy();
    const fresh = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(fresh.grammar!.steps.map((s) => s.name)).toContain("flapping");
    const file = join(cache, indexFiles(cache)[0]!);
    const text = readFileSync(file, "utf8");
    expect(text).toContain('"name":"flapping"');
    writeFileSync(file, text.replaceAll('"name":"flapping"', '"name":"flapxing"'));
    const again = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(again.grammar!.steps.map((s) => s.name)).toContain("flapping");
    expect(again.grammar!.steps.map((s) => s.name)).not.toContain("flapxing");
    expect(again.diagnostics.filter((d) => d.code === "cache/unusable").map((d) => [d.severity, d.file])).toEqual([["warning", file]]);
    // Rewritten whole: the next load is a clean hit.
    const third = loadGrammarCached(join(dir, "grammar.strata"), cache);
    expect(third.diagnostics).toEqual(fresh.diagnostics);
    expect(third.grammar).toEqual(fresh.grammar);
  });

  it("a cache folder that is a file, or a cache file that is a folder, is a warning and never an error", () => {
    const { dir } = copy();
    const blocker = join(dir, "not-a-folder");
    writeFileSync(blocker, "x");
    const r = loadGrammarCached(join(dir, "grammar.strata"), blocker);
    expect(r.grammar!.steps.length).toBeGreaterThan(5);
    expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(r.diagnostics.filter((d) => d.code === "cache/unusable").length).toBe(1);

    const other = copy();
    loadGrammarCached(join(other.dir, "grammar.strata"), other.cache);
    const file = join(other.cache, indexFiles(other.cache)[0]!);
    rmSync(file);
    mkdirSync(file);
    const r2 = loadGrammarCached(join(other.dir, "grammar.strata"), other.cache);
    expect(r2.grammar!.steps.length).toBeGreaterThan(5);
    expect(r2.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(r2.diagnostics.some((d) => d.code === "cache/unusable" && d.severity === "warning")).toBe(true);
  });
});
