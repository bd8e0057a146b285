// The life cycle of a build's outputs, through `strata build` in-process: a variety's folder is
// replaced whole, every entry is in every format or is a reject, rows are reconciled from the
// written files, two lexicon folders never share an output folder, builds are locked, bad output
// paths are one positioned message, and outputs do not depend on where the checkout lies.

import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { hostname, tmpdir } from "node:os";
import { join, relative, resolve } from "node:path";
import { spawnSync } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { runBuild } from "../../src/cli/build.js";
import { loadGrammar } from "../../src/grammar/index.js";
import type { Engine } from "../../src/lexicon/engine.js";
import { runLexicon } from "../../src/lexicon/runner.js";

const ROOT = resolve(__dirname, "../..");
const GRAMMAR = join(ROOT, "lexicons", "en-us", "grammar.strata");
// One cache for every test file of a run (keys are content hashes, so sharing is safe).
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");
const opts = (out: string, more: Record<string, unknown> = {}) => ({ out, allowRejects: true, quiet: true, engine: "machine" as const, cache: true, cacheDir: SHARED_CACHE, samples: 0, workers: "0", syllableBreaks: true, ...more });

let errors: string[] = [];
let stdout: ReturnType<typeof vi.spyOn>;
let stderr: ReturnType<typeof vi.spyOn>;
beforeAll(() => {
  stdout = vi.spyOn(process.stdout, "write").mockImplementation(() => true);
  stderr = vi.spyOn(process.stderr, "write").mockImplementation((chunk: unknown) => {
    errors.push(String(chunk));
    return true;
  });
});
afterAll(() => {
  stdout.mockRestore();
  stderr.mockRestore();
});
/** Runs a build and returns its exit code and what it printed on stderr. */
async function build(dir: string, o: ReturnType<typeof opts>): Promise<{ code: number; err: string }> {
  errors = [];
  const code = await runBuild(dir, o);
  return { code, err: errors.join("") };
}

/** A lexicon folder `<parent>/<name>/` with one variety using the en-us grammar. */
function lexiconFolder(csv: string, name = "lex", parent = mkdtempSync(join(tmpdir(), "strata-out-"))): string {
  const dir = join(parent, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, "lexicon.csv"), csv);
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
  return dir;
}

const GOOD = ["word,pron", "kettle,ˈkɛtəl", "tundra,ˈtʌndɹə", "cat,ˈkæt", ""].join("\n");
const read = (p: string): string => readFileSync(p, "utf8");
const snapshot = (dir: string): Record<string, string> => Object.fromEntries(readdirSync(dir).sort().map((f) => [f, read(join(dir, f))]));

describe("reconciliation from what was written", () => {
  it("a lone CR in a quoted field never passes as reconciled while a row is lost (RFC 4180 §2: CR alone ends no record)", async () => {
    // Four data records; the second holds a lone CR inside quotes.
    const dir = lexiconFolder(["word,pron", "kettle,ˈkɛtəl", '"pin\rwheel",ˈpɪnwil', "tundra,ˈtʌndɹə", "cat,ˈkæt", ""].join("\n"));
    const out = join(dir, "..", "out");
    const { code, err } = await build(dir, opts(out));
    const base = join(out, "lex", "general");
    if (code === 70) {
      // The reader lost or shifted a row: the build says so and writes nothing.
      expect(err).toMatch(/lexicon\.csv:\d+:1: error: .*\[run\/unreconciled\]/);
      expect(existsSync(base)).toBe(false);
    } else {
      // Or every record is accounted for, by word, in the files themselves.
      const written = read(join(base, "lexicon.tsv")) + read(join(base, "rejects.csv"));
      for (const w of ["kettle", "tundra", "cat"]) expect(written).toContain(w);
      expect(read(join(base, "lexicon.tsv")).split("\n").length - 2 + read(join(base, "rejects.csv")).trimEnd().split("\n").length - 1).toBe(4);
    }
  });

  it("a build that does not reconcile leaves the previous run's folder as it was", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    expect((await build(dir, opts(out))).code).toBe(0);
    const before = snapshot(join(out, "lex", "general"));
    writeFileSync(join(dir, "lexicon.csv"), ["word,pron", "kettle,ˈkɛtəl", '"pin\rwheel",ˈpɪnwil', "tundra,ˈtʌndɹə", "cat,ˈkæt", ""].join("\n"));
    const { code } = await build(dir, opts(out));
    if (code === 70) expect(snapshot(join(out, "lex", "general"))).toEqual(before);
    else expect(read(join(out, "lex", "general", "lexicon.tsv"))).toContain("cat");
  });
});

