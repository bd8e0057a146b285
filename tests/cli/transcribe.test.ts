// `strata transcribe` as a pipeline stage: the real CLI (compiled to dist/) reading standard input
// and writing each transcription as soon as its row arrives, in every output format.

import { execFileSync, spawn } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
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
