// Several varieties built together (one read of the lexicon, lines shared between varieties, the
// walk through shared steps taken over from the first variety) write the same bytes as each
// variety built alone: on a CMU slice (npm `cmu-pronouncing-dictionary`, ISC) with the bench's
// four en-us varieties (bench/varieties.ts), in process and through the compiled CLI with 0 and 1
// worker threads.

import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import { machineEngine, type MachineEngine } from "../../src/lexicon/engine-machine.js";
import { runLexicon, runVarieties } from "../../src/lexicon/runner.js";
import { followerPlan } from "../../src/lexicon/walk-share.js";
import { FOUR, writeFourVarieties } from "../../bench/varieties.js";
import { folderBytes, writeCmuSlice } from "../support/cmu-slice.js";

const ROOT = resolve(__dirname, "../..");
const CLI = join(ROOT, "dist", "src", "cli", "main.js");
const CACHE = join(tmpdir(), "strata-test-cache");

/** A lexicon folder with every `step`-th CMU entry and the bench's four varieties. */
function slice(step: number): string {
  const tmp = mkdtempSync(join(tmpdir(), "strata-four-"));
  writeCmuSlice(ROOT, step, join(tmp, "source.csv"));
  return writeFourVarieties(ROOT, join(tmp, "source.csv"), join(tmp, "four"));
}

describe("varieties built together = each built alone", () => {
  const dir = slice(131);
  const manifest = JSON.parse(readFileSync(join(dir, "varieties.json"), "utf8")) as { varieties: { name: string; lang: string; grammar: string }[] };
  const loaded = manifest.varieties.map((v) => {
    const g = loadGrammar(join(dir, v.grammar));
    if (g.grammar === undefined || g.inventory === undefined) throw new Error(`${v.grammar} does not load`);
    return { v, inventory: g.inventory, engine: machineEngine(g.grammar, g.inventory, { cacheDir: CACHE }).engine! };
  });

  it("the bench's varieties share steps with the first one, so the walk is taken over", () => {
    const [general, ...others] = loaded.map((l) => l.engine as MachineEngine);
    const shared = others.map((e) => followerPlan(general!, e)?.step ?? 0);
    // careful and careful-flap share the common rules (syllabify, stress and six rules); no-nasal-flap all but the nasal flap.
    expect(shared[0]).toBeGreaterThanOrEqual(8);
    expect(shared[1]).toBeGreaterThan(shared[0]!);
    expect(shared[2]).toBeGreaterThanOrEqual(8);
  });

  it("in process: runVarieties writes each variety's folder as runLexicon writes it alone", async () => {
    const together = mkdtempSync(join(tmpdir(), "strata-together-"));
    const alone = mkdtempSync(join(tmpdir(), "strata-alone-"));
    const csv = join(dir, "lexicon.csv");
    const sums = await runVarieties(loaded[0]!.inventory, csv, loaded.map((l) => ({ engine: l.engine, outDir: join(together, l.v.name), variety: l.v })), { sourceRoot: dir });
    expect(sums.map((s) => s.reconciled)).toEqual([true, true, true, true]);
    for (const l of loaded) {
      await runLexicon(l.engine, l.inventory, csv, join(alone, l.v.name), l.v, { sourceRoot: dir });
      const a = folderBytes(join(together, l.v.name));
      const b = folderBytes(join(alone, l.v.name));
      expect(Object.keys(a)).toEqual(["lexicon.jsonl", "lexicon.pls", "lexicon.tsv", "rejects.csv", "stress.csv", "summary.json"]);
      for (const f of Object.keys(b)) expect(a[f], `${l.v.name}/${f}`).toBe(b[f]);
    }
    // The varieties differ (else sharing would prove nothing): careful keeps the t that general flaps.
    expect(folderBytes(join(together, "careful"))["lexicon.tsv"]).not.toBe(folderBytes(join(together, "general"))["lexicon.tsv"]);
  }, 300_000);

  describe("the compiled CLI", () => {
    beforeAll(() => {
      execFileSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", ROOT], { stdio: "inherit" });
    }, 300_000);

    it("a build of the four varieties with 0 and 1 worker threads = builds of each variety alone", () => {
      const build = (args: string[]): string => {
        const out = mkdtempSync(join(tmpdir(), "strata-cli4-"));
        execFileSync(process.execPath, [CLI, "build", dir, "--out", out, "--cache-dir", CACHE, "--quiet", ...args], { cwd: ROOT, stdio: ["ignore", "pipe", "pipe"] });
        return join(out, "four");
      };
      const alone = Object.fromEntries(FOUR.map((v) => [v, folderBytes(join(build(["-d", v, "--workers", "0"]), v))]));
      for (const workers of ["0", "1"]) {
        const together = build(["--workers", workers]);
        for (const v of FOUR) expect(folderBytes(join(together, v)), `${v} with ${workers} workers`).toEqual(alone[v]);
      }
    }, 600_000);
  });
});