describe("a variety's outputs are replaced together", () => {
  it("an entry PLS cannot hold is rejected everywhere and every file comes from the new run", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    expect((await build(dir, opts(out))).code).toBe(0);
    writeFileSync(join(dir, "lexicon.csv"), ["word,pron", "kettle,ˈkɛtəl", "bad\uFFFEword,ˈbæd", "zebra,ˈzibɹə", ""].join("\n"));
    expect((await build(dir, opts(out, { allowRejects: false }))).code).toBe(3);
    const base = join(out, "lex", "general");
    expect(readdirSync(base).sort()).toEqual(["lexicon.jsonl", "lexicon.pls", "lexicon.tsv", "rejects.csv", "stress.csv", "summary.json"]);
    // Every file of the folder is from the second run: all name zebra, none names tundra or cat.
    for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls"]) {
      expect(read(join(base, f))).toContain("zebra");
      expect(read(join(base, f))).not.toContain("tundra");
      expect(read(join(base, f))).not.toContain("bad");
    }
    // The reader refuses the character first (lexicon/not-a-character or lexicon/control-character);
    // the runner's up-front check (pls/invalid-xml-char, tested below) stands behind it.
    expect(read(join(base, "rejects.csv"))).toMatch(/^lexicon\.csv,3,\d+,(lexicon\/not-a-character|lexicon\/control-character|pls\/invalid-xml-char),/m);
    expect(JSON.parse(read(join(base, "summary.json")))).toMatchObject({ rowsRead: 3, entriesWritten: 2, rowsRejected: 1, reconciled: true });
    expect(readdirSync(join(out, "lex")).filter((f) => f.startsWith("."))).toEqual([]);
  });

  it("a narrow form PLS cannot hold (from the engine, not the input) is a reject in every format, checked before any is written", async () => {
    const dir = lexiconFolder(GOOD);
    const { inventory } = loadGrammar(GRAMMAR);
    // An engine whose output for one word holds U+0001 (XML 1.0 §2.2, production Char, excludes it).
    const engine: Engine = {
      steps: ["step"],
      // tundra is the only word of six segments (kettle has five, cat three).
      transcribeWord: (symbols) => {
        const narrow = symbols.length === 6 ? "tʌn\u0001dɹə" : `n${symbols.length}`;
        return { narrow, broad: "b", variants: [narrow], rules: [] };
      },
    };
    const out = join(dir, "..", "out", "general");
    const s = await runLexicon(engine, inventory!, join(dir, "lexicon.csv"), out, { name: "general", lang: "en-US" }, { formats: ["tsv", "jsonl", "pls"] });
    expect(s).toMatchObject({ rowsRead: 3, entriesWritten: 2, rowsRejected: 1, reconciled: true });
    expect(read(join(out, "rejects.csv"))).toMatch(/^lexicon\.csv,3,\d+,pls\/invalid-xml-char,"The narrow form/m);
    for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls"]) expect(read(join(out, f))).not.toContain("tundra");
    expect(read(join(out, "lexicon.pls")).match(/<lexeme>/g)?.length).toBe(2);
  });

  it("a folder where rejects.csv should be, or a file where the variety's folder should be, is replaced with the rest", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    mkdirSync(join(out, "lex", "general", "rejects.csv"), { recursive: true });
    expect((await build(dir, opts(out))).code).toBe(0);
    expect(statSync(join(out, "lex", "general", "rejects.csv")).isFile()).toBe(true);
    const other = lexiconFolder(GOOD);
    const out2 = join(other, "..", "out");
    mkdirSync(join(out2, "lex"), { recursive: true });
    writeFileSync(join(out2, "lex", "general"), "a file in the way");
    expect((await build(other, opts(out2))).code).toBe(0);
    expect(readdirSync(join(out2, "lex", "general")).length).toBe(6);
  });
});

