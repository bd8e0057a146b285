// A variety's output folder replaced as a whole: every file of a run is written into a staging
// folder beside the target, then the staging folder takes the target's place, so a reader (and a
// run killed at any moment) finds either the previous run's folder or the new one, never a mix.

import { lstatSync, readdirSync, renameSync, rmSync } from "node:fs";
import { mkdir, rename, rm } from "node:fs/promises";
import { dirname, join } from "node:path";
import { syncFolder } from "../emit/atomic.js";
import { isProcessAlive, parseTempName, removeStaleTemps, tempPath } from "../tempfile.js";

/** A folder being filled; `commit` puts it in the target's place, `abort` removes it. */
export interface StagedFolder {
  /** Where to write the files of this run. */
  readonly path: string;
  /** The folder it replaces. */
  readonly target: string;
  commit(): Promise<void>;
  abort(): Promise<void>;
}

/**
 * Creates `.<name>.<pid>.<hex>.staging` beside `target` (creating the parent folders).
 *
 * The swap (`commit`), on POSIX file systems where rename(2) is atomic:
 *   1. the previous target (if any) is renamed to `.<name>.<pid>.<hex>.old`;
 *   2. the staging folder is renamed to the target;
 *   3. the `.old` folder is removed.
 * Between 1 and 2 the target is briefly absent (a reader finds nothing, never a mix). A run killed
 * there leaves a whole `.old` folder and a dead pid in its name: `recoverOutputs` (run under the
 * output lock by the next build) renames it back. Node has no portable exchange-rename
 * (renameat2 RENAME_EXCHANGE), which would close that gap.
 */
export async function stageFolder(target: string): Promise<StagedFolder> {
  await mkdir(dirname(target), { recursive: true });
  const path = tempPath(target, "staging");
  await mkdir(path);
  let done = false;
  return {
    path,
    target,
    async commit(): Promise<void> {
      if (done) throw new Error("staged folder committed twice");
      done = true;
      let old: string | undefined;
      if (exists(target)) {
        old = tempPath(target, "old");
        await rename(target, old);
      }
      try {
        await rename(path, target);
      } catch (err) {
        // Put the previous folder back so the target is never left missing by a failed swap.
        if (old !== undefined) await rename(old, target).catch(() => undefined);
        await rm(path, { recursive: true, force: true }).catch(() => undefined);
        throw err;
      }
      await syncFolder(dirname(target));
      if (old !== undefined) await rm(old, { recursive: true, force: true }).catch(() => undefined);
    },
    async abort(): Promise<void> {
      if (done) return;
      done = true;
      await rm(path, { recursive: true, force: true }).catch(() => undefined);
    },
  };
}

/** What `recoverOutputs` did, by name (for tests and a note to the user). */
export interface Recovery {
  /** Targets put back from the `.old` folder of a run killed during its swap. */
  readonly restored: readonly string[];
  /** Temporaries of dead processes removed. */
  readonly removed: readonly string[];
}

/**
 * Cleans `root` (a lexicon's output folder) after runs that were killed: a `.old` folder of a dead
 * process whose target is missing is renamed back (the previous run, whole); any other `.old`,
 * `.staging` or `.tmp` of a dead process is removed. Temporaries of live processes are left alone.
 * Call it while holding the output lock (lexicon/lock.ts), so no live build is mid-swap here.
 */
export function recoverOutputs(root: string): Recovery {
  const restored: string[] = [];
  const removed: string[] = [];
  let names: string[];
  try {
    names = readdirSync(root);
  } catch {
    return { restored, removed };
  }
  for (const name of names) {
    const t = parseTempName(name);
    if (t === undefined || t.kind !== "old" || isProcessAlive(t.pid)) continue;
    const target = join(root, t.target);
    try {
      if (!exists(target)) {
        renameSync(join(root, name), target);
        restored.push(t.target);
      } else {
        rmSync(join(root, name), { recursive: true, force: true });
        removed.push(name);
      }
    } catch {
      // Left for a later run.
    }
  }
  removed.push(...removeStaleTemps(root));
  return { restored, removed };
}

function exists(p: string): boolean {
  try {
    lstatSync(p);
    return true;
  } catch {
    return false;
  }
}
