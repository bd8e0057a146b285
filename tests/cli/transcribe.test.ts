// `strata transcribe` as a pipeline stage: the real CLI (compiled to dist/) reading standard input
// and writing each transcription as soon as its row arrives, in every output format.

import { execFileSync, spawn } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { plsSchemaErrors } from "../emit/pls-schema.js";

const ROOT = resolve(__dirname, "../..");
const CLI = join(ROOT, "dist", "src", "cli", "main.js");
// One cache for every test file of a run (keys are content hashes, so sharing is safe).
const CACHE = join(tmpdir(), "strata-test-cache");

beforeAll(() => {
  execFileSync(process.execPath, [join(ROOT, "node_modules", "typescript", "bin", "tsc"), "-p", ROOT], { stdio: "inherit" });
}, 300_000);

function run(args: string[], input: string): { stdout: string; stderr: string; status: number | null } {
  try {
    const stdout = execFileSync(process.execPath, [CLI, ...args], { input, cwd: ROOT, encoding: "utf8", stdio: ["pipe", "pipe", "pipe"] });
    return { stdout, stderr: "", status: 0 };
  } catch (e) {
    const err = e as { stdout: string; stderr: string; status: number };
    return { stdout: err.stdout, stderr: err.stderr, status: err.status };
  }
}

const G = ["transcribe", "-g", "lexicons/en-us", "--cache-dir", CACHE];

describe("strata transcribe", () => {
  it("streams: transcriptions come out while standard input is still open", async () => {
    const child = spawn(process.execPath, [CLI, ...G, "-"], { cwd: ROOT, stdio: ["pipe", "pipe", "pipe"] });
    let out = "";
    const lines: string[] = [];
    const gotLines = (n: number) =>
      new Promise<void>((res, rej) => {
        const check = () => (lines.length >= n ? res() : undefined);
        child.stdout.on("data", (d: Buffer) => {
          out += d.toString("utf8");
          lines.splice(0, lines.length, ...out.split("\n").filter((l) => l !== ""));
          check();
        });
        child.on("exit", () => (lines.length >= n ? res() : rej(new Error(`exited after ${lines.length} lines`))));
        check();
      });
    child.stdin.write("word,pron\nkettle,ˈkɛtəl\n");
    // The reader holds one row back until the next line arrives (csv-parse needs the line end
    // of the following record), so feed a second row and wait for the first transcription.
    child.stdin.write("pinwheel,ˈpɪnwil\n");
    await gotLines(2);
    expect(lines[0]).toBe("key\tword\tnarrow\tbroad");
    expect(lines[1]!.startsWith("kettle#1\tkettle\t")).toBe(true);
    child.stdin.end("tundra,ˈtʌndɹə\n");
    await new Promise((res) => child.on("close", res));
    expect(lines.length).toBe(4);
  }, 120_000);

  it("drops syllable breaks on request and keeps the stress marks (IPA Handbook 1999: ˈ before the stressed syllable)", () => {
    const input = "word,pron\ncatalog,ˈkætəlɔɡ\n";
    const dotted = run([...G], input).stdout.trim().split("\n")[1]!.split("\t");
    const plain = run([...G, "--no-syllable-breaks"], input).stdout.trim().split("\n")[1]!.split("\t");
    expect(dotted[2]).toContain(".");
    expect(plain[2]).not.toContain(".");
    expect(plain[2]).toBe(dotted[2]!.replace(/\./g, ""));
    expect(plain[2]!.startsWith("ˈ")).toBe(true);
  });

  it("writes JSON Lines with variants and the rules that applied", () => {
    const r = run([...G, "--format", "jsonl"], "word,pron,id\nbottle,ˈbɑtəl,b1\n");
    expect(r.status).toBe(0);
    const e = JSON.parse(r.stdout.trim());
    expect(e).toMatchObject({ word: "bottle", id: "b1" });
    expect(e.variants.length).toBeGreaterThan(1);
    expect(e.rules).toContain("flapping");
  });

  it("writes schema-valid PLS, grouping consecutive rows of one word into one lexeme", () => {
    const r = run([...G, "--format", "pls", "--lang", "en-US"], "word,pron\ntomato,təˈmeɪtoʊ\ntomato,təˈmɑtoʊ\nkit,ˈkɪt\n");
    expect(r.status).toBe(0);
    expect(plsSchemaErrors(r.stdout)).toEqual([]);
    expect(r.stdout.match(/<lexeme>/g)?.length).toBe(2);
    // W3C PLS 1.0 (Rec. 2008-10-14) §4.6: prefer="true" marks the preferred pronunciation among several.
    expect(r.stdout.match(/prefer="true"/g)?.length).toBe(1);
  });

  it("reports rejects on stderr with file:line:column and exits non-zero unless allowed", () => {
    const input = "word,pron\nfine,ˈfaɪn\nbad,ˈb§d\n";
    const r = run([...G], input);
    expect(r.status).toBe(3);
    expect(r.stderr).toMatch(/<stdin>:3:\d+: error:/);
    expect(r.stderr).toContain("2 rows read = 1 written + 1 rejected");
    expect(run([...G, "--allow-rejects"], input).status).toBe(0);
  });
});

