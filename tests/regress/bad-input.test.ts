// Bad input to compare, accept and the pinned expectations: builds of different lexicon folders,
// different variety lists, a missing or truncated file, an older output format, a broken
// pinned.csv. Each gives a clear message naming the file, a non-zero exit, and overwrites nothing.

import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, renameSync, rmSync, truncateSync, writeFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { runCompare } from "../../src/regress/run.js";
import { acceptBuild } from "../../src/regress/accept.js";
import { readPins } from "../../src/regress/pinned.js";
import { build, copyLexicons, edit } from "./support.js";

let root: string;
let good: string;
const opts = { examples: 3, json: false, reportOnly: false, quiet: false, color: false };

/** A copy of the good build to damage. */
function damaged(name: string, harm: (dir: string) => void): string {
  const dir = join(root, "damaged", name, "demo");
  cpSync(good, dir, { recursive: true });
  harm(dir);
  return dir;
}

beforeAll(async () => {
  root = copyLexicons();
  expect(await build(join(root, "lexicons", "demo"), join(root, "good"))).toBe(0);
  good = join(root, "good", "demo");
}, 120_000);

describe("compare refuses builds it cannot compare, naming the file, writing nothing", () => {
  const refuse = async (oldDir: string, newDir: string, file: RegExp, message: RegExp) => {
    const out = join(root, "out-" + Math.random().toString(36).slice(2));
    const o = await runCompare(oldDir, newDir, { ...opts, out });
    expect(o.exitCode).toBe(1);
    expect(o.diagnostics.length).toBe(1);
    expect(o.diagnostics[0]!.file).toMatch(file);
    expect(o.stderr).toMatch(message);
    expect(o.stderr).toMatch(/^\S+:\d+:\d+: error: [A-Z].*\. \[regress\/[a-z-]+\]\n$/);
    expect(existsSync(out)).toBe(false);
  };

  it("builds of different lexicon folders", async () => {
    const other = damaged("other", (d) => {
      const p = join(d, "build.json");
      writeFileSync(p, readFileSync(p, "utf8").replace('"name": "demo"', '"name": "harbour"'));
    });
    await refuse(good, other, /other\/demo\/build\.json$/, /different lexicon folders \('demo' in .*, 'harbour' here\)/);
  });

  it("different variety lists (unless one variety is chosen)", async () => {
    const fewer = damaged("fewer", (d) => {
      const p = join(d, "build.json");
      const r = JSON.parse(readFileSync(p, "utf8"));
      r.varieties = r.varieties.slice(0, 1);
      writeFileSync(p, JSON.stringify(r));
    });
    await refuse(good, fewer, /fewer\/demo\/build\.json$/, /different variety lists \(general, careful, regional in .*; general here\)/);
    expect((await runCompare(good, fewer, { ...opts, variety: "general" })).exitCode).toBe(0);
    const o = await runCompare(good, fewer, { ...opts, variety: "careful" });
    expect(o.exitCode).toBe(1);
    expect(o.stderr).toContain("has no variety 'careful'");
  });

  it("a missing entries file", async () => {
    const missing = damaged("missing", (d) => rmSync(join(d, "careful", "lexicon.jsonl")));
    await refuse(good, missing, /careful\/lexicon\.jsonl$/, /no entries for variety 'careful' \(this file is missing\)/);
  });

  it("a truncated entries file (cut inside a line, or whole lines lost)", async () => {
    const cut = damaged("cut", (d) => {
      const p = join(d, "general", "lexicon.jsonl");
      truncateSync(p, statSync(p).size - 40);
    });
    await refuse(good, cut, /cut\/demo\/general\/lexicon\.jsonl$/, /last line has no newline: the file is truncated/);
    const short = damaged("short", (d) => {
      const p = join(d, "general", "lexicon.jsonl");
      writeFileSync(p, readFileSync(p, "utf8").split("\n").slice(0, 100).join("\n") + "\n");
    });
    await refuse(short, good, /short\/demo\/general\/lexicon\.jsonl$/, /summary\.json states 391 entries but this file holds 100/);
  });

  it("an older output format: no build.json, an older format number, records without keys", async () => {
    const noRecord = damaged("norecord", (d) => rmSync(join(d, "build.json")));
    await refuse(noRecord, good, /norecord\/demo\/build\.json$/, /Not a build folder: there is no build\.json/);
    const old = damaged("format1", (d) => {
      const p = join(d, "build.json");
      writeFileSync(p, readFileSync(p, "utf8").replace('"format": 2', '"format": 1'));
    });
    await refuse(old, good, /format1\/demo\/build\.json$/, /older output format \(format 1/);
    const keyless = damaged("keyless", (d) => {
      const p = join(d, "general", "lexicon.jsonl");
      writeFileSync(p, readFileSync(p, "utf8").split("\n").map((l) => (l === "" ? l : JSON.stringify({ ...JSON.parse(l), key: undefined, derivation: undefined }))).join("\n"));
    });
    await refuse(good, keyless, /keyless\/demo\/general\/lexicon\.jsonl$/, /:1:1: error: This record has no entry key or derivation: the build is in an older output format/);
  });

  it("a path that is not a folder", async () => {
    await refuse(join(root, "nowhere"), good, /nowhere$/, /No build folder here/);
  });
});

describe("accept", () => {
  it("copies the build whole, and comparing the baseline with the build finds nothing", async () => {
    const baseline = join(root, "lexicons", "demo", "baseline");
    const r = await acceptBuild(good, baseline);
    expect(r.diagnostics).toEqual([]);
    expect(r.varieties).toEqual([{ name: "general", entries: 391 }, { name: "careful", entries: 391 }, { name: "regional", entries: 391 }]);
    expect(readdirSync(baseline).sort()).toEqual(["build.json", "careful", "general", "regional"]);
    expect(readdirSync(join(baseline, "general")).sort()).toEqual(["lexicon.jsonl", "lexicon.tsv", "pinned.json", "summary.json"]);
    const o = await runCompare(baseline, good, opts);
    expect(o.exitCode).toBe(0);
    expect(o.comparison!.varieties.every((v) => v.counts.unchanged === 391)).toBe(true);
    expect(readdirSync(join(root, "lexicons", "demo")).filter((n) => n.startsWith("."))).toEqual([]);
  });

  it("refuses a truncated build and leaves the previous baseline exactly as it was", async () => {
    const baseline = join(root, "lexicons", "demo", "baseline2");
    expect((await acceptBuild(good, baseline)).diagnostics).toEqual([]);
    const before = readFileSync(join(baseline, "general", "lexicon.jsonl"), "utf8");
    const cut = damaged("accept-cut", (d) => {
      const p = join(d, "general", "lexicon.jsonl");
      truncateSync(p, statSync(p).size - 10);
    });
    const r = await acceptBuild(cut, baseline);
    expect(r.diagnostics.map((d) => d.code)).toEqual(["regress/truncated"]);
    expect(readFileSync(join(baseline, "general", "lexicon.jsonl"), "utf8")).toBe(before);
    expect(readdirSync(join(root, "lexicons", "demo")).filter((n) => n.startsWith("."))).toEqual([]);
  });

  it("will not replace a folder that is not a baseline", async () => {
    const notBaseline = join(root, "precious");
    mkdirSync(notBaseline);
    writeFileSync(join(notBaseline, "notes.txt"), "keep me\n");
    const r = await acceptBuild(good, notBaseline);
    expect(r.diagnostics.map((d) => d.code)).toEqual(["regress/baseline-not-build"]);
    expect(readFileSync(join(notBaseline, "notes.txt"), "utf8")).toBe("keep me\n");
  });
});

describe("pinned expectations", () => {
  it("every shipped demo expectation holds (the build exits 0 and records them)", () => {
    const results = JSON.parse(readFileSync(join(good, "general", "pinned.json"), "utf8"));
    expect(results.length).toBeGreaterThanOrEqual(30);
    expect(results.filter((r: { passed: boolean }) => !r.passed)).toEqual([]);
    // Every pin names why and where from.
    expect(results.every((r: { why: string; source: string }) => r.why !== "" && r.source !== "")).toBe(true);
  });

  it("a broken pinned.csv is a positioned error and the build writes nothing", async () => {
    const dir = join(root, "lexicons", "demo");
    const pins = join(dir, "pinned.csv");
    const saved = readFileSync(pins, "utf8");
    writeFileSync(pins, [
      "entry,variety,check,value,why,source",
      "ten,,resembles,tʰ,why,src",
      "ten,posh,has,tʰ,why,src",
      "ten,,matches,(unclosed,why,src",
      "ten,,has,tʰ,,src",
      "",
    ].join("\n"));
    try {
      const r = readPins(dir, ["general", "careful"]);
      expect(r.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([
        ["pinned/check", 2, 6], ["pinned/variety", 3, 5], ["pinned/pattern", 4, 14], ["pinned/why", 5, 13],
      ]);
      expect(await build(dir, join(root, "pins-bad"))).toBe(1);
      expect(existsSync(join(root, "pins-bad"))).toBe(false);
    } finally {
      writeFileSync(pins, saved);
    }
  });

  it("a failing expectation fails the build with exit 4 and records the derivation", async () => {
    const dir = join(root, "lexicons", "demo");
    const pins = join(dir, "pinned.csv");
    const saved = readFileSync(pins, "utf8");
    writeFileSync(pins, saved + "ct0022,general,is,ˈθɝ.ti,A test of a failing pin,from memory\nnosuchword,,has,x,A pin on a word that is not there,from memory\n");
    try {
      expect(await build(dir, join(root, "pins-fail"))).toBe(4);
      const results = JSON.parse(readFileSync(join(root, "pins-fail", "demo", "general", "pinned.json"), "utf8"));
      const failed = results.filter((r: { passed: boolean }) => !r.passed);
      expect(failed.map((r: { entry: string }) => r.entry)).toEqual(["ct0022", "nosuchword"]);
      expect(failed[0].found[0].derivation).toEqual([{ step: "syllabify", form: "ˈθɝ.ti" }, { step: "flapping", form: "ˈθɝ.ɾi" }]);
      expect(failed[1].message).toBe("No entry 'nosuchword' in variety general.");
    } finally {
      writeFileSync(pins, saved);
    }
  }, 60_000);
});
