// `strata build` with a variety defined as edits of a base in another folder (the shipped layout:
// lexicons/demo/*.strata → ../en-us/): it builds, build.json names every file of the chain, and a
// variety equal to careful.strata gives byte-identical outputs to it (and the machines agree with
// the reference interpreter on the first entries, --check).

import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { cli } from "./helpers.js";

const LEXICONS = fileURLToPath(new URL("../../lexicons/", import.meta.url));
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");

describe("build with a variety of the shipped grammar", () => {
  it("builds; build.json lists the variety and its bases; careful-as-edits = careful.strata byte for byte", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-variety-build-"));
    const lex = join(dir, "lexicons");
    cpSync(LEXICONS, lex, { recursive: true });
    writeFileSync(
      join(lex, "demo", "careful-edits.strata"),
      'base "../en-us/grammar.strata"\nomit flapping\nomit glottal-stop\nomit nasal-flap\nomit nasal-flap-merger\n',
    );
    writeFileSync(
      join(lex, "demo", "varieties.json"),
      JSON.stringify({ lexicon: "lexicon.csv", varieties: [
        { name: "careful", lang: "en-US", grammar: "../en-us/careful.strata" },
        { name: "edits", lang: "en-US", grammar: "careful-edits.strata" },
      ] }, null, 2) + "\n",
    );
    rmSync(join(lex, "demo", "pinned.csv")); // its pins name the shipped varieties, not these two
    const out = join(dir, "out");
    const r = await cli(["build", join(lex, "demo"), "-o", out, "-q", "--cache-dir", SHARED_CACHE, "--samples", "0", "--workers", "0", "--check", "60"]);
    expect(r.stderr).toBe("");
    expect(r.exitCode).toBe(0);
    const record = JSON.parse(readFileSync(join(out, "demo", "build.json"), "utf8")) as { varieties: { name: string; grammar: { files: { path: string }[] } }[] };
    const files = record.varieties.find((v) => v.name === "edits")!.grammar.files.map((f) => f.path);
    expect(files.slice(0, 2)).toEqual(["careful-edits.strata", "../en-us/grammar.strata"]);
    expect(files).toContain("../en-us/reductions.strata");
    for (const f of ["lexicon.tsv", "lexicon.pls"]) {
      expect(readFileSync(join(out, "demo", "edits", f), "utf8")).toBe(readFileSync(join(out, "demo", "careful", f), "utf8"));
    }
  }, 180_000);
});
