// Fuzzing a variety's override file (mutated override CSVs: CR, LF, quotes, NUL, BOM, bad UTF-8,
// deletions, duplications) through the real runner: whatever the file holds, the build reconciles
// (every lexicon record one entry, one reject or one replaced row; every override record one entry
// or one reject, checked from the written files by reconcile.ts), every reject and warning of the
// override file is positioned inside it, and the keys of the variety stay unique.

import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { loadEngine, type LoadedEngine } from "../../src/cli/common.js";
import { runLexicon } from "../../src/lexicon/runner.js";
import { countInputRecords } from "../../src/lexicon/reconcile.js";
import { expectPositionedInside, mutatedBytes } from "./mutate.js";
import { useSeed } from "./seed.js";
import { SHARED_CACHE } from "../regress/support.js";

useSeed("fuzz/overrides", 20261213);
const demo = readFileSync(fileURLToPath(new URL("../../lexicons/demo/lexicon.csv", import.meta.url)), "utf8").split("\n");
const dir = mkdtempSync(join(tmpdir(), "strata-fuzz-overrides-"));
const LEXICON = join(dir, "lexicon.csv");
const OVERRIDES = join(dir, "overrides.csv");
// The demo's header and first 40 rows (ids ct0001…), and overrides of some of their words: one
// replacing two rows, one added row, an unknown word, a key the lexicon keeps.
writeFileSync(LEXICON, [...demo.slice(0, 41), ""].join("\n"));
const BASE = ["word,pron,id,pos,tags,note", "zero,ˈzɪɹo,ct0001,num,,", "the,ˈðə,,det,,", "the,ˈðɪ,,det,,", "four,ˈfɔɹ,ct0005,num,,", "plimsy,ˈplɪmzi,,noun,,", "five,ˈfaɪv,ct0002,num,,", ""].join("\n");

let loaded: LoadedEngine;
beforeAll(() => {
  const l = loadEngine(fileURLToPath(new URL("../../lexicons/en-us/careful.strata", import.meta.url)), { cacheDir: SHARED_CACHE, derivations: true });
  if (!("engine" in l)) throw new Error("careful.strata does not load");
  loaded = l;
}, 120_000);

describe("fuzz: override files", () => {
  it("mutated override files: the variety reconciles, positions are inside the file, keys are unique", async () => {
    let k = 0;
    await fc.assert(
      fc.asyncProperty(mutatedBytes(BASE), async (bytes) => {
        writeFileSync(OVERRIDES, bytes);
        const out = join(dir, `out${k++}`);
        const s = await runLexicon(loaded.engine, loaded.inventory, LEXICON, out, { name: "careful", lang: "en-US" }, { overrides: OVERRIDES, formats: ["tsv", "jsonl", "pls"], sourceRoot: dir });
        const text = bytes.toString("utf8");
        expectPositionedInside((s.overrideDiagnostics ?? []).filter((d) => d.file === OVERRIDES), text, OVERRIDES);
        if (s.outputErrors.length > 0) {
          // Only the override file itself may stop the variety (unreadable, no header): never a reconciliation failure.
          expect(s.outputErrors.every((d) => d.file === OVERRIDES && d.code !== "run/unreconciled")).toBe(true);
          return;
        }
        expect(s.reconciled).toBe(true);
        const records = (await countInputRecords(LEXICON)).count + (await countInputRecords(OVERRIDES)).count;
        expect(s.rowsRead).toBe(records);
        expect(s.entriesWritten + s.rowsRejected + (s.rowsReplaced ?? 0)).toBe(records);
        const keys = readFileSync(join(out, "lexicon.tsv"), "utf8").trim().split("\n").slice(1).map((l) => l.split("\t")[0]);
        expect(new Set(keys).size).toBe(keys.length);
      }),
      { numRuns: 150 },
    );
  }, 300_000);
});
