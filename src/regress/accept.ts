// Accepting a build as the baseline later comparisons use: the build is checked whole first (its
// record and every variety's entries must read), copied into a temporary folder beside the
// baseline, flushed, and swapped in by renames, so the baseline is never half-written.

import { randomBytes } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, openSync, closeSync, fsyncSync, renameSync, rmSync, readdirSync, statSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { BuildFolderError, openBuild, readEntries, summaryCount } from "./folder.js";
import { PIN_RESULTS } from "./pinned.js";
import { BUILD_RECORD } from "./record.js";

/** The files of each variety a baseline keeps (PLS and rejects are not needed to compare). */
export const BASELINE_FILES = ["lexicon.jsonl", "lexicon.tsv", "summary.json", PIN_RESULTS] as const;

export interface AcceptResult {
  readonly diagnostics: Diagnostic[];
  /** Entries per variety accepted. */
  readonly varieties: { readonly name: string; readonly entries: number }[];
  readonly baseline: string;
}

function fsyncPath(path: string): void {
  const fd = openSync(path, "r");
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/**
 * Copies the build in `buildDir` to `baselineDir` atomically: on any failure the previous
 * baseline stays as it was. A leftover `.<name>.old-*` folder from an interrupted swap is the
 * previous baseline (the swap removes it once the new one is in place).
 */
export async function acceptBuild(buildDir: string, baselineDir: string): Promise<AcceptResult> {
  const baseline = resolve(baselineDir);
  const varieties: { name: string; entries: number }[] = [];
  let staging: string | undefined;
  try {
    const build = openBuild(buildDir);
    // Read every variety whole: a truncated or older-format build is refused before anything is touched.
    for (const v of build.record.varieties) {
      let n = 0;
      for await (const _ of readEntries(build, v.name)) n++;
      const stated = summaryCount(build, v.name);
      if (stated !== undefined && stated !== n) {
        return { diagnostics: [diagnostic("error", "regress/truncated", `summary.json states ${stated} entries but lexicon.jsonl holds ${n}: the build is incomplete; rebuild it.`, { file: join(build.dir, v.name, "lexicon.jsonl"), line: n + 1, column: 1 })], varieties: [], baseline };
      }
      varieties.push({ name: v.name, entries: n });
    }
    const parent = dirname(baseline);
    mkdirSync(parent, { recursive: true });
    const tag = `${process.pid}-${randomBytes(4).toString("hex")}`;
    staging = join(parent, `.${basename(baseline)}.new-${tag}`);
    mkdirSync(staging);
    const copy = (from: string, to: string): void => {
      copyFileSync(from, to);
      fsyncPath(to);
    };
    copy(join(build.dir, BUILD_RECORD), join(staging, BUILD_RECORD));
    for (const v of build.record.varieties) {
      mkdirSync(join(staging, v.name));
      for (const f of BASELINE_FILES) if (existsSync(join(build.dir, v.name, f))) copy(join(build.dir, v.name, f), join(staging, v.name, f));
      fsyncPath(join(staging, v.name));
    }
    fsyncPath(staging);
    // The swap: the old baseline steps aside, the new one takes its name, the old one goes.
    const old = join(parent, `.${basename(baseline)}.old-${tag}`);
    const hadOld = existsSync(baseline);
    if (hadOld) {
      if (!statSync(baseline).isDirectory()) {
        return { diagnostics: [diagnostic("error", "regress/baseline-not-folder", `The baseline path is a file, not a folder; nothing was changed.`, { file: baseline, line: 1, column: 1 })], varieties: [], baseline };
      }
      const inner = readdirSync(baseline);
      if (inner.length > 0 && !inner.includes(BUILD_RECORD)) {
        return { diagnostics: [diagnostic("error", "regress/baseline-not-build", `This folder exists and is not a baseline (no ${BUILD_RECORD}); refusing to replace it.`, { file: baseline, line: 1, column: 1 })], varieties: [], baseline };
      }
      renameSync(baseline, old);
    }
    try {
      renameSync(staging, baseline);
      staging = undefined;
    } catch (e) {
      if (hadOld) renameSync(old, baseline);
      throw e;
    }
    fsyncPath(parent);
    if (hadOld) rmSync(old, { recursive: true, force: true });
    return { diagnostics: [], varieties, baseline };
  } catch (e) {
    if (e instanceof BuildFolderError) return { diagnostics: [e.diagnostic], varieties: [], baseline };
    throw e;
  } finally {
    if (staging !== undefined) rmSync(staging, { recursive: true, force: true });
  }
}
