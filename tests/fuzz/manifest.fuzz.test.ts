// Fuzzing varieties.json with mutated manifests. Asserts: no exception, a manifest or at least one
// error, every diagnostic positioned inside the file.

import { existsSync, mkdtempSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { loadManifest } from "../../src/lexicon/manifest.js";
import { expectPositionedInside, mutated } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/manifest", 20261204);
const dir = mkdtempSync(join(tmpdir(), "strata-fuzz-manifest-"));
writeFileSync(join(dir, "lexicon.csv"), "word,pron\n");
writeFileSync(join(dir, "g.strata"), "");
writeFileSync(join(dir, "overrides-careful.csv"), "word,pron\n");
const file = join(dir, "varieties.json");
// The second variety has an override file (the optional "overrides" field is mutated too).
const BASE = JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: "g.strata" }, { name: "careful", lang: "en-GB", grammar: "g.strata", overrides: "overrides-careful.csv" }] }, null, 2) + "\n";

describe("fuzz: varieties.json", () => {
  it("mutations of a good manifest: a manifest or positioned errors", () => {
    fc.assert(
      fc.property(mutated(BASE), (text) => {
        writeFileSync(file, text);
        const r = loadManifest(dir);
        expect(r.manifest !== undefined || r.diagnostics.some((d) => d.severity === "error")).toBe(true);
        expectPositionedInside(r.diagnostics, text, file);
        // An override file the manifest accepts is a file that exists, and never the lexicon itself.
        for (const v of r.manifest?.varieties ?? []) if (v.overrides !== undefined) {
          expect(existsSync(v.overrides) && statSync(v.overrides).isFile()).toBe(true);
          expect(v.overrides).not.toBe(r.manifest!.lexicon);
        }
      }),
      { numRuns: 1500 },
    );
  }, 300_000);

  it("the base manifest itself reads, with its override file", () => {
    writeFileSync(file, BASE);
    expect(loadManifest(dir).manifest?.varieties[1]!.overrides).toBe(join(dir, "overrides-careful.csv"));
  });

  it("bad override values: positioned errors at the value", () => {
    const bad = (v: unknown): string => BASE.replace('"overrides-careful.csv"', JSON.stringify(v));
    for (const [v, code] of [[42, "manifest/overrides"], ["", "manifest/overrides"], ["absent.csv", "manifest/overrides-missing"], [".", "manifest/overrides-missing"], ["lexicon.csv", "manifest/overrides"]] as const) {
      const text = bad(v);
      writeFileSync(file, text);
      const r = loadManifest(dir);
      expect(r.manifest).toBeUndefined();
      expect(r.diagnostics.map((d) => d.code)).toEqual([code]);
      expectPositionedInside(r.diagnostics, text, file);
      expect(r.diagnostics[0]!.line).toBe(text.split("\n").findIndex((l) => l.includes('"overrides"')) + 1);
    }
  });
});
