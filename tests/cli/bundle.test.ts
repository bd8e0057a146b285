// The bundle (scripts/bundle.mjs: what the `strata` bin, npm start and the bench run) against tsc's
// modules it is made from: the same bytes out for every format and output file, with and without
// worker threads (the workers' scripts are bundled too), on a cold cache (the composing worker) and
// a warm one, the same diagnostics and exit codes on bad input, and each command's code loaded only
// when that command runs.

import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { folderBytes, writeCmuSlice } from "../support/cmu-slice.js";

const ROOT = resolve(__dirname, "../..");
const DIST = join(ROOT, "build", "test-dist", "bundle");
const MODULES = join(DIST, "src", "cli", "main.js");
const BUNDLE = join(DIST, "bun", "main.js");

let lexDir = "";
let work = "";

const run = (cli: string, args: readonly string[], env: NodeJS.ProcessEnv = {}) =>
  spawnSync(process.execPath, [cli, ...args], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 28, env: { ...process.env, ...env } });

beforeAll(() => {
  rmSync(DIST, { recursive: true, force: true });
  execFileSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", ROOT, "--outDir", DIST], { stdio: "inherit" });
  execFileSync(process.execPath, [join(ROOT, "scripts", "bundle.mjs"), join(DIST, "src"), join(DIST, "bun")], { stdio: "inherit" });
  work = mkdtempSync(join(tmpdir(), "strata-bundle-"));
  lexDir = join(work, "words");
  mkdirSync(lexDir);
  // Every 25th CMU entry (about 5,400 rows: several chunks for the workers), plus rows the build rejects.
  writeCmuSlice(ROOT, 25, join(lexDir, "lexicon.csv"));
  writeFileSync(join(lexDir, "lexicon.csv"), readFileSync(join(lexDir, "lexicon.csv"), "utf8") + "unknownsym,k æ ☃,\nemptypron,,\n");
  writeFileSync(join(lexDir, "varieties.json"), JSON.stringify({
    lexicon: "lexicon.csv",
    varieties: [
      { name: "general", lang: "en-US", grammar: join(ROOT, "lexicons", "en-us", "grammar.strata") },
      { name: "careful", lang: "en-US", grammar: join(ROOT, "lexicons", "en-us", "careful.strata") },
    ],
  }));
}, 300_000);

/** Builds the lexicon with `cli`; the variety folders' bytes (run records and timings left out). */
function built(cli: string, workers: number, cache: string): Record<string, Record<string, string>> {
  const out = mkdtempSync(join(work, "out-"));
  const r = run(cli, ["build", lexDir, "--out", out, "--cache-dir", cache, "--quiet", "--allow-rejects", "--workers", String(workers)]);
  expect(r.status, r.stderr).toBe(0);
  const top = join(out, "words");
  return Object.fromEntries(readdirSync(top).filter((d) => existsSync(join(top, d, "lexicon.tsv"))).sort().map((d) => [d, folderBytes(join(top, d))]));
}

