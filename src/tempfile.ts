// Temporary files and folders that name the process that made them, so that a later run can tell
// a live writer's temporaries from the leftovers of a killed one and remove only the latter.
// Shared by every room that writes whole files (emit/, lexicon/, and the caches in grammar/, compile/).

import { randomBytes } from "node:crypto";
import { closeSync, fsyncSync, openSync, readdirSync, renameSync, rmSync, unlinkSync, writeSync } from "node:fs";
import { basename, dirname, join } from "node:path";

/** What a temporary is for: a file being written, a folder being filled, an old folder being replaced. */
export type TempKind = "tmp" | "staging" | "old";

/**
 * `.<name>.<pid>.<12 hex>.<kind>` beside `target`. The leading dot hides it from plain listings,
 * the pid says who owns it, the random part keeps two writers in one process apart.
 */
export function tempPath(target: string, kind: TempKind = "tmp"): string {
  return join(dirname(target), `.${basename(target)}.${process.pid}.${randomBytes(6).toString("hex")}.${kind}`);
}

const TEMP_NAME = /^\.(.+)\.(\d+)\.([0-9a-f]{12})\.(tmp|staging|old)$/;

/** The parts of a temporary's name, or undefined for any other name. */
export function parseTempName(name: string): { readonly target: string; readonly pid: number; readonly kind: TempKind } | undefined {
  const m = TEMP_NAME.exec(name);
  if (m === null) return undefined;
  return { target: m[1]!, pid: Number(m[2]), kind: m[4] as TempKind };
}

/** Whether a process with this id exists (a signal-0 probe; EPERM means it exists under another user). */
export function isProcessAlive(pid: number): boolean {
  if (pid === process.pid) return true;
  if (!Number.isSafeInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

/**
 * Removes the temporaries in `dir` left by processes that no longer run (`.tmp` files and
 * `.staging` folders; `.old` folders are the caller's business, see lexicon/outdir.ts, unless
 * `kinds` says otherwise). Never throws: a folder that cannot be listed has nothing to clean.
 * Returns the names removed.
 */
export function removeStaleTemps(dir: string, kinds: readonly TempKind[] = ["tmp", "staging"]): string[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  const removed: string[] = [];
  for (const name of names) {
    const t = parseTempName(name);
    if (t === undefined || !kinds.includes(t.kind) || isProcessAlive(t.pid)) continue;
    try {
      rmSync(join(dir, name), { recursive: true, force: true });
      removed.push(name);
    } catch {
      // Another process cleaned it first, or it cannot be removed: it stays for a later run.
    }
  }
  return removed;
}

/**
 * The synchronous form of emit/atomic.ts's writeFileAtomic, for the caches (which run inside
 * synchronous compile and load functions): temporary beside the target, fsync, rename. On any
 * failure the temporary is removed and the error re-thrown; the target is unchanged.
 */
export function writeFileAtomicSync(path: string, data: Uint8Array | string): void {
  const temp = tempPath(path);
  let fd: number | undefined;
  try {
    fd = openSync(temp, "wx");
    const buf = typeof data === "string" ? Buffer.from(data, "utf8") : data;
    let off = 0;
    while (off < buf.byteLength) off += writeSync(fd, buf, off, buf.byteLength - off);
    fsyncSync(fd);
    closeSync(fd);
    fd = undefined;
    renameSync(temp, path);
  } catch (err) {
    if (fd !== undefined) {
      try {
        closeSync(fd);
      } catch {
        // already closed
      }
    }
    try {
      unlinkSync(temp);
    } catch {
      // never created
    }
    throw err;
  }
}

/** A one-sentence reason for a file-system error code, for messages about paths. */
export function fsReason(err: unknown): string {
  const code = (err as NodeJS.ErrnoException | undefined)?.code;
  switch (code) {
    case "ENOTDIR": return "a part of the path is a file, not a folder";
    case "EISDIR": return "it is a folder, not a file";
    case "EEXIST": return "something else already exists there";
    case "EACCES":
    case "EPERM": return "permission denied";
    case "EROFS": return "the file system is read-only";
    case "ENOSPC": return "the disk is full";
    case "ENOENT": return "a folder on the path does not exist";
    case "ENAMETOOLONG": return "the path is too long";
    default: return err instanceof Error ? err.message.replace(/\.$/, "") : String(err);
  }
}

/** True for errors about the file system (a path that cannot be used), as opposed to bugs. */
export function isFsError(err: unknown): boolean {
  const code = (err as NodeJS.ErrnoException | undefined)?.code;
  return typeof code === "string" && /^E[A-Z]+$/.test(code) && typeof (err as NodeJS.ErrnoException).syscall === "string";
}