describe("strata build with worker threads (compiled CLI)", () => {
  it("writes byte-identical outputs with no worker thread and with 1 and 2 of them", () => {
    const out1 = mkdtempSync(join(tmpdir(), "strata-w0-"));
    const out2 = mkdtempSync(join(tmpdir(), "strata-w1-"));
    const out3 = mkdtempSync(join(tmpdir(), "strata-w2-"));
    for (const [out, n] of [[out1, "0"], [out2, "1"], [out3, "2"]] as const) {
      execFileSync(process.execPath, [CLI, "build", "lexicons/demo", "-o", out, "--cache-dir", CACHE, "--workers", n, "-q"], { cwd: ROOT, stdio: "pipe" });
    }
    for (const v of ["general", "careful"]) {
      for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls", "rejects.csv"]) {
        expect(readFileSync(join(out2, "demo", v, f), "utf8")).toBe(readFileSync(join(out1, "demo", v, f), "utf8"));
        expect(readFileSync(join(out3, "demo", v, f), "utf8")).toBe(readFileSync(join(out1, "demo", v, f), "utf8"));
      }
    }
  }, 300_000);
});

describe("the process: broken pipes, half documents, exit codes (compiled CLI)", () => {
  const noStack = (stderr: string): void => {
    expect(stderr).not.toMatch(/\n\s+at /);
    expect(stderr).not.toMatch(/EPIPE|Error:/);
  };

  it.each(["tsv", "pls"])("a reader that stops early (| head) ends the run quietly with exit 0 (%s)", async (format) => {
    const rows = Array.from({ length: 20_000 }, (_, i) => `kettle${i},ˈkɛtəl`).join("\n");
    const child = spawn(process.execPath, [CLI, ...G, "--format", format, "-"], { cwd: ROOT, stdio: ["pipe", "pipe", "pipe"] });
    let stderr = "";
    child.stderr.setEncoding("utf8").on("data", (d: string) => (stderr += d));
    child.stdin.on("error", () => undefined);
    child.stdin.end(`word,pron\n${rows}\n`);
    // Read one chunk, then close the pipe as `head` does.
    await new Promise<void>((res) => child.stdout.once("data", () => res()));
    child.stdout.destroy();
    const code = await new Promise<number | null>((res) => child.on("close", (c) => res(c)));
    expect(code).toBe(0);
    noStack(stderr);
  }, 120_000);

  it("PLS: a word XML cannot hold is a reject; standard output is still one whole schema-valid document", () => {
    const r = run([...G, "--format", "pls", "--lang", "en-US"], "word,pron\nkit,ˈkɪt\nba\u0001d,ˈbæd\npin,ˈpɪn\n");
    expect(r.status).toBe(3);
    expect(plsSchemaErrors(r.stdout)).toEqual([]);
    expect(r.stdout.match(/<lexeme>/g)?.length).toBe(2);
    // The reader refuses the character (lexicon/control-character); were it to pass, the PLS check
    // before grouping makes the row a reject (pls/invalid-xml-char): either way, never half a document.
    expect(r.stderr).toMatch(/^<stdin>:3:\d+: error: .* \[(lexicon\/control-character|pls\/invalid-xml-char)\]$/m);
    expect(r.stderr).toContain("3 rows read = 2 written + 1 rejected");
    noStack(r.stderr);
  });

  it("PLS: a bad --lang, or a bad lang in varieties.json, stops before anything reaches stdout", () => {
    const bad = run([...G, "--format", "pls", "--lang", "en_US"], "word,pron\nkit,ˈkɪt\n");
    expect(bad.status).toBe(1);
    expect(bad.stdout).toBe("");
    expect(bad.stderr).toMatch(/^command line:1:\d+: error: Option --lang does not take 'en_US'\./);
    const dir = mkdtempSync(join(tmpdir(), "strata-lang-"));
    writeFileSync(join(dir, "lexicon.csv"), "word,pron\n");
    writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en_US", grammar: join(ROOT, "lexicons", "en-us", "grammar.strata") }] }));
    const fromManifest = run(["transcribe", "-g", dir, "--cache-dir", CACHE, "--format", "pls"], "word,pron\nkit,ˈkɪt\n");
    expect(fromManifest.status).toBe(1);
    expect(fromManifest.stdout).toBe("");
    noStack(fromManifest.stderr);
  });

  it("a bad option exits 1 in the one style; -v prints the version", () => {
    const r = run(["transcribe", "-g", "lexicons/en-us", "--max-states", "0"], "");
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/^command line:1:43: error: Option --max-states does not take '0'\. It must be a whole number of 1 or more\. \[cli\/bad-option-value\]\n/);
    const v = run(["-v"], "");
    expect(v.status).toBe(0);
    expect(v.stdout.trim()).toBe((JSON.parse(readFileSync(join(ROOT, "package.json"), "utf8")) as { version: string }).version);
  });

  it("file-system problems at command-line paths: one positioned line, exit 1, nothing on stdout", () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-fs-"));
    const file = join(dir, "words.csv");
    writeFileSync(file, "word,pron\nkit,ˈkɪt\n");
    const noManifest = run(["build", dir], "");
    expect(noManifest.status).toBe(1);
    expect(noManifest.stderr).toMatch(/varieties\.json:1:1: error: .*\[manifest\/missing\]/);
    noStack(noManifest.stderr);
    for (const args of [[...G, dir], [...G, file, "-o", join(file, "x.tsv")], ["build", file], ["build", "lexicons/demo", "-o", file], ["import", "--arpabet", dir]]) {
      const r = run(args, "");
      expect(r.status).toBe(1);
      expect(r.stdout).toBe("");
      expect(r.stderr).toMatch(/^command line:1:\d+: error: [A-Z].*\. \[cli\/[a-z-]+\]\n/);
      noStack(r.stderr);
    }
  });

  it("npm pack ships the compiled program and the lexicons, not the tests, benches or sources", () => {
    const out = execFileSync("npm", ["pack", "--dry-run", "--json", "--ignore-scripts"], { cwd: ROOT, encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
    const files = (JSON.parse(out) as { files: { path: string }[] }[])[0]!.files.map((f) => f.path);
    expect(files).toContain("dist/src/cli/main.js");
    // The bin is the bundle (scripts/bundle.mjs), with its worker scripts beside it.
    const bin = (JSON.parse(readFileSync(join(ROOT, "package.json"), "utf8")) as { bin: { strata: string } }).bin.strata;
    expect(bin).toBe("dist/bun/main.js");
    for (const f of [bin, "dist/bun/worker.js", "dist/bun/check-worker.js", "dist/bun/compose-worker.js"]) expect(files).toContain(f);
    expect(files).toContain("lexicons/en-us/grammar.strata");
    expect(files).toContain("lexicons/demo/varieties.json");
    expect(files).toContain("lexicons/.strata-root"); // the project root of the shipped grammars (varieties across folders)
    expect(files.filter((f) => /^(tests|bench|src|scripts|dist\/bench)\//.test(f) || f.endsWith(".ts") || f.endsWith(".map"))).toEqual([]);
  });

  it("the compiled compiler composes the variants cascade on a worker thread and caches the same machines as on one thread", () => {
    // Only compiled code starts the worker (tests run the TypeScript sources on one thread).
    const dirs = [1, 2].map(() => mkdtempSync(join(tmpdir(), "strata-threads-")));
    const script = (threads: number, dir: string) => `
      const { loadGrammar } = await import(${JSON.stringify(join(ROOT, "dist", "src", "grammar", "index.js"))});
      const { compileGrammar } = await import(${JSON.stringify(join(ROOT, "dist", "src", "compile", "index.js"))});
      const g = loadGrammar(${JSON.stringify(join(ROOT, "lexicons", "en-us", "grammar.strata"))});
      const r = compileGrammar(g.grammar, g.inventory, { cacheDir: ${JSON.stringify(dir)}, threads: ${threads} });
      process.stdout.write(String(r.compiled.threads));`;
    const used = [1, 2].map((t, i) => execFileSync(process.execPath, ["--input-type=module", "-e", script(t, dirs[i]!)], { encoding: "utf8" }));
    expect(used).toEqual(["1", "2"]);
    const bins = dirs.map((d) => readdirSync(d).filter((f) => f.endsWith(".bin")));
    expect(bins[0]).toHaveLength(1);
    expect(bins[1]).toEqual(bins[0]);
    expect(readFileSync(join(dirs[1]!, bins[1]![0]!)).equals(readFileSync(join(dirs[0]!, bins[0]![0]!)))).toBe(true);
  }, 120_000);
});