describe("where a build writes", () => {
  it("refuses a folder that holds another lexicon folder's build (same name), suggesting -o", async () => {
    const a = lexiconFolder(GOOD, "twin");
    const b = lexiconFolder(["word,pron", "zebra,ˈzibɹə", ""].join("\n"), "twin");
    const out = mkdtempSync(join(tmpdir(), "strata-shared-out-"));
    expect((await build(a, opts(out))).code).toBe(0);
    const before = snapshot(join(out, "twin", "general"));
    const { code, err } = await build(b, opts(out));
    expect(code).toBe(1);
    expect(err).toContain("[output/other-lexicon]");
    expect(err).toContain("-o");
    expect(err.split("\n")[0]).toMatch(/:1:1: error: The output folder .*twin holds the build of another lexicon folder/);
    expect(snapshot(join(out, "twin", "general"))).toEqual(before);
    expect(JSON.parse(read(join(out, "twin", "run.json"))).source).toBe(a);
    // The same folder again is fine; so is another once the recorded one is gone (a moved checkout).
    expect((await build(a, opts(out))).code).toBe(0);
    rmSync(a, { recursive: true });
    expect((await build(b, opts(out))).code).toBe(0);
    expect(JSON.parse(read(join(out, "twin", "run.json"))).source).toBe(b);
  });

  it("locks the output folder: a second build while one runs is refused with the holder named", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    errors = [];
    const first = runBuild(dir, opts(out)); // takes the lock before its first await
    const second = await runBuild(dir, opts(out));
    expect(second).toBe(1);
    expect(errors.join("")).toContain("[output/locked]");
    expect(errors.join("")).toContain(`process ${process.pid}`);
    expect(await first).toBe(0);
    expect(existsSync(join(out, "lex", ".lock"))).toBe(false);
    expect((await build(dir, opts(out))).code).toBe(0);
  });

  it("a lock of a live process on this host holds; a lock of a dead process is taken over", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    mkdirSync(join(out, "lex"), { recursive: true });
    const lock = (pid: number): void =>
      writeFileSync(join(out, "lex", ".lock"), JSON.stringify({ pid, host: hostname(), source: dir, started: "2026-01-01T00:00:00.000Z", token: "t" }));
    lock(process.ppid); // the test runner's parent: alive
    const held = await build(dir, opts(out));
    expect(held.code).toBe(1);
    expect(held.err).toContain(`process ${process.ppid}`);
    expect(existsSync(join(out, "lex", "general"))).toBe(false);
    lock(deadPid());
    expect((await build(dir, opts(out))).code).toBe(0);
    expect(existsSync(join(out, "lex", ".lock"))).toBe(false);
    expect(readdirSync(join(out, "lex", "general")).length).toBe(6);
  });

  it("an output folder that is a file: one positioned line, exit 1, no stack trace", async () => {
    const dir = lexiconFolder(GOOD);
    const blocker = join(dir, "..", "out");
    writeFileSync(blocker, "not a folder\n");
    const { code, err } = await build(dir, opts(blocker));
    expect(code).toBe(1);
    // Refused on the command line (cli/output-is-file) before the output folder is opened.
    expect(err).toMatch(/^command line:1:\d+: error: The output '.*' is a file; give a folder\. \[cli\/output-is-file\]$/m);
    expect(err).not.toMatch(/\n\s+at /);
  });

  // /sys refuses new folders even to root (EPERM), so the permission case runs under any user (Linux only).
  it.runIf(process.platform === "linux" && existsSync("/sys/kernel"))("an output or cache folder without permission: one positioned error, or one warning", async () => {
    const dir = lexiconFolder(GOOD);
    const denied = await build(dir, opts("/sys/strata-test-out"));
    expect(denied.code).toBe(1);
    expect(denied.err.trim().split("\n")).toHaveLength(1);
    expect(denied.err).toMatch(/^\/sys\/strata-test-out\/lex:1:1: error: Cannot write this output: permission denied\. \[output\/unwritable\]$/m);
    const out = join(dir, "..", "out");
    const cacheless = await build(dir, opts(out, { cacheDir: "/sys/strata-test-cache", quiet: false }));
    expect(cacheless.code).toBe(0);
    expect(cacheless.err.split("\n").filter((l) => l.includes("[cache/unusable]"))).toEqual([
      "/sys/strata-test-cache:1:1: warning: The cache folder /sys/strata-test-cache cannot be used (permission denied); continuing without a cache. [cache/unusable]",
    ]);
  }, 120_000);

  it("a folder where run.json should be: one positioned line, exit 1, no variety written", async () => {
    const dir = lexiconFolder(GOOD);
    const out = join(dir, "..", "out");
    mkdirSync(join(out, "lex", "run.json"), { recursive: true });
    const { code, err } = await build(dir, opts(out));
    expect(code).toBe(1);
    expect(err.trim().split("\n")).toHaveLength(1);
    expect(err).toMatch(/run\.json:1:1: error: Cannot write this output: it is a folder, not a file\. \[output\/unwritable\]/);
    expect(existsSync(join(out, "lex", "general"))).toBe(false);
    expect(readdirSync(join(out, "lex"))).toEqual(["run.json"]);
  });

  it("a cache folder that is a file: one warning, and the build succeeds without a cache", async () => {
    // A grammar of one step, so compiling without a cache stays quick.
    const dir = lexiconFolder(GOOD);
    for (const f of ["segments.csv", "diacritics.csv"]) cpSync(join(ROOT, "lexicons", "en-us", f), join(dir, f));
    writeFileSync(join(dir, "small.strata"), 'inventory "segments.csv"\nsyllabify\n');
    writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: "small.strata" }] }));
    const out = join(dir, "..", "out");
    const blocker = join(dir, "..", "cache-file");
    writeFileSync(blocker, "x");
    const { code, err } = await build(dir, opts(out, { cacheDir: blocker, quiet: false }));
    expect(code).toBe(0);
    expect(err.split("\n").filter((l) => l.includes("[cache/unusable]")).length).toBe(1);
    expect(err).not.toContain("error:");
  }, 60_000);
});

