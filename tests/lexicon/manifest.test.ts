// Tests of the varieties.json manifest: syntax errors at the real line and column, a BOM accepted,
// CR-only line ends positioned like any other, value errors at the value itself, a folder where the
// file should be.

import { mkdirSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { renderDiagnostic } from "../../src/diagnostics.js";
import { loadManifest } from "../../src/lexicon/manifest.js";

/** A lexicon folder with a lexicon, a grammar and the given manifest text. */
function folder(manifest: string | Buffer): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-manifest-"));
  writeFileSync(join(dir, "lexicon.csv"), "word,pron\n");
  writeFileSync(join(dir, "g.strata"), "");
  writeFileSync(join(dir, "varieties.json"), manifest);
  return dir;
}
const GOOD = '{\n  "lexicon": "lexicon.csv",\n  "varieties": [\n    { "name": "general", "lang": "en-US", "grammar": "g.strata" }\n  ]\n}\n';
const pos = (r: ReturnType<typeof loadManifest>) => r.diagnostics.map((d) => [d.code, d.line, d.column]);

describe("varieties.json", () => {
  it("reads a good manifest", () => {
    const r = loadManifest(folder(GOOD));
    expect(r.diagnostics).toEqual([]);
    expect(r.manifest?.varieties.map((v) => v.name)).toEqual(["general"]);
  });

  it("places a syntax error at its line and column, not at 1:1 or at the first such character", () => {
    // a missing comma after "en-US" on line 4: the error is at the next property name, column 42
    const text = GOOD.replace('"en-US", "grammar"', '"en-US" "grammar"');
    const r = loadManifest(folder(text));
    expect(pos(r)).toEqual([["manifest/json", 4, 42]]);
    // a stray character whose like occurs earlier in the file
    const r2 = loadManifest(folder(GOOD.replace('"g.strata" }', '"g.strata" }}')));
    expect(pos(r2)).toEqual([["manifest/json", 4, 66]]);
  });

  it("accepts a byte-order mark at the start and counts columns without it", () => {
    const r = loadManifest(folder(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(GOOD)])));
    expect(r.diagnostics).toEqual([]);
    const bad = loadManifest(folder("\ufeff" + GOOD.replace('"en-US", "grammar"', '"en-US" "grammar"')));
    expect(pos(bad)).toEqual([["manifest/json", 4, 42]]);
  });

  it("positions errors in a file with CR-only line ends, and rendering shows the line and caret", () => {
    const text = GOOD.replace('"en-US", "grammar"', '"en-US" "grammar"').replace(/\n/g, "\r");
    const r = loadManifest(folder(text));
    expect(pos(r)).toEqual([["manifest/json", 4, 42]]);
    const shown = renderDiagnostic(r.diagnostics[0]!, text).split("\n");
    expect(shown[1]).toBe('    4 |     { "name": "general", "lang": "en-US" "grammar": "g.strata" }');
    expect(shown[2]).toBe("      |                                          ^^^^^^^^^");
  });

  it("places a value error at that value, even when the same text occurs earlier", () => {
    // "careful" appears first as the lang of variety 1 (a bad tag): the missing grammar of the variety
    // named "careful" is reported at that variety's grammar value
    const text = '{ "lexicon": "lexicon.csv", "varieties": [\n  { "name": "general", "lang": "careful!", "grammar": "g.strata" },\n  { "name": "careful", "lang": "en-US", "grammar": "nope.strata" }\n] }\n';
    const r = loadManifest(folder(text));
    expect(pos(r)).toEqual([
      ["manifest/lang", 2, 32],
      ["manifest/grammar-missing", 3, 52],
    ]);
  });

  it("says so when varieties.json is a folder", () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-manifest-"));
    mkdirSync(join(dir, "varieties.json"));
    expect(pos(loadManifest(dir))).toEqual([["manifest/unreadable", 1, 1]]);
  });
});
