// `strata build` end to end on the shipped demo and on small lexicons made for the test:
// files written whole, rows reconciled, rejects reported, PLS schema-valid, output byte-stable,
// and the compiled machines agreeing with the reference interpreter on every demo entry.

import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { runBuild } from "../../src/cli/build.js";
import { loadEngine } from "../../src/cli/common.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { checkAgainstInterpreter } from "../../src/lexicon/check.js";
import { plsSchemaErrors } from "../emit/pls-schema.js";
import { cli } from "./helpers.js";

const ROOT = resolve(__dirname, "../..");
const DEMO = join(ROOT, "lexicons", "demo");
const GRAMMAR = join(ROOT, "lexicons", "en-us", "grammar.strata");
const CACHE_OUT = mkdtempSync(join(tmpdir(), "strata-build-"));

// One cache for every test file of a run (keys are content hashes, so sharing is safe).
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");
const quietOpts = (out: string) => ({ out, allowRejects: false, quiet: true, engine: "machine" as const, cache: true, cacheDir: SHARED_CACHE, samples: 0, workers: "auto", syllableBreaks: true });

let stdout: ReturnType<typeof vi.spyOn>;
let stderr: ReturnType<typeof vi.spyOn>;
beforeAll(() => {
  stdout = vi.spyOn(process.stdout, "write").mockImplementation(() => true);
  stderr = vi.spyOn(process.stderr, "write").mockImplementation(() => true);
});
afterAll(() => {
  stdout.mockRestore();
  stderr.mockRestore();
});

/** A lexicon folder of our own with one variety using the en-us grammar. */
function lexiconFolder(csv: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-lex-"));
  writeFileSync(join(dir, "lexicon.csv"), csv);
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
  return dir;
}

const dataLines = (csv: string): number => csv.split(/\r?\n/).slice(1).filter((l) => l.trim() !== "" && !l.startsWith("#")).length;

describe("strata build on the shipped demo", () => {
  const out = join(CACHE_OUT, "demo-out");
  let code: number;
  beforeAll(async () => {
    code = await runBuild(DEMO, quietOpts(out));
  });

  it("exits 0 and writes every output for both varieties", () => {
    expect(code).toBe(0);
    for (const v of ["general", "careful"]) {
      const files = readdirSync(join(out, "demo", v)).sort();
      expect(files).toEqual(["lexicon.jsonl", "lexicon.pls", "lexicon.tsv", "pinned.json", "rejects.csv", "stress.csv", "summary.json"]);
    }
  });

  it("reconciles: rows read = entries written + rows rejected, and the TSV has one line per entry", () => {
    const csv = readFileSync(join(DEMO, "lexicon.csv"), "utf8");
    for (const v of ["general", "careful"]) {
      const summary = JSON.parse(readFileSync(join(out, "demo", v, "summary.json"), "utf8"));
      expect(summary.reconciled).toBe(true);
      expect(summary.rowsRead).toBe(dataLines(csv));
      expect(summary.entriesWritten + summary.rowsRejected).toBe(summary.rowsRead);
      const tsv = readFileSync(join(out, "demo", v, "lexicon.tsv"), "utf8").trimEnd().split("\n");
      expect(tsv[0]).toBe("key\tword\tnarrow\tbroad");
      expect(tsv.length - 1).toBe(summary.entriesWritten);
      const jsonl = readFileSync(join(out, "demo", v, "lexicon.jsonl"), "utf8").trimEnd().split("\n").map((l) => JSON.parse(l));
      expect(jsonl.length).toBe(summary.entriesWritten);
      expect(jsonl.every((e) => e.variants[0] === e.narrow)).toBe(true);
    }
  });

  it("writes PLS that our schema accepts (W3C PLS 1.0, Rec. 2008-10-14: lexeme = grapheme+, phoneme+)", () => {
    for (const v of ["general", "careful"]) {
      const xml = readFileSync(join(out, "demo", v, "lexicon.pls"), "utf8");
      expect(plsSchemaErrors(xml)).toEqual([]);
      // PLS 1.0 §4.1: root 'lexicon' in the PLS namespace, version 1.0, alphabet ipa, xml:lang from the variety.
      expect(xml).toMatch(/<lexicon xmlns="http:\/\/www\.w3\.org\/2005\/01\/pronunciation-lexicon" version="1\.0" alphabet="ipa" xml:lang="en-US">/);
    }
  });

  it("the varieties differ where the careful grammar leaves out flapping", () => {
    const general = readFileSync(join(out, "demo", "general", "lexicon.tsv"), "utf8");
    const careful = readFileSync(join(out, "demo", "careful", "lexicon.tsv"), "utf8");
    expect(general).toContain("ɾ");
    expect(careful).not.toContain("ɾ");
  });

  it("is byte-stable: a second build (from the cache) writes the same bytes", async () => {
    const again = join(CACHE_OUT, "demo-again");
    expect(await runBuild(DEMO, quietOpts(again))).toBe(0);
    for (const v of ["general", "careful"]) {
      for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls"]) {
        expect(readFileSync(join(again, "demo", v, f), "utf8")).toBe(readFileSync(join(out, "demo", v, f), "utf8"));
      }
    }
  });
});

