// DEVELOPERS.md's example grammar ("The grammar language") loads against the shipped en-us
// inventory: the block is extracted from the guide itself, so the guide cannot drift from the parser.

import { copyFileSync, cpSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";

const root = join(import.meta.dirname, "..", "..");

/** The fenced blocks of one section of DEVELOPERS.md (from its `## ` heading to the next). */
function blocksOf(heading: string): string[] {
  const md = readFileSync(join(root, "DEVELOPERS.md"), "utf8");
  const start = md.indexOf(`\n## ${heading}\n`);
  if (start < 0) throw new Error(`no section '${heading}' in DEVELOPERS.md`);
  const end = md.indexOf("\n## ", start + 4);
  const section = md.slice(start, end < 0 ? md.length : end);
  return [...section.matchAll(/```[a-z]*\n([\s\S]*?)```/g)].map((m) => m[1]!);
}

describe("DEVELOPERS.md example grammar", () => {
  test("loads against lexicons/en-us/segments.csv without errors or warnings", () => {
    const [example] = blocksOf("The grammar language");
    expect(example).toContain('inventory "segments.csv"');
    const dir = mkdtempSync(join(tmpdir(), "strata-devguide-"));
    for (const f of ["segments.csv", "diacritics.csv"]) copyFileSync(join(root, "lexicons", "en-us", f), join(dir, f));
    // Files the example includes are written empty (the include itself is exercised).
    for (const m of example!.matchAll(/^include "([^"]+)"/gm)) writeFileSync(join(dir, m[1]!), "-- included\n");
    writeFileSync(join(dir, "grammar.strata"), example!);
    const r = loadGrammar(dir);
    expect(r.diagnostics.map((d) => `${d.line}:${d.column} ${d.severity} ${d.code} ${d.message}`)).toEqual([]);
    expect(r.grammar?.steps.length).toBeGreaterThan(3);
  });
});

describe("DEVELOPERS.md example variety", () => {
  test("loads as lexicons/demo/announcer.strata in a copy of the shipped lexicons without errors or warnings", () => {
    const example = blocksOf("The grammar language").find((b) => b.includes('base "../en-us/grammar.strata"'));
    expect(example).toBeDefined();
    const dir = mkdtempSync(join(tmpdir(), "strata-devguide-"));
    cpSync(join(root, "lexicons"), join(dir, "lexicons"), { recursive: true });
    writeFileSync(join(dir, "lexicons", "demo", "announcer.strata"), example!);
    const r = loadGrammar(join(dir, "lexicons", "demo", "announcer.strata"));
    expect(r.diagnostics.map((d) => `${d.line}:${d.column} ${d.severity} ${d.code} ${d.message}`)).toEqual([]);
    const names = r.grammar!.steps.map((s) => s.name);
    expect(names).not.toContain("glottal-stop");
    expect(names.slice(names.indexOf("flapping"), names.indexOf("flapping") + 3)).toEqual(["flapping", "final-glottal", "final-release"]);
    expect(names[names.indexOf("schwa-deletion") + 1]).toBe("syllabify-2");
  });
});

describe("README.md example variety", () => {
  test("loads in a copy of the shipped lexicons without errors or warnings", () => {
    const md = readFileSync(join(root, "README.md"), "utf8");
    const example = [...md.matchAll(/```[a-z]*\n([\s\S]*?)```/g)].map((m) => m[1]!).find((b) => b.includes('base "../en-us/grammar.strata"'));
    expect(example).toBeDefined();
    const dir = mkdtempSync(join(tmpdir(), "strata-readme-"));
    cpSync(join(root, "lexicons"), join(dir, "lexicons"), { recursive: true });
    writeFileSync(join(dir, "lexicons", "demo", "announcer.strata"), example!);
    const r = loadGrammar(join(dir, "lexicons", "demo", "announcer.strata"));
    expect(r.diagnostics.map((d) => `${d.line}:${d.column} ${d.severity} ${d.code} ${d.message}`)).toEqual([]);
    expect(r.grammar!.steps.map((s) => s.name)).toContain("final-glottal");
  });
});
