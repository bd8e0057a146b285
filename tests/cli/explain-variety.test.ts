// `strata compile --explain-variety` and `--root`: the resolved steps of a variety with where each
// came from (table and JSON), and the project root named on the command line.

import { cpSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { cli } from "./helpers.js";

const LEXICONS = fileURLToPath(new URL("../../lexicons/", import.meta.url));

/** A copy of the shipped lexicons with a two-level chain of varieties in demo/. */
function project(): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-explain-variety-"));
  const lex = join(dir, "lexicons");
  cpSync(LEXICONS, lex, { recursive: true });
  writeFileSync(join(lex, "demo", "mid.strata"), 'base "../en-us/grammar.strata"\nomit glottal-stop\nadd rule final-glottal after flapping optional:\n  t -> ʔ / Vowel _ #\n');
  writeFileSync(join(lex, "demo", "top.strata"), 'base "mid.strata"\nadjust final-glottal prefer unapplied\nreplace flapping:\n  t -> ɾ / Vowel _ [+syllabic -stress -nasal]\nclass DentalTarget = t d n\nclass Liquid = l ɹ\nadd onsets = ʃt\nremove codas = ŋɡz\n');
  return lex;
}

describe("strata compile --explain-variety", () => {
  it("prints every step with where it is written and how it came in, and the omitted steps", async () => {
    const lex = project();
    const r = await cli(["compile", "-g", join(lex, "demo", "top.strata"), "--explain-variety", "--no-cache"]);
    expect(r.stderr).toBe("");
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toContain("grammar: demo/top.strata\nchain: demo/top.strata → demo/mid.strata → en-us/grammar.strata\n");
    const line = (name: string): string => r.stdout.split("\n").find((l) => new RegExp(`^\\s*\\d+  ${name} `).test(l))!.replace(/ +/g, " ").trim();
    expect(line("flapping")).toMatch(/^\d+ flapping rule en-us\/reductions\.strata:\d+ from the base; replaced at demo\/top\.strata:3$/);
    expect(line("final-glottal")).toMatch(/^\d+ final-glottal rule \(optional\) demo\/mid\.strata:3 added; adjusted at demo\/top\.strata:2$/);
    expect(line("aspiration")).toMatch(/^\d+ aspiration rule en-us\/coarticulation\.strata:\d+ from the base$/);
    expect(r.stdout).toMatch(/omitted:\n {2}glottal-stop \(written at en-us\/reductions\.strata:\d+\), omitted at demo\/mid\.strata:2\n\n/);
    expect(r.stdout).toMatch(/\ndeclarations:\n {2}class DentalTarget replaced at demo\/top\.strata:5\n {2}class Liquid added at demo\/top\.strata:6\n {2}onsets extended at demo\/top\.strata:7\n {2}codas reduced at demo\/top\.strata:8\n$/);
  });

  it("--json gives the same as data", async () => {
    const lex = project();
    const r = await cli(["compile", "-g", join(lex, "demo", "top.strata"), "--explain-variety", "--json"]);
    expect(r.exitCode).toBe(0);
    const j = JSON.parse(r.stdout) as { chain: string[]; steps: { name: string; source: string; defined: { file: string; line: number }; edits: { kind: string; file: string; line: number }[] }[]; omitted: { name: string }[] };
    expect(j.chain).toEqual(["demo/top.strata", "demo/mid.strata", "en-us/grammar.strata"]);
    const fg = j.steps.find((s) => s.name === "final-glottal")!;
    expect(fg).toMatchObject({ source: "added", defined: { file: "demo/mid.strata", line: 3 }, edits: [{ kind: "adjusted", file: "demo/top.strata", line: 2 }] });
    expect(j.steps[j.steps.findIndex((s) => s.name === "flapping") + 1]!.name).toBe("final-glottal");
    expect(j.omitted.map((o) => o.name)).toEqual(["glottal-stop"]);
    expect(r.stdout).not.toContain(lex); // paths relative to the project root
  });

  it("an error in the variety is positioned and exits 1", async () => {
    const lex = project();
    writeFileSync(join(lex, "demo", "bad.strata"), 'base "mid.strata"\nomit flaping\n');
    const r = await cli(["compile", "-g", join(lex, "demo", "bad.strata"), "--explain-variety"]);
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toContain("bad.strata:2:6: error: The base grammar has no rule or step named 'flaping' (did you mean 'flapping'?). [grammar/unknown-step]");
  });
});

describe("--root", () => {
  it("a narrower root makes the base outside it an error; a folder that does not exist is refused on the command line", async () => {
    const lex = project();
    const narrow = await cli(["compile", "-g", join(lex, "demo", "top.strata"), "--root", join(lex, "demo"), "--no-cache"]);
    expect(narrow.exitCode).toBe(1);
    expect(narrow.stderr).toContain("[grammar/base-outside]");
    const missing = await cli(["compile", "-g", join(lex, "demo", "top.strata"), "--root", join(lex, "nowhere")]);
    expect(missing.exitCode).toBe(1);
    expect(missing.stderr).toContain("[cli/bad-option-value]");
  });

  it("a wider root lets a variety outside any .strata-root name its base", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-root-"));
    cpSync(join(LEXICONS, "en-us"), join(dir, "en-us"), { recursive: true });
    writeFileSync(join(dir, "v.strata"), 'base "en-us/grammar.strata"\nomit glottal-stop\n');
    const without = await cli(["compile", "-g", join(dir, "v.strata"), "--explain-variety"]);
    expect(without.exitCode).toBe(0); // v.strata's own folder holds en-us/
    writeFileSync(join(dir, "en-us", "up.strata"), 'base "../v.strata"\n');
    const up = await cli(["compile", "-g", join(dir, "en-us", "up.strata"), "--explain-variety"]);
    expect(up.stderr).toContain("[grammar/base-outside]");
    const widened = await cli(["compile", "-g", join(dir, "en-us", "up.strata"), "--explain-variety", "--root", dir]);
    expect(widened.stderr).toBe("");
    expect(widened.exitCode).toBe(0);
  });
});