describe("strata build --check", () => {
  it("compares the first entries with the reference interpreter and passes on the demo", async () => {
    const out = join(CACHE_OUT, "demo-check");
    const printed: string[] = [];
    stdout.mockImplementation((chunk: unknown) => {
      printed.push(String(chunk));
      return true;
    });
    try {
      expect(await runBuild(DEMO, { ...quietOpts(out), check: 40 })).toBe(0);
    } finally {
      stdout.mockImplementation(() => true);
    }
    expect(printed.join("")).toContain("check: 40 entries compared with the reference interpreter, 0 differ");
  });
});

describe("compiled machines against the reference interpreter on the demo lexicon", () => {
  it.each(["grammar", "careful"])("en-us %s: same narrow form, variants and broad form for every entry", async (name) => {
    const loaded = loadEngine(join(ROOT, "lexicons", "en-us", `${name}.strata`), { cacheDir: SHARED_CACHE });
    if (!("engine" in loaded)) throw new Error(JSON.stringify(loaded.diagnostics));
    const interp = new InterpreterEngine(loaded.grammar, loaded.inventory);
    const res = await checkAgainstInterpreter(loaded.engine, interp, loaded.inventory, join(DEMO, "lexicon.csv"));
    expect(res.compared).toBeGreaterThan(300);
    expect(res.mismatches).toEqual([]);
  });
});

describe("rejects", () => {
  const csv = [
    "word,pron,id",
    "# a comment line",
    "brindle,ˈbɹɪndəl,r1",
    "quorvish,ˈkwɔɹvɪ§,r2",
    "emptyrow,,r3",
    'broken,"ˈbɹoʊ"kən,r4',
    "tallow,ˈtæloʊ,r5",
    "",
  ].join("\n");

  it("reports each unreadable row with its line, keeps the others, and exits non-zero unless allowed", async () => {
    const dir = lexiconFolder(csv);
    const out = join(dir, "out");
    expect(await runBuild(dir, quietOpts(out))).toBe(3);
    const base = join(out, basenameOf(dir), "general");
    const summary = JSON.parse(readFileSync(join(base, "summary.json"), "utf8"));
    expect(summary).toMatchObject({ rowsRead: 5, entriesWritten: 2, rowsRejected: 3, reconciled: true });
    const rejects = readFileSync(join(base, "rejects.csv"), "utf8").trimEnd().split("\n");
    expect(rejects.length).toBe(4);
    expect(rejects.slice(1).map((l) => l.split(",")[1])).toEqual(["4", "5", "6"]);
    expect(readFileSync(join(base, "lexicon.tsv"), "utf8")).toMatch(/^r1\tbrindle\t/m);
    expect(readFileSync(join(base, "lexicon.tsv"), "utf8")).toMatch(/^r5\ttallow\t/m);
    expect(await runBuild(dir, { ...quietOpts(out), allowRejects: true })).toBe(0);
  });

  it("a word with a character XML 1.0 forbids is a reject in every output, and every output (PLS included) is written whole", async () => {
    const dir = lexiconFolder(["word,pron", "ok,ˈoʊ", "bad\u0001word,ˈbæd", ""].join("\n"));
    const out = join(dir, "out");
    expect(await runBuild(dir, quietOpts(out))).toBe(3);
    const base = join(out, basenameOf(dir), "general");
    expect(readdirSync(base).sort()).toEqual(["lexicon.jsonl", "lexicon.pls", "lexicon.tsv", "rejects.csv", "stress.csv", "summary.json"]);
    for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls"]) expect(readFileSync(join(base, f), "utf8")).not.toContain("bad");
    const rejects = readFileSync(join(base, "rejects.csv"), "utf8").trimEnd().split("\n");
    expect(rejects.slice(1).map((l) => l.split(",").slice(0, 4).join(","))).toEqual(["lexicon.csv,3,4,lexicon/control-character"]);
    expect(JSON.parse(readFileSync(join(base, "summary.json"), "utf8"))).toMatchObject({ rowsRead: 2, entriesWritten: 1, rowsRejected: 1, reconciled: true });
  });

  it("a missing manifest is a positioned error, not a crash", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-empty-"));
    mkdirSync(join(dir, "x"));
    expect(await runBuild(join(dir, "x"), quietOpts(join(dir, "out")))).toBe(1);
  });
});

