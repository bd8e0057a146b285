// `strata compile` and `strata graph` as the CLI runs them (the command functions, in process).

import { copyFileSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { runCompile } from "../../src/cli/compile.js";
import { runGraph } from "../../src/cli/graph.js";
import { EN_US } from "../lexicons/harness.js";

const work = mkdtempSync(join(tmpdir(), "strata-cli-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** A grammar folder in the temp area with the en-us inventory and the given grammar text. */
function folder(name: string, text: string): string {
  const dir = join(work, name);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  copyFileSync(join(EN_US, "segments.csv"), join(dir, "segments.csv"));
  copyFileSync(join(EN_US, "diacritics.csv"), join(dir, "diacritics.csv"));
  writeFileSync(join(dir, "grammar.strata"), text);
  return dir;
}

const SMALL = `inventory "segments.csv"
diacritics "diacritics.csv"
class V = [+syllabic]
rule flap:
  t -> ɾ / V _ V
rule devoice optional:
  l -> [-voice] / p _
`;

describe("strata compile", () => {
  it("prints every step with states and arcs, the cascade, and the cache state", () => {
    const cache = join(work, "cache-a");
    const r = runCompile(EN_US, { cacheDir: cache });
    expect(r.exitCode).toBe(0);
    for (const step of ["syllabify", "stress", "dark-l", "flapping", "aspiration", "nasalisation", "all steps"]) {
      expect(r.stdout).toMatch(new RegExp(`^${step}\\s+.*\\d`, "m"));
    }
    expect(r.stdout).toMatch(/^preferred cascade: 1 block, [\d,]+ states, [\d,]+ arcs$/m);
    expect(r.stdout).toMatch(/^cache: miss \(/m);
    const again = runCompile(EN_US, { cacheDir: cache });
    expect(again.stdout).toMatch(/^cache: hit \(/m);
    expect(again.stdout.replace(/^(cache|time):.*$/gm, "")).toBe(r.stdout.replace(/^(cache|time):.*$/gm, ""));
  });

  it("reports sizes as JSON, with blocks when the limit is small", () => {
    const r = runCompile(EN_US, { cache: false, json: true, maxStates: 300 });
    expect(r.exitCode).toBe(0);
    const j = JSON.parse(r.stdout) as { steps: { name: string; states: number; arcs: number }[]; preferred: { blocks: unknown[]; states: number }; cache: string };
    expect(j.cache).toBe("off");
    expect(j.steps.length).toBe(15);
    expect(j.steps.every((s) => s.states > 0 && s.arcs > 0)).toBe(true);
    expect(j.preferred.blocks.length).toBeGreaterThan(1);
  });

  it("renders a grammar error with file, line, column and a caret, and exits 1", () => {
    const dir = folder("bad", `${SMALL}rule broken:\n  t -> [+voice / V _\n`);
    const r = runCompile(dir, { cache: false });
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/grammar\.strata:\d+:\d+: error: /);
    expect(r.stderr).toMatch(/^\s+\d+ \| .*$/m);
    expect(r.stderr).toMatch(/\^/);
    expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
  });

  it("names a missing grammar path", () => {
    const r = runCompile(join(work, "nowhere"), { cache: false });
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toContain("does not exist");
  });

  it("takes a .strata file as well as a folder", () => {
    const dir = folder("small", SMALL);
    const r = runCompile(join(dir, "grammar.strata"), { cache: false });
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toMatch(/^flap\s+rule\s+\d+/m);
    expect(r.stdout).toMatch(/^devoice\s+rule \(optional\)/m);
    expect(r.stdout).toMatch(/^variants cascade: /m);
  });
});

describe("strata graph", () => {
  it("draws one rule's machine as DOT with IPA labels", () => {
    const r = runGraph(EN_US, "dark-l");
    expect(r.exitCode).toBe(0);
    expect(r.stdout.startsWith("digraph strata {")).toBe(true);
    expect(r.stdout.trimEnd().endsWith("}")).toBe(true);
    expect(r.stdout).toContain("l:ɫ");
    expect(r.stdout).toMatch(/shape=doublecircle/);
  });

  it("draws the whole cascade of a small grammar with --all, and refuses a large one", () => {
    const dir = folder("small2", SMALL);
    const all = runGraph(dir, undefined, { all: true });
    expect(all.exitCode).toBe(0);
    expect(all.stdout).toContain("t:ɾ");
    const big = runGraph(EN_US, undefined, { all: true, limit: 50 });
    expect(big.exitCode).toBe(1);
    expect(big.stderr).toContain("does not fit");
  });

  it("draws the syllabifier and the stress step too", () => {
    for (const step of ["syllabify", "stress"]) {
      const r = runGraph(EN_US, step);
      expect(r.exitCode).toBe(0);
      expect(r.stdout).toMatch(new RegExp(`label="${step} \\(variants\\): \\d+ states`));
    }
    // The syllabifier inserts '.' (ε:.) and deletes the input's (.:ε).
    const syl = runGraph(EN_US, "syllabify").stdout;
    expect(syl).toContain("ε:.");
    expect(syl).toContain(".:ε");
  });

  it("names the steps when the step is unknown", () => {
    const r = runGraph(EN_US, "no-such-rule");
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toContain("There is no step 'no-such-rule'");
    expect(r.stderr).toContain("aspiration");
  });
});
