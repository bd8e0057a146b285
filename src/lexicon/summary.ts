// What a variety's summary.json holds (counts only: no timings, no absolute paths, so two builds
// of the same input compare byte for byte), and the messages for output paths that cannot be used.

import { basename, dirname, isAbsolute, join, relative, sep } from "node:path";
import { diagnostic, formatDiagnostic, type Diagnostic } from "../diagnostics.js";
import { fsReason, isFsError, parseTempName } from "../tempfile.js";
import type { RunSummary } from "./runner.js";

/** `file` relative to `root`, with forward slashes; names that are not absolute paths (`<stdin>`) as they are. */
export function relativeTo(root: string, file: string): string {
  if (!isAbsolute(file)) return file;
  const r = relative(root, file);
  return (r === "" ? "." : r).split(sep).join("/");
}

/** `relativeTo(root, f)` worked out once per file: every entry of a run names the same file or few. */
export function relativeFiles(root: string): (file: string) => string {
  const seen = new Map<string, string>();
  return (f) => {
    let r = seen.get(f);
    if (r === undefined) seen.set(f, (r = relativeTo(root, f)));
    return r;
  };
}

/** summary.json's text: the run's counts, file names and diagnostics, every path relative to `root`. */
export function summaryJson(s: RunSummary, root: string): string {
  const doc = {
    variety: s.variety,
    lexicon: relativeTo(root, s.lexicon),
    rowsRead: s.rowsRead,
    entriesWritten: s.entriesWritten,
    rowsRejected: s.rowsRejected,
    ...(s.rowsReplaced !== undefined ? { rowsReplaced: s.rowsReplaced } : {}),
    words: s.words,
    entriesWithVariants: s.entriesWithVariants,
    variantsTotal: s.variantsTotal,
    entriesCapped: s.entriesCapped,
    entriesAmbiguous: s.entriesAmbiguous,
    changedBy: s.changedBy,
    ...(s.stress !== undefined ? { stress: s.stress } : {}),
    files: Object.keys(s.files).sort(),
    reconciled: s.reconciled,
    diagnostics: s.diagnostics.map((d) => formatDiagnostic({ ...d, file: relativeTo(root, d.file) })),
  };
  return JSON.stringify(doc, null, 2) + "\n";
}

/**
 * An output path that cannot be written (a file where a folder should be, no permission, a
 * read-only or full disk) as one error positioned at the path; any other error is re-thrown
 * (it is a bug, not bad input).
 */
export function outputError(path: string, err: unknown): Diagnostic {
  if (!isFsError(err)) throw err;
  // Name the file the user knows, not the temporary it was being written through.
  const raw = (err as NodeJS.ErrnoException & { dest?: string }).dest ?? (err as NodeJS.ErrnoException).path ?? path;
  const temp = parseTempName(basename(raw));
  const at = temp === undefined ? raw : join(dirname(raw), temp.target);
  const near = relativeTo(process.cwd(), at);
  const shown = near.startsWith("..") ? at : near;
  return diagnostic("error", "output/unwritable", `Cannot write this output: ${fsReason(err)}.`, { file: shown, line: 1, column: 1 });
}
