// The compiled CLI spreads a lexicon over worker threads a chunk of the file each (lexicon/chunks.ts):
// the outputs must be byte for byte those of one thread, whatever the number of workers, on a file
// made to catch what needs the whole file in order — words and ids repeated far apart (in other
// chunks), rejects (a quoted field cut by a line feed, an unknown symbol, an empty pronunciation, a
// duplicate id), a lone CR inside a quoted field (a record of two lines: every later line number
// moves), comments and blank lines before the header and between rows. A worker that dies ends the
// run with an error and leaves the previous outputs as they were.

import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { dictionary } from "cmu-pronouncing-dictionary";
import { csvLine } from "../../src/emit/csv.js";
import { importArpabetDictionary, loadArpabetTable } from "../../src/lexicon/arpabet.js";
import { folderBytes } from "../support/cmu-slice.js";

const ROOT = resolve(__dirname, "../..");
const CLI = join(ROOT, "dist", "src", "cli", "main.js");
const CACHE = join(tmpdir(), "strata-test-cache");
const WORKERS = [0, 1, 2, 3];

/** A lexicon folder of about 12,000 CMU rows with the traps above; returns its folder. */
function writeTrickyLexicon(dir: string): string {
  const table = loadArpabetTable(join(ROOT, "lexicons", "en-us", "arpabet.csv")).table!;
  const dict = dictionary as Readonly<Record<string, string>>;
  const kept = Object.fromEntries(Object.entries(dict).filter((_, i) => i % 11 === 0));
  const rows = importArpabetDictionary(kept, table, { file: "cmu" }).rows;
  const lines: string[] = ["# a comment before the header\n", "\n", csvLine(["word", "pron", "id", "note"])];
  rows.forEach((r, i) => {
    // Every 40th row has an id; every 997th reuses the id of a row 4,000 rows back (another chunk).
    const id = i % 40 === 0 ? `id${i}` : i % 997 === 0 && i >= 4000 ? `id${(i - 4000) - ((i - 4000) % 40)}` : "";
    lines.push(csvLine([r.word, r.pron, id, r.note ?? ""]));
    // The word of a row 5,000 back, again (its key counts the rows of it in earlier chunks).
    if (i % 613 === 0 && i >= 5000) lines.push(csvLine([rows[i - 5000]!.word, rows[i - 5000]!.pron, "", "again"]));
    if (i % 2503 === 0) lines.push("# a comment between rows\n", "   \n");
    if (i % 3001 === 1) lines.push(`broken,"k æ\nt",,a quoted field cut by a line feed\n`);
    if (i % 3001 === 2) lines.push(`crlf,k æ t,,"a note\rwith a lone CR"\n`);
    if (i % 3001 === 3) lines.push("unknownsym,k æ ☃,,\n", "emptypron,,,\n");
  });
  const folder = join(dir, "tricky");
  rmSync(folder, { recursive: true, force: true });
  execFileSync("mkdir", ["-p", folder]);
  writeFileSync(join(folder, "lexicon.csv"), lines.join(""));
  writeFileSync(join(folder, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: join(ROOT, "lexicons", "en-us", "grammar.strata") }] }));
  return folder;
}

describe("the compiled CLI with worker threads", () => {
  let folder = "";
  beforeAll(() => {
    execFileSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", ROOT], { stdio: "inherit" });
    folder = writeTrickyLexicon(mkdtempSync(join(tmpdir(), "strata-chunks-")));
  }, 300_000);

  it("the test lexicon spans several chunks and holds every trap", () => {
    const text = readFileSync(join(folder, "lexicon.csv"), "utf8");
    expect(statSync(join(folder, "lexicon.csv")).size).toBeGreaterThan(16_384 + 2 * 131_072);
    for (const trap of ["\r", "again", "broken,", "unknownsym", "# a comment between"]) expect(text).toContain(trap);
  });

  it("strata build writes byte-identical folders with 0, 1, 2 and 3 workers (rejects, stress.csv and summary.json included)", () => {
    const folders = WORKERS.map((w) => {
      const out = mkdtempSync(join(tmpdir(), `strata-cw${w}-`));
      const r = spawnSync(process.execPath, [CLI, "build", folder, "--out", out, "--cache-dir", CACHE, "--quiet", "--allow-rejects", "--workers", String(w)], { cwd: ROOT, encoding: "utf8" });
      expect(r.status, r.stderr).toBe(0);
      return folderBytes(join(out, readdirSync(out).find((d) => d !== "cache")!, "general"));
    });
    const rejects = folders[0]!["rejects.csv"]!;
    for (const code of ["lexicon/duplicate-id", "ipa/", "lexicon/empty-pron"]) expect(rejects).toContain(code);
    expect(folders[0]!["lexicon.tsv"]).toContain("#2\t");
    for (const f of folders.slice(1)) for (const name of Object.keys(folders[0]!)) expect(f[name], name).toBe(folders[0]![name]);
  }, 300_000);

  for (const format of ["tsv", "jsonl"]) {
    it(`strata transcribe --format ${format} writes the same bytes, rejects and stress report with 0, 1, 2 and 3 workers`, () => {
      const runs = WORKERS.map((w) => {
        const report = join(folder, `stress-${format}-${w}.csv`);
        const r = spawnSync(process.execPath, [CLI, "transcribe", "-g", join(ROOT, "lexicons", "en-us"), "--cache-dir", CACHE, "--format", format, "--stress-report", report, "--workers", String(w), join(folder, "lexicon.csv")], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 28 });
        return { status: r.status, stdout: r.stdout, stderr: r.stderr.split(report).join("REPORT"), report: readFileSync(report, "utf8") };
      });
      expect(runs[0]!.status).toBe(3);
      expect(runs[0]!.stderr).toContain("duplicate-id");
      expect(runs[0]!.stdout.split("\n").length).toBeGreaterThan(10_000);
      for (const r of runs.slice(1)) expect(r).toEqual(runs[0]);
    }, 300_000);
  }

  it("a worker that dies ends the build with an error and leaves the previous outputs as they were", () => {
    const out = mkdtempSync(join(tmpdir(), "strata-crash-"));
    const args = [CLI, "build", folder, "--out", out, "--cache-dir", CACHE, "--quiet", "--allow-rejects"];
    expect(spawnSync(process.execPath, [...args, "--workers", "0"], { cwd: ROOT, encoding: "utf8" }).status).toBe(0);
    const variety = join(out, "tricky", "general");
    const before = folderBytes(variety);
    const r = spawnSync(process.execPath, [...args, "--workers", "1"], { cwd: ROOT, encoding: "utf8", env: { ...process.env, STRATA_TEST_WORKER_EXIT: "1" } });
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/worker thread stopped/);
    expect(folderBytes(variety)).toEqual(before);
    expect(readdirSync(join(out, "tricky")).filter((n) => n.startsWith(".")).length).toBe(0);
    expect(existsSync(join(variety, "lexicon.tsv"))).toBe(true);
  }, 300_000);
});