describe("the bundle", () => {
  it("holds the entry and the three worker scripts, and the commands in chunks of their own", () => {
    const names = readdirSync(join(DIST, "bun"));
    for (const f of ["main.js", "worker.js", "check-worker.js", "compose-worker.js"]) expect(names).toContain(f);
    expect(names.some((n) => /^transcribe-[A-Z0-9]+\.js$/.test(n))).toBe(true);
    expect(names.some((n) => /^build-[A-Z0-9]+\.js$/.test(n))).toBe(true);
    expect(readFileSync(BUNDLE, "utf8").startsWith("#!/usr/bin/env node\n")).toBe(true);
  });

  it("strata build writes the same bytes as tsc's modules, cold and warm, with 0 and 2 workers", () => {
    const cold = join(work, "cache-cold-bundle");
    const reference = built(MODULES, 0, join(work, "cache-modules"));
    expect(Object.keys(reference)).toEqual(["careful", "general"]);
    expect(reference.general!["rejects.csv"]!.split("\n").length).toBeGreaterThan(2);
    expect(built(BUNDLE, 0, cold)).toEqual(reference); // cold: compiles (the composing worker when a core is idle)
    expect(readdirSync(cold).some((f) => f.endsWith(".bin"))).toBe(true);
    expect(built(BUNDLE, 0, cold)).toEqual(reference); // warm: from the cache it wrote
    expect(built(BUNDLE, 2, cold)).toEqual(reference);
  }, 300_000);

  it("strata transcribe writes the same bytes as tsc's modules in every format, and the same stress report", () => {
    const cache = join(work, "cache-transcribe");
    for (const format of ["tsv", "jsonl", "pls"]) {
      const outs = [MODULES, BUNDLE].map((cli) => {
        // One report path for both (stderr names it); each run's report is read before the next writes it.
        const report = join(work, `stress-${format}.csv`);
        const r = run(cli, ["transcribe", "-g", join(ROOT, "lexicons", "en-us"), "--cache-dir", cache, "--format", format, "--allow-rejects", "--stress-report", report, join(lexDir, "lexicon.csv")]);
        expect(r.status, r.stderr).toBe(0);
        return { stdout: r.stdout, stderr: r.stderr, report: readFileSync(report, "utf8") };
      });
      expect(outs[0]!.stdout.length).toBeGreaterThan(100_000);
      expect(outs[1]).toEqual(outs[0]);
    }
  }, 300_000);

  it("gives the same diagnostics and exit codes on bad input and bad options", () => {
    const bad = join(work, "bad.strata");
    writeFileSync(bad, 'inventory "' + join(ROOT, "lexicons", "en-us", "segments.csv") + '"\nrule broken: [+nosuchfeature] -> [-voice] / _ #\n');
    const cases: string[][] = [
      ["transcribe", "-g", bad, join(lexDir, "lexicon.csv")],
      ["transcribe", "--format", "xml", join(lexDir, "lexicon.csv")],
      ["build", join(work, "no-such-folder")],
      ["nosuchcommand"],
      ["--version"],
    ];
    for (const args of cases) {
      const [m, b] = [MODULES, BUNDLE].map((cli) => run(cli, args, { NO_COLOR: "1" }));
      expect({ status: b!.status, stdout: b!.stdout, stderr: b!.stderr }, args.join(" ")).toEqual({ status: m!.status, stdout: m!.stdout, stderr: m!.stderr });
      if (args[0] !== "--version") expect(m!.status, args.join(" ")).not.toBe(0);
    }
  });

  it("the thread checking the written files: its death fails the build and leaves the previous outputs as they were", () => {
    const out = mkdtempSync(join(work, "out-check-"));
    const args = ["build", lexDir, "--out", out, "--cache-dir", join(work, "cache-transcribe"), "--quiet", "--allow-rejects"];
    expect(run(BUNDLE, args).status).toBe(0);
    const before = Object.fromEntries(["general", "careful"].map((v) => [v, folderBytes(join(out, "words", v))]));
    const r = run(BUNDLE, args, { STRATA_TEST_CHECK_EXIT: "1" });
    expect(r.status).toBe(70);
    expect(r.stderr).toContain("the thread checking the written files stopped");
    expect(readdirSync(join(out, "words")).filter((n) => n.startsWith("."))).toEqual([]);
    expect(Object.fromEntries(["general", "careful"].map((v) => [v, folderBytes(join(out, "words", v))]))).toEqual(before);
  }, 300_000);

  it("the checking thread reads the first variety's TSV and JSON Lines as they are written, and its check uses that read-back", () => {
    // The read-back made while the files were written loses a line (a hook for this test): the
    // reconciliation must then fail, which shows it used that read-back and not a fresh one.
    const out = mkdtempSync(join(work, "out-follow-"));
    const args = ["build", lexDir, "--out", out, "--cache-dir", join(work, "cache-transcribe"), "--quiet", "--allow-rejects"];
    const r = run(BUNDLE, args, { STRATA_TEST_FOLLOW_LOSES_LINE: "1" });
    expect(r.status, r.stderr).not.toBe(0);
    expect(r.stderr).toMatch(/lexicon\.(tsv|jsonl)/);
    // Nothing of the failed variety was put in place.
    expect(existsSync(join(out, "words", "general", "lexicon.tsv"))).toBe(false);
    expect(run(BUNDLE, args).status).toBe(0);
  }, 300_000);

  it("a worker thread that dies fails the bundled build, as it fails tsc's", () => {
    const out = mkdtempSync(join(work, "out-dies-"));
    const r = run(BUNDLE, ["build", lexDir, "--out", out, "--cache-dir", join(work, "cache-transcribe"), "--quiet", "--workers", "1"], { STRATA_TEST_WORKER_EXIT: "1" });
    expect(r.status).not.toBe(0);
    expect(r.stderr).toContain("a worker thread stopped");
  });
});
