// The outputs do not depend on how fast they were made: on CMU slices (npm
// `cmu-pronouncing-dictionary`, ISC) the machine engine writes the same bytes as the reference
// interpreter's engine, the compiled CLI the same bytes with 0, 1 and 2 worker threads, and the
// machine engine the bytes of the fixture written by main without the speed work (tests/fixtures/speed/).
// Every file of the output folder is compared, so a format change others make is covered as it lands.

import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { machineEngine } from "../../src/lexicon/engine-machine.js";
import { runLexicon } from "../../src/lexicon/runner.js";
import { folderBytes, writeCmuSlice } from "../support/cmu-slice.js";

const ROOT = resolve(__dirname, "../..");
const CLI = join(ROOT, "dist", "src", "cli", "main.js");
const GRAMMAR = join(ROOT, "lexicons", "en-us", "grammar.strata");
// One cache for every test file of a run (keys are content hashes, so sharing is safe).
const CACHE = join(tmpdir(), "strata-test-cache");
/** The fixture slice, named relative to the package root so its records name it the same everywhere. */
const FIXTURE_CSV = "tests/fixtures/speed/cmu-slice.csv";
const EXPECTED = join(ROOT, "tests", "fixtures", "speed", "expected");
const VARIETY = { name: "general", lang: "en-US" };

const loaded = loadGrammar(GRAMMAR);
if (loaded.grammar === undefined || loaded.inventory === undefined) throw new Error("the en-us grammar does not load");
const grammar = loaded.grammar;
const inv = loaded.inventory;

/** JSON Lines records with their non-preferred variants sorted (with any per-variant array kept parallel); PLS lexemes likewise. */
function variantsAsSets(files: Record<string, string>): Record<string, string> {
  const out = { ...files };
  const jsonl = files["lexicon.jsonl"];
  if (jsonl !== undefined) {
    out["lexicon.jsonl"] = jsonl.split("\n").map((line) => {
      if (line === "") return line;
      const r = JSON.parse(line) as Record<string, unknown>;
      const vs = r["variants"] as string[];
      const steps = r["variantSteps"] as unknown[] | undefined;
      const order = vs.map((_, i) => i).slice(1).sort((x, y) => (vs[x]! < vs[y]! ? -1 : vs[x]! > vs[y]! ? 1 : 0));
      r["variants"] = [vs[0], ...order.map((i) => vs[i])];
      if (steps !== undefined) r["variantSteps"] = [steps[0], ...order.map((i) => steps[i])];
      return JSON.stringify(r);
    }).join("\n");
  }
  const pls = files["lexicon.pls"];
  if (pls !== undefined) {
    out["lexicon.pls"] = pls.replace(/<lexeme>[\s\S]*?<\/lexeme>/g, (lx) => {
      const lines = lx.split("\n");
      const phonemes = lines.filter((l) => l.includes("<phoneme"));
      const first = phonemes.find((l) => l.includes('prefer="true"')) ?? phonemes[0];
      const rest = phonemes.filter((l) => l !== first).sort();
      return [...lines.filter((l) => !l.includes("<phoneme")), first, ...rest].join("\n");
    });
  }
  return out;
}

/** A lexicon folder holding every `step`-th CMU entry, run through the en-us grammar. */
function cmuSlice(step: number): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-slice-"));
  writeCmuSlice(ROOT, step, join(dir, "lexicon.csv"));
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
  return dir;
}

describe("outputs are the same however they are made", () => {
  const slice = cmuSlice(97);

  it("machine engine = reference interpreter engine on a CMU slice (TSV, JSON Lines, PLS, rejects, summary)", async () => {
    const machine = machineEngine(grammar, inv, { cacheDir: CACHE }).engine!;
    const interp = new InterpreterEngine(grammar, inv);
    const a = mkdtempSync(join(tmpdir(), "strata-m-"));
    const b = mkdtempSync(join(tmpdir(), "strata-i-"));
    const sa = await runLexicon(machine, inv, join(slice, "lexicon.csv"), a, VARIETY);
    const sb = await runLexicon(interp, inv, join(slice, "lexicon.csv"), b, VARIETY);
    expect(sa.entriesWritten).toBeGreaterThan(1000);
    // The slice exercises the variants path: entries with several variants exist in it.
    expect(sa.entriesWithVariants).toBeGreaterThan(20);
    expect(sb.entriesWritten).toBe(sa.entriesWritten);
    // The two engines list the non-preferred variants in different orders (the machine by symbol
    // ids, the interpreter by derivation), as they always have: compare them as sets, the rest exactly.
    const [fa, fb] = [folderBytes(a), folderBytes(b)].map(variantsAsSets);
    expect(fa).toEqual(fb);
    expect(fa["lexicon.tsv"]).toBe(folderBytes(b)["lexicon.tsv"]);
  }, 300_000);

  it("machine engine = the fixture written without the speed work (STRATA_UPDATE_FIXTURES=1 rewrites it after a format change)", async () => {
    const machine = machineEngine(grammar, inv, { cacheDir: CACHE }).engine!;
    const out = mkdtempSync(join(tmpdir(), "strata-f-"));
    const cwd = process.cwd();
    process.chdir(ROOT);
    try {
      await runLexicon(machine, inv, FIXTURE_CSV, out, VARIETY);
    } finally {
      process.chdir(cwd);
    }
    const got = folderBytes(out);
    if (process.env["STRATA_UPDATE_FIXTURES"] === "1") {
      mkdirSync(EXPECTED, { recursive: true });
      for (const name of Object.keys(got)) writeFileSync(join(EXPECTED, name), got[name]!);
    }
    const want = folderBytes(EXPECTED);
    expect(Object.keys(want).length).toBeGreaterThanOrEqual(4);
    for (const name of Object.keys(want)) expect(got[name], name).toBe(want[name]);
  }, 120_000);

  describe("the compiled CLI", () => {
    beforeAll(() => {
      execFileSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", ROOT], { stdio: "inherit" });
    }, 300_000);

    it("writes byte-identical build folders with 0, 1 and 2 worker threads", () => {
      const folders = [0, 1, 2].map((w) => {
        const out = mkdtempSync(join(tmpdir(), `strata-w${w}-`));
        execFileSync(process.execPath, [CLI, "build", slice, "--out", out, "--cache-dir", CACHE, "--quiet", "--workers", String(w)], { cwd: ROOT, stdio: ["ignore", "pipe", "pipe"] });
        const variety = join(out, readdirSync(out).find((d) => d !== "cache")!, "general");
        return folderBytes(variety);
      });
      expect(folders[0]!["lexicon.tsv"]!.split("\n").length).toBeGreaterThan(1000);
      expect(folders[1]).toEqual(folders[0]);
      expect(folders[2]).toEqual(folders[0]);
    }, 300_000);
  });
});
