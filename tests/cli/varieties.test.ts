// `strata varieties` through the real command line (tests/cli/helpers.ts): the summary, TSV and JSON
// on standard output, the files of -o, the choice of varieties, and bad input as positioned errors
// with exit 1.

import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { TSV_COLUMNS } from "../../src/varieties/format.js";
import { build, copyLexicons } from "../regress/support.js";
import { cli } from "./helpers.js";

let root: string;
let demo: string;

beforeAll(async () => {
  root = copyLexicons();
  expect(await build(join(root, "lexicons", "demo"), join(root, "build"))).toBe(0);
  demo = join(root, "build", "demo");
}, 180_000);

describe("strata varieties", () => {
  it("prints a summary per pair: counts, differing steps, rules with counts and examples, mergers and splits", async () => {
    const r = await cli(["varieties", demo, "--no-color"]);
    expect([r.exitCode, r.stderr]).toEqual([0, ""]);
    expect(r.stdout).toMatch(/^demo: general, careful, regional \(3 pairs\)$/m);
    expect(r.stdout).toMatch(/^general ↔ careful: 391 entries in both, \d+ differ \(grammar \d+, input 0\), 0 only in general, 0 only in careful$/m);
    expect(r.stdout).toMatch(/^ {2}steps that differ: general: flapping \(only here\), glottal-stop \(only here\), nasal-flap \(only here\), nasal-flap-merger \(only here\); careful: none$/m);
    expect(r.stdout).toMatch(/^ {2}flapping +33 +general +only here +thirty, /m);
    expect(r.stdout).toMatch(/^ {2}mergers \(homophonous in general, told apart in careful\): 0$/m);
    expect(r.stdout).not.toMatch(/\u001b\[/);
  });

  it("--format tsv: one table, a row per finding; --json the whole comparison; -o writes both and the HTML report", async () => {
    const out = join(root, "reports", "varieties");
    const tsv = await cli(["varieties", demo, "--format", "tsv", "-o", out]);
    expect(tsv.exitCode).toBe(0);
    const lines = tsv.stdout.trimEnd().split("\n");
    expect(lines[0]).toBe(TSV_COLUMNS.join("\t"));
    expect(lines.find((l) => l.includes("\tthirty\t"))).toBe("general\tcareful\tdiffers\t\tct0022\tthirty\tˈθɝ.ti\tˈθɝ.ɾi\tˈθɝ.ti\tˈθɝ.ti\tflapping");
    expect(lines.slice(1).every((l) => l.split("\t").length === TSV_COLUMNS.length)).toBe(true);
    const json = await cli(["varieties", demo, "--json"]);
    const doc = JSON.parse(json.stdout);
    expect(doc.pairs[0].differences.length).toBe(lines.filter((l) => l.startsWith("general\tcareful\tdiffers\t")).length);
    expect(doc.pairs.reduce((n: number, p: { differences: unknown[] }) => n + p.differences.length, 0)).toBe(lines.filter((l) => l.split("\t")[2] === "differs").length);
    expect(readFileSync(join(out, "comparison.json"), "utf8")).toBe(json.stdout);
    expect(readFileSync(join(out, "comparison.tsv"), "utf8")).toBe(tsv.stdout);
    expect(readFileSync(join(out, "report.html"), "utf8")).toMatch(/^<!DOCTYPE html>/);
  });

  it("-d chooses the varieties: one is compared with each other, several pairwise in the order named", async () => {
    const one = JSON.parse((await cli(["varieties", demo, "-d", "careful", "--json"])).stdout);
    expect(one.pairs.map((p: { a: string; b: string }) => [p.a, p.b])).toEqual([["careful", "general"], ["careful", "regional"]]);
    const two = JSON.parse((await cli(["varieties", demo, "-d", "careful", "-d", "general", "--json"])).stdout);
    expect(two.pairs.map((p: { a: string; b: string }) => [p.a, p.b])).toEqual([["careful", "general"]]);
  });

  it("an unknown variety is an error at its -d argument; exit 1, nothing on standard output", async () => {
    const r = await cli(["varieties", demo, "-d", "scottish"]);
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/^command line:1:\d+: error: The build has no variety 'scottish'; its varieties are general, careful, regional\. \[varieties\/unknown-variety\]/);
    expect(r.stderr).toContain("^^^^^^^^");
  });

  it("not a build folder, a missing folder, a build with one variety: positioned errors, exit 1", async () => {
    const notBuild = await cli(["varieties", join(root, "lexicons", "en-us")]);
    expect([notBuild.exitCode, notBuild.stdout]).toEqual([1, ""]);
    expect(notBuild.stderr).toMatch(/build\.json:1:1: error: Not a build folder.*\[regress\/no-record\]/);
    const missing = await cli(["varieties", join(root, "nowhere")]);
    expect(missing.exitCode).toBe(1);
    expect(missing.stderr).toMatch(/^command line:1:\d+: error: The build folder '.*nowhere' does not exist\. \[cli\/no-such-folder\]/);
    const single = join(root, "single", "demo");
    mkdirSync(single, { recursive: true });
    const record = JSON.parse(readFileSync(join(demo, "build.json"), "utf8"));
    writeFileSync(join(single, "build.json"), JSON.stringify({ ...record, varieties: record.varieties.slice(0, 1) }));
    const one = await cli(["varieties", single]);
    expect(one.exitCode).toBe(1);
    expect(one.stderr).toMatch(/error: The build holds one variety \(general\): a comparison needs two\. \[varieties\/one-variety\]/);
    expect(existsSync(join(single, "comparison.json"))).toBe(false);
  });
});
