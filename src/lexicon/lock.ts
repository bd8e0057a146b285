// The output lock: one build at a time writes into a lexicon's output folder. The lock is a file
// `.lock` holding the owner's pid, host, source folder and start time; a lock whose process is
// gone (killed, crashed) is taken over by the next build.

import { randomBytes } from "node:crypto";
import { hostname } from "node:os";
import { linkSync, readFileSync, renameSync, unlinkSync } from "node:fs";
import { join } from "node:path";
import { isProcessAlive, tempPath, writeFileAtomicSync } from "../tempfile.js";

export const LOCK_NAME = ".lock";

export interface LockOwner {
  readonly pid: number;
  readonly host: string;
  /** The lexicon folder being built (absolute). */
  readonly source: string;
  /** ISO 8601 time the lock was taken. */
  readonly started: string;
  /** Random, so a process releases only the lock it took. */
  readonly token: string;
}

export type LockResult =
  | { readonly ok: true; readonly owner: LockOwner; release(): void }
  | { readonly ok: false; readonly holder: LockOwner };

function readOwner(path: string): LockOwner | undefined {
  try {
    const o = JSON.parse(readFileSync(path, "utf8")) as Partial<LockOwner>;
    if (typeof o.pid !== "number" || typeof o.host !== "string") return undefined;
    return { pid: o.pid, host: o.host, source: String(o.source ?? ""), started: String(o.started ?? ""), token: String(o.token ?? "") };
  } catch {
    return undefined;
  }
}

/** A holder on another machine (a shared file system) cannot be probed: it counts as live. */
const holderAlive = (o: LockOwner): boolean => o.host !== hostname() || isProcessAlive(o.pid);

/**
 * Takes the lock of folder `dir` (which must exist) for the lexicon folder `source`.
 *
 * Creation is atomic and never shows a half-written lock: the owner record is written whole to a
 * temporary file, then hard-linked to `.lock` (link(2) fails when `.lock` exists). A lock whose
 * process no longer runs on this host is moved aside (rename is atomic, so of two builds taking
 * over the same stale lock only one moves it) and checked: if what was moved is not the stale
 * lock that was read (another build took it over in between), it is linked back.
 * File-system errors (a read-only folder) are thrown to the caller.
 */
export function acquireLock(dir: string, source: string): LockResult {
  const path = join(dir, LOCK_NAME);
  const owner: LockOwner = { pid: process.pid, host: hostname(), source, started: new Date().toISOString(), token: randomBytes(8).toString("hex") };
  for (let attempt = 0; attempt < 8; attempt++) {
    const temp = tempPath(path);
    writeFileAtomicSync(temp, JSON.stringify(owner) + "\n");
    try {
      linkSync(temp, path);
      return { ok: true, owner, release: () => releaseLock(path, owner) };
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
    } finally {
      try {
        unlinkSync(temp);
      } catch {
        // already gone
      }
    }
    const holder = readOwner(path);
    if (holder === undefined) {
      // Unreadable: gone in between (retry), or not a lock of ours (refuse rather than delete it).
      try {
        readFileSync(path);
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code === "ENOENT") continue;
      }
      return { ok: false, holder: { pid: 0, host: "", source: "", started: "", token: "" } };
    }
    if (holderAlive(holder)) return { ok: false, holder };
    const aside = tempPath(path);
    try {
      renameSync(path, aside);
    } catch {
      continue; // someone else moved it first
    }
    const moved = readOwner(aside);
    if (moved !== undefined && moved.token !== holder.token) {
      // We moved a fresh lock that replaced the stale one: put it back (link fails if taken again).
      try {
        linkSync(aside, path);
      } catch {
        // a third build holds it now; that one stays
      }
    }
    try {
      unlinkSync(aside);
    } catch {
      // already gone
    }
  }
  const holder = readOwner(path);
  return { ok: false, holder: holder ?? { pid: 0, host: "", source: "", started: "", token: "" } };
}

/** Removes the lock if it is still the one `owner` took. */
function releaseLock(path: string, owner: LockOwner): void {
  const now = readOwner(path);
  if (now === undefined || now.token !== owner.token) return;
  try {
    unlinkSync(path);
  } catch {
    // already gone
  }
}
