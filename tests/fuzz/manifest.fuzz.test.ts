// Fuzzing varieties.json with mutated manifests. Asserts: no exception, a manifest or at least one
// error, every diagnostic positioned inside the file.

import { mkdtempSync, writeFileSync } from "node:fs";
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
const file = join(dir, "varieties.json");
const BASE = JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: "g.strata" }, { name: "careful", lang: "en-GB", grammar: "g.strata" }] }, null, 2) + "\n";

describe("fuzz: varieties.json", () => {
  it("mutations of a good manifest: a manifest or positioned errors", () => {
    fc.assert(
      fc.property(mutated(BASE), (text) => {
        writeFileSync(file, text);
        const r = loadManifest(dir);
        expect(r.manifest !== undefined || r.diagnostics.some((d) => d.severity === "error")).toBe(true);
        expectPositionedInside(r.diagnostics, text, file);
      }),
      { numRuns: 1500 },
    );
  }, 300_000);
});
