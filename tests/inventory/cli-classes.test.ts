// `strata classes`: text and JSON answers, grammar-file and folder arguments, and diagnostics with
// exit code 1 for unreadable inventories and symbols.

import { describe, expect, it } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Command } from "commander";
import { registerClasses, runClasses } from "../../src/cli/classes.js";
import { EN_US } from "./helpers.js";

describe("strata classes", () => {
  it("prints the minimal bundles of a natural class", () => {
    const r = runClasses(EN_US, ["p", "t", "k"], false);
    expect(r.exitCode).toBe(0);
    expect(r.stderr).toBe("");
    expect(r.stdout.split("\n")[0]).toMatch(/^p t k is a natural class; the (\d+ )?minimal bundles? (is|are):$/);
    expect(r.stdout).toContain("  [+consonantal -delayed_release -voice]\n");
  });

  it("says when a set is not a natural class, and what the smallest class lets in", () => {
    const r = runClasses(EN_US, ["p", "t", "k", "s"], false);
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toBe(
      "p t k s is not a natural class.\n" +
        "The smallest natural class containing it is [+consonantal -voice],\n" +
        "which also lets in: tʃ f θ ʃ\n",
    );
  });

  it("answers in JSON with --json", () => {
    const r = runClasses(EN_US, ["m", "n", "ŋ"], true);
    const out = JSON.parse(r.stdout) as { natural: boolean; exact: { text: string; features: Record<string, string> }[]; smallest: unknown };
    expect(out.natural).toBe(true);
    expect(out.smallest).toBeNull();
    for (const b of out.exact) expect(b.text.startsWith("[")).toBe(true);
    expect(out.exact.some((b) => b.features["nasal"] === "+")).toBe(true);
  });

  it("accepts a .strata grammar whose inventory line names the files", () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-classes-"));
    writeFileSync(join(dir, "inv.csv"), "symbol,voice,nasal\np,-,-\nb,+,-\nm,+,+\n");
    writeFileSync(join(dir, "g.strata"), '-- test\ninventory "inv.csv"\n');
    const r = runClasses(join(dir, "g.strata"), ["b", "m"], false);
    expect(r.stdout).toBe("b m is a natural class; the minimal bundle is:\n  [+voice]\n");
  });

  it("renders inventory diagnostics with a caret and exits 1", () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-classes-"));
    writeFileSync(join(dir, "segments.csv"), "symbol,voice,nasal\np,-,-\nb,+,x\n");
    const r = runClasses(dir, ["p"], false);
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("segments.csv:3:5: error: Value 'x' for feature 'nasal' of 'b' must be +, - or 0. [inventory/bad-value]");
    expect(r.stderr).toContain("    3 | b,+,x\n      |     ^");
  });

  it("points at a bad symbol in the argument list", () => {
    const r = runClasses(EN_US, ["p", "x", "tʃæ"], false);
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toContain("command line:1:3: error: Unknown symbol: 'x'");
    expect(r.stderr).toContain("command line:1:5: error: 'tʃæ' is not one segment");
  });

  it("reports a path that does not exist", () => {
    const r = runClasses(join(EN_US, "nowhere"), ["p"], false);
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toContain("[cli/no-such-path]");
  });

  it("registers as a commander subcommand with -g, --json and symbols", async () => {
    const program = new Command();
    program.exitOverride();
    registerClasses(program);
    const cmd = program.commands.find((c) => c.name() === "classes")!;
    expect(cmd).toBeDefined();
    expect(cmd.options.map((o) => o.long)).toEqual(["--grammar", "--variety", "--root", "--json", "--quiet", "--color", "--no-color"]);
    const writes: string[] = [];
    const orig = process.stdout.write.bind(process.stdout);
    process.stdout.write = ((chunk: string) => {
      writes.push(chunk);
      return true;
    }) as typeof process.stdout.write;
    try {
      await program.parseAsync(["node", "strata", "classes", "-g", EN_US, "--json", "i", "u"]);
    } finally {
      process.stdout.write = orig;
    }
    expect(JSON.parse(writes.join("")).symbols).toEqual(["i", "u"]);
  });
});
