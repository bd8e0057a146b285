// The TSV path's narrow forms (`narrowForms`, MachineEngine.transcribeNarrow) against the full
// transcription it stands in for (`transcription` with NARROW_ONLY): the same narrow and broad
// forms, and the same rejects, row by row, on the demo lexicon (phrases, compounds, joins), with
// and without syllable breaks and tie bars, and for the interpreter.

import { Readable } from "node:stream";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { loadEngine } from "../../src/cli/common.js";
import { NARROW_ONLY } from "../../src/lexicon/engine.js";
import { readLexicon, type LexiconRow } from "../../src/lexicon/read.js";
import { isRejected, narrowForms, transcription } from "../../src/lexicon/runner.js";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const GRAMMAR = join(ROOT, "lexicons", "en-us", "grammar.strata");
const CACHE = join(tmpdir(), "strata-test-cache");
// The demo lexicon, a phrase and a compound.
const CSV = readFileSync(join(ROOT, "lexicons", "demo", "lexicon.csv"), "utf8") + "\nphrase word,kˈæt # ðə,\ncompound,kˈæt#ˈæt,\n";

describe("narrowForms", () => {
  for (const opts of [{ syllables: true }, { syllables: false }, { syllables: true, ties: true }, { syllables: true, kind: "interpreter" as const }]) {
    it(`gives transcription's narrow, broad and rejects (${JSON.stringify(opts)})`, async () => {
      const loaded = loadEngine(GRAMMAR, { cacheDir: CACHE, blame: false, ...opts });
      if (!("engine" in loaded)) throw new Error("the en-us grammar did not load");
      const rows: LexiconRow[] = [];
      for await (const x of readLexicon(Readable.from([CSV]), { inventory: loaded.inventory, file: "x.csv" })) if (x.kind === "row") rows.push(x);
      expect(rows.length).toBeGreaterThan(300);
      for (const row of rows) {
        const got = narrowForms(loaded.engine, row);
        const want = transcription(loaded.engine, row, NARROW_ONLY);
        if (isRejected(want)) expect(got).toEqual(want);
        else {
          expect("kind" in got).toBe(false);
          if (!("kind" in got)) expect({ narrow: got.narrow, broad: got.broad }).toEqual({ narrow: want.narrow, broad: want.broad });
        }
      }
    });
  }
});
