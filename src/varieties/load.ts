// A built lexicon folder's varieties as the comparison reads them: build.json (through the regression
// room's reader) and each variety's lexicon.jsonl, kept by key with only what a comparison needs.

import type { BuildFolder } from "../regress/folder.js";
import { readEntries, summaryCount, BuildFolderError, entriesFile } from "../regress/folder.js";
import { diagnostic } from "../diagnostics.js";
import type { VarietyRecord } from "../regress/record.js";

/** One entry of one variety. */
export interface VarietyEntry {
  readonly key: string;
  readonly word: string;
  readonly narrow: string;
  readonly broad: string;
  /** The pronunciation as written in the input row (lexicon or override file). */
  readonly pron: string;
  /** The input file the row came from (relative to the lexicon folder). */
  readonly file: string;
  /** Each step that changed the preferred variant, with the form after it. */
  readonly derivation: readonly { readonly step: string; readonly form: string }[];
}

/** One variety's entries by key, in file order. */
export interface VarietyEntries {
  readonly record: VarietyRecord;
  readonly entries: ReadonlyMap<string, VarietyEntry>;
}

/** Reads one variety's lexicon.jsonl whole (a truncated file is an error naming it, as in `compare`). */
export async function loadVariety(build: BuildFolder, record: VarietyRecord): Promise<VarietyEntries> {
  const entries = new Map<string, VarietyEntry>();
  for await (const e of readEntries(build, record.name)) {
    const raw = e as typeof e & { source?: { file?: unknown } };
    entries.set(e.key, {
      key: e.key, word: e.word, narrow: e.narrow, broad: e.broad, pron: e.input?.pron ?? e.broad,
      file: typeof raw.source?.file === "string" ? raw.source.file : "", derivation: e.derivation,
    });
  }
  const stated = summaryCount(build, record.name);
  if (stated !== undefined && stated !== entries.size) {
    throw new BuildFolderError(diagnostic("error", "regress/truncated", `This file holds ${entries.size} entries but the variety's summary.json states ${stated}: the build is incomplete; rebuild it.`, { file: entriesFile(build, record.name), line: 1, column: 1 }));
  }
  return { record, entries };
}
