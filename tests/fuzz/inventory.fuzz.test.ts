// Fuzzing the inventory readers (segments.csv, diacritics.csv) with mutated copies of the en-us files.
// Asserts: no exception, an inventory or at least one error, every diagnostic positioned inside its file.

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseInventory } from "../../src/inventory/load.js";
import { expectPositionedInside, mutated } from "./mutate.js";
import { useSeed } from "./seed.js";

useSeed("fuzz/inventory", 20261205);
const SEGMENTS = readFileSync(fileURLToPath(new URL("../../lexicons/en-us/segments.csv", import.meta.url)), "utf8");
const DIACRITICS = readFileSync(fileURLToPath(new URL("../../lexicons/en-us/diacritics.csv", import.meta.url)), "utf8");

describe("fuzz: the inventory CSVs", () => {
  it("mutations of segments.csv and diacritics.csv: an inventory or positioned errors", () => {
    fc.assert(
      fc.property(mutated(SEGMENTS), fc.oneof(fc.constant(DIACRITICS), mutated(DIACRITICS)), (segments, diacritics) => {
        const r = parseInventory(segments, "segments.csv", diacritics, "diacritics.csv");
        expect(r.inventory !== undefined || r.diagnostics.some((d) => d.severity === "error")).toBe(true);
        expectPositionedInside(r.diagnostics, segments, "segments.csv");
        expectPositionedInside(r.diagnostics, diacritics, "diacritics.csv");
        expect(r.diagnostics.every((d) => d.file === "segments.csv" || d.file === "diacritics.csv")).toBe(true);
      }),
      { numRuns: 1500 },
    );
  }, 300_000);
});
