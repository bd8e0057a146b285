// `strata init`: a new voice in one step; the folder it makes builds at once, and again after rows
// are added; it never overwrites anything.

import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, writeFileSync, appendFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { runInit } from "../../src/cli/init.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { cli } from "./helpers.js";

const WORK = mkdtempSync(join(tmpdir(), "strata-init-"));
const CACHE = join(tmpdir(), "strata-test-cache");

describe("strata init", () => {
  it("scaffolds a lexicon folder that `strata build` builds, empty and then with rows", async () => {
    const dir = join(WORK, "harbour-voice");
    const made = runInit(dir, { variety: "announcer", lang: "en-GB" });
    expect(made.exitCode).toBe(0);
    expect(made.stdout).toContain("strata build");
    expect(readdirSync(dir).sort()).toEqual(["en-us", "grammar.strata", "lexicon.csv", "varieties.json"]);
    expect(JSON.parse(readFileSync(join(dir, "varieties.json"), "utf8"))).toEqual({
      lexicon: "lexicon.csv",
      varieties: [{ name: "announcer", lang: "en-GB", grammar: "grammar.strata" }],
    });
    expect(readFileSync(join(dir, "lexicon.csv"), "utf8").split("\n")[0]).toBe("word,pron");
    expect(readFileSync(join(dir, "grammar.strata"), "utf8")).toMatch(/^base "en-us\/grammar\.strata"$/m);

    const out = join(WORK, "out");
    const empty = await cli(["build", dir, "-o", out, "--cache-dir", CACHE, "-q"]);
    expect(empty.stderr).toBe("");
    expect(empty.exitCode).toBe(0);
    expect(readFileSync(join(out, "harbour-voice", "announcer", "lexicon.tsv"), "utf8").split("\n").filter((l) => l !== "")).toHaveLength(1);

    appendFileSync(join(dir, "lexicon.csv"), "kettle,ˈkɛtəl\nharbour,ˈhɑɹbɚ\n");
    const full = await cli(["build", dir, "-o", out, "--cache-dir", CACHE, "-q"]);
    expect(full.exitCode).toBe(0);
    const tsv = readFileSync(join(out, "harbour-voice", "announcer", "lexicon.tsv"), "utf8");
    expect(tsv).toMatch(/\tˈkʰɛ\.ɾɫ̩\t/u); // the shipped grammar's flapping and syllabic l apply
    expect(readFileSync(join(out, "harbour-voice", "announcer", "lexicon.pls"), "utf8")).toContain('xml:lang="en-GB"');
  });

  it("starts from the careful grammar with --from careful", async () => {
    const dir = join(WORK, "careful-voice");
    expect((await cli(["init", dir, "--from", "careful", "-q"])).exitCode).toBe(0);
    expect(readFileSync(join(dir, "grammar.strata"), "utf8")).toMatch(/^base "en-us\/careful\.strata"$/m);
    // The example edits in the scaffold load once their comment marks are taken away.
    const uncommented = readFileSync(join(dir, "grammar.strata"), "utf8").replace(/^-- (adjust|add|  )/gm, "$1");
    writeFileSync(join(dir, "grammar.strata"), uncommented);
    const loaded = loadGrammar(join(dir, "grammar.strata"));
    expect(loaded.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(loaded.grammar!.steps.map((s) => s.name)).toContain("my-rule");
    const bad = await cli(["init", join(WORK, "x"), "--from", "casual"]);
    expect(bad.exitCode).toBe(1);
    expect(bad.stderr).toMatch(/^command line:1:\d+: error: Option --from does not take 'casual'\. It must be one of general, careful\./);
  });

  it("never overwrites: a non-empty folder or a file is refused, an empty folder is used", async () => {
    const full = join(WORK, "taken");
    mkdirSync(full);
    writeFileSync(join(full, "notes.txt"), "mine");
    const r = await cli(["init", full]);
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toMatch(/^command line:1:6: error: '.*taken' already exists and is not empty; choose a new folder\. \[cli\/not-empty\]/);
    expect(readdirSync(full)).toEqual(["notes.txt"]);
    const file = join(WORK, "a-file");
    writeFileSync(file, "x");
    expect((await cli(["init", file])).exitCode).toBe(1);
    const empty = join(WORK, "empty");
    mkdirSync(empty);
    expect(runInit(empty).exitCode).toBe(0);
    expect(existsSync(join(empty, "varieties.json"))).toBe(true);
    expect(readdirSync(WORK).some((f) => f.endsWith(".tmp"))).toBe(false);
  });
});