describe("reproducible outputs", () => {
  it("the demo built from two copies of lexicons/ gives the same bytes in every file but run.json; no absolute path, final newlines", async () => {
    const copies = [0, 1].map(() => {
      const root = mkdtempSync(join(tmpdir(), "strata-copy-"));
      cpSync(join(ROOT, "lexicons"), join(root, "some", "lexicons"), { recursive: true });
      return root;
    });
    const outs: string[] = [];
    for (const root of copies) {
      const out = join(root, "build");
      expect((await build(join(root, "some", "lexicons", "demo"), opts(out))).code).toBe(0);
      outs.push(join(out, "demo"));
    }
    const files = (base: string): string[] =>
      readdirSync(base, { recursive: true, withFileTypes: true })
        .filter((e) => e.isFile() && e.name !== "run.json")
        .map((e) => relative(base, join(e.parentPath, e.name)))
        .sort();
    expect(files(outs[0]!)).toEqual(files(outs[1]!));
    expect(files(outs[0]!).length).toBeGreaterThanOrEqual(10);
    for (const f of files(outs[0]!)) {
      const a = readFileSync(join(outs[0]!, f));
      expect(a.equals(readFileSync(join(outs[1]!, f))), f).toBe(true);
      const text = a.toString("utf8");
      expect(text.endsWith("\n"), `${f} ends with a newline`).toBe(true);
      for (const root of copies) expect(text.includes(root), `${f} names ${root}`).toBe(false);
      expect(text.includes(tmpdir()), `${f} names the temp folder`).toBe(false);
    }
    const run = JSON.parse(read(join(outs[0]!, "run.json")));
    expect(run.source).toBe(join(copies[0]!, "some", "lexicons", "demo"));
    expect(run.varieties.map((v: { name: string; status: string }) => [v.name, v.status])).toEqual([["general", "written"], ["careful", "written"], ["regional", "written"]]);
    expect(typeof run.varieties[0].runMs).toBe("number");
    expect(read(join(outs[0]!, "run.json")).endsWith("\n")).toBe(true);
    const summary = read(join(outs[0]!, "general", "summary.json"));
    expect(summary).not.toMatch(/seconds|"ms"|time/i);
  }, 120_000);
});

/** The id of a process that has exited (a child run to completion). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ["-e", "process.stdout.write(String(process.pid))"], { encoding: "utf8" });
  return Number(r.stdout);
}
