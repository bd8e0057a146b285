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
  /** The steps that changed the preferred variant, in order (one shared array per distinct list). */
  readonly steps: readonly string[];
  /** The form after each of those steps, joined by U+0001 (`derivationOf` rebuilds the derivation). */
  readonly forms: string;
}

/** Each step that changed the entry's preferred variant, with the form after it. */
export const derivationOf = (e: VarietyEntry): { step: string; form: string }[] => {
  const forms = e.forms.split("\u0001");
  return e.steps.map((step, i) => ({ step, form: forms[i] ?? "" }));
};

/** One variety's entries by key, in file order. */
export interface VarietyEntries {
  readonly record: VarietyRecord;
  readonly entries: ReadonlyMap<string, VarietyEntry>;
}

/** Reads one variety's lexicon.jsonl whole (a truncated file is an error naming it, as in `compare`). */
export async function loadVariety(build: BuildFolder, record: VarietyRecord): Promise<VarietyEntries> {
  const entries = new Map<string, VarietyEntry>();
  // Entries are held for the whole comparison: the few distinct step lists and file names are
  // shared, and the forms kept as one string, so memory is a few strings per entry.
  const shared = new Map<string, readonly string[]>();
  const files = new Map<string, string>();
  for await (const e of readEntries(build, record.name)) {
    const raw = e as typeof e & { source?: { file?: unknown } };
    const names = e.derivation.map((d) => d.step);
    const id = names.join("\u0001");
    let steps = shared.get(id);
    if (steps === undefined) shared.set(id, (steps = names));
    const f = typeof raw.source?.file === "string" ? raw.source.file : "";
    let file = files.get(f);
    if (file === undefined) files.set(f, (file = f));
    entries.set(e.key, {
      key: e.key, word: e.word, narrow: e.narrow, broad: e.broad, pron: e.input?.pron ?? e.broad,
      file, steps, forms: e.derivation.map((d) => d.form).join("\u0001"),
    });
  }
  const stated = summaryCount(build, record.name);
  if (stated !== undefined && stated !== entries.size) {
    throw new BuildFolderError(diagnostic("error", "regress/truncated", `This file holds ${entries.size} entries but the variety's summary.json states ${stated}: the build is incomplete; rebuild it.`, { file: entriesFile(build, record.name), line: 1, column: 1 }));
  }
  return { record, entries };
}
