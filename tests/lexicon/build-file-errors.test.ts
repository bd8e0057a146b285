// `strata build` prints every problem of the lexicon file itself (all header errors, wherever the
// header is), once, also under -q; the runner returns them capped per file.

import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { runBuild } from "../../src/cli/build.js";

const GRAMMAR = resolve(__dirname, "../../lexicons/en-us/grammar.strata");
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");

function lexiconFolder(csv: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-lex-"));
  writeFileSync(join(dir, "lexicon.csv"), csv);
  const v = (name: string) => ({ name, lang: "en-US", grammar: GRAMMAR });
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [v("general"), v("second")] }));
  return dir;
}

let err: string[];
let spies: ReturnType<typeof vi.spyOn>[];
beforeEach(() => {
  err = [];
  spies = [
    vi.spyOn(process.stdout, "write").mockImplementation(() => true),
    vi.spyOn(process.stderr, "write").mockImplementation((s: string | Uint8Array) => (err.push(String(s)), true)),
  ];
});
afterEach(() => spies.forEach((s) => s.mockRestore()));

describe("strata build: errors of the lexicon file", () => {
  it("prints every header error, once, even when the header is not on line 1 and with -q", async () => {
    const dir = lexiconFolder("# a comment\n\nword,word,ipa,freq\nKest,kɛst\n");
    const out = mkdtempSync(join(tmpdir(), "strata-out-"));
    const code = await runBuild(dir, { out, allowRejects: false, quiet: true, engine: "machine", cache: true, cacheDir: SHARED_CACHE, samples: 0, workers: "0", syllableBreaks: true });
    expect(code).toBe(1);
    const text = err.join("");
    const codes = [...text.matchAll(/lexicon\.csv:(\d+):(\d+): error: .*\[(lexicon\/[a-z-]+)\]/g)].map((m) => `${m[1]}:${m[2]} ${m[3]}`);
    expect(codes).toEqual(["3:6 lexicon/duplicate-column", "3:1 lexicon/missing-column"]);
    expect(text).not.toContain("unknown-column"); // a warning, not shown under -q
  }, 120_000);
});