function basenameOf(p: string): string {
  return p.split(/[\\/]/).filter(Boolean).pop()!;
}

describe("build's command line", () => {
  // The stdout/stderr spies above are replaced by the helper's own while a command runs.
  it("--variety NAME (or -d) builds that variety only", async () => {
    const out = mkdtempSync(join(tmpdir(), "strata-one-"));
    const r = await cliRun(["build", DEMO, "-d", "careful", "-o", out, "--cache-dir", SHARED_CACHE, "-q"]);
    expect(r.exitCode).toBe(0);
    expect(readdirSync(join(out, "demo")).filter((f) => !f.endsWith(".json"))).toEqual(["careful"]); // beside run.json
    const unknown = await cliRun(["build", DEMO, "--variety", "casual", "-o", out]);
    expect(unknown.exitCode).toBe(1);
    expect(unknown.stderr).toMatch(/^command line:1:\d+: error: There is no variety 'casual' in demo's varieties\.json; its varieties are general, careful, regional\. \[cli\/unknown-variety\]/);
  });

  it("a folder after --format is the folder, not another format (it was swallowed before)", async () => {
    const out = mkdtempSync(join(tmpdir(), "strata-fmt-"));
    const dir = lexiconFolder("word,pron\nbrindle,ˈbɹɪndəl\n");
    const r = await cliRun(["build", "--format", "tsv", dir, "-o", out, "--cache-dir", SHARED_CACHE, "-q"]);
    expect(r.stderr).toBe("");
    expect(r.exitCode).toBe(0);
    const files = readdirSync(join(out, basenameOf(dir), "general"));
    expect(files).toContain("lexicon.tsv");
    expect(files).not.toContain("lexicon.pls");
    const two = await cliRun(["build", dir, "--format", "tsv,pls", "--format", "jsonl", "-o", join(out, "b"), "--cache-dir", SHARED_CACHE, "-q"]);
    expect(two.exitCode).toBe(0);
    expect(readdirSync(join(out, "b", basenameOf(dir), "general"))).toEqual(expect.arrayContaining(["lexicon.tsv", "lexicon.pls", "lexicon.jsonl"]));
  });

  it("prints every problem with the lexicon file, also with -q (errors are never quiet)", async () => {
    const dir = lexiconFolder("# a comment first\nword,word,ipa\nbrindle,brindle,ˈbɹɪndəl\n");
    const out = mkdtempSync(join(tmpdir(), "strata-errs-"));
    const r = await cliRun(["build", dir, "-o", out, "--cache-dir", SHARED_CACHE, "-q"]);
    expect(r.exitCode).toBe(1);
    expect(r.stderr).toMatch(/lexicon\.csv:2:\d+: error: The column 'word' appears twice in the header\. \[lexicon\/duplicate-column\]/);
    expect(r.stderr).toMatch(/lexicon\.csv:2:\d+: error: The header has no 'pron' column .*\[lexicon\/missing-column\]/);
    expect(r.stdout).toBe("");
  });

  it("--json prints the summaries as data; counts agree in number in the text report", async () => {
    const dir = lexiconFolder("word,pron\nbrindle,ˈbɹɪndəl\n");
    const out = mkdtempSync(join(tmpdir(), "strata-json-"));
    const j = await cliRun(["build", dir, "-o", out, "--cache-dir", SHARED_CACHE, "--json"]);
    expect(j.exitCode).toBe(0);
    const doc = JSON.parse(j.stdout) as { varieties: { variety: string; rowsRead: number; entriesWritten: number; reconciled: boolean }[] };
    expect(doc.varieties).toMatchObject([{ variety: "general", rowsRead: 1, entriesWritten: 1, reconciled: true }]);
    const text = await cliRun(["build", dir, "-o", out, "--cache-dir", SHARED_CACHE, "--samples", "0"]);
    expect(text.stdout).toContain("1 word, 1 entry with variants (2 variants in all)"); // was "1 words"
  });
});

async function cliRun(args: string[]) {
  stdout.mockRestore();
  stderr.mockRestore();
  try {
    return await cli(args);
  } finally {
    stdout = vi.spyOn(process.stdout, "write").mockImplementation(() => true);
    stderr = vi.spyOn(process.stderr, "write").mockImplementation(() => true);
  }
}
