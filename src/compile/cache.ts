// The compiled-machine cache under build/cache/: one file per (grammar, inventory, compiler
// version) key, written whole (temp file, then rename) and checked by a checksum when read.
//
// File layout (little-endian): "STRATA-CACHE\n" magic, u32 format version, 32-byte SHA-256 of the
// payload, then the payload: u32 JSON length, the JSON (metadata), u32 byte length of the machine
// words, every machine as Int32 words [states, start, finalCount, finals…, arcCount,
// (from, input, output, to)…], then each blob as u32 length and bytes (frozen runner tables in
// the fst/serialise format; length 0 for none).

import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync, unlinkSync } from "node:fs";
import { join } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { Fst } from "../fst/index.js";
import { fsReason, removeStaleTemps, tempPath, writeFileAtomicSync } from "../tempfile.js";

const MAGIC = Buffer.from("STRATA-CACHE\n", "utf8");
const FORMAT = 2;

export function sha256(parts: readonly (string | Uint8Array)[]): string {
  const h = createHash("sha256");
  for (const p of parts) {
    h.update(typeof p === "string" ? Buffer.from(p, "utf8") : p);
    h.update("\u0000");
  }
  return h.digest("hex");
}

export function cachePath(dir: string, key: string): string {
  return join(dir, `${key}.bin`);
}

function encodeMachine(f: Fst, words: number[]): void {
  words.push(f.numStates, f.numStates > 0 ? f.start : -1);
  const finals: number[] = [];
  for (let s = 0; s < f.numStates; s++) {
    if (!f.isFinal(s)) continue;
    if ((f.finalOutput(s) ?? []).length > 0) throw new Error("cache: final outputs are not stored");
    finals.push(s);
  }
  words.push(finals.length, ...finals);
  words.push(f.numArcs());
  for (let s = 0; s < f.numStates; s++) for (const a of f.arcs(s)) words.push(s, a.input, a.output, a.target);
}

/**
 * Where each of `count` machines starts in `w` (and, last, where the words end), checking only the
 * sizes: a machine is decoded when it is first asked for, which a run of cached runners never does.
 */
function machineStarts(w: Int32Array, count: number): number[] | null {
  const starts: number[] = [];
  let i = 0;
  for (let k = 0; k < count; k++) {
    starts.push(i);
    if (i + 3 > w.length) return null;
    const nf = w[i + 2]!;
    if (w[i]! < 0 || nf < 0 || i + 4 + nf > w.length) return null;
    const na = w[i + 3 + nf]!;
    if (na < 0) return null;
    i += 4 + nf + 4 * na;
  }
  starts.push(i);
  return i <= w.length ? starts : null;
}

/** A machine's number of states and arcs, read from its words without decoding it. */
function machineSize(w: Int32Array, at: number): { readonly states: number; readonly arcs: number } {
  return { states: w[at]!, arcs: w[at + 3 + w[at + 2]!]! };
}

function decodeMachine(w: Int32Array, at: { i: number }): Fst {
  const f = new Fst();
  const n = w[at.i++]!;
  const start = w[at.i++]!;
  f.addStates(n);
  if (n > 0) f.setStart(start);
  const nf = w[at.i++]!;
  for (let k = 0; k < nf; k++) f.setFinal(w[at.i++]!);
  const na = w[at.i++]!;
  for (let k = 0; k < na; k++) {
    const s = w[at.i]!, i = w[at.i + 1]!, o = w[at.i + 2]!, t = w[at.i + 3]!;
    at.i += 4;
    f.addArc(s, i, o, t);
  }
  return f;
}

/**
 * Writes metadata and machines whole: temp file in the same folder (named after this process, so
 * a later run removes it if this one is killed), fsync, rename. Never throws for the file system:
 * a cache that cannot be written only costs speed, so the reason comes back for a warning.
 */
export function writeCache(dir: string, key: string, meta: unknown, machines: readonly Fst[], blobs: readonly (Uint8Array | null)[] = []): string | undefined {
  const json = Buffer.from(JSON.stringify(meta), "utf8");
  const words: number[] = [];
  for (const m of machines) encodeMachine(m, words);
  const body = Buffer.from(Int32Array.from(words).buffer);
  const u32 = (n: number): Buffer => { const b = Buffer.alloc(4); b.writeUInt32LE(n, 0); return b; };
  const parts: Buffer[] = [u32(json.length), json, u32(body.length), body, u32(blobs.length)];
  for (const b of blobs) {
    parts.push(u32(b === null ? 0 : b.length));
    if (b !== null) parts.push(Buffer.from(b));
  }
  const payload = Buffer.concat(parts);
  const digest = createHash("sha256").update(payload).digest();
  const fmt = Buffer.alloc(4);
  fmt.writeUInt32LE(FORMAT, 0);
  try {
    mkdirSync(dir, { recursive: true });
    writeFileAtomicSync(cachePath(dir, key), Buffer.concat([MAGIC, fmt, digest, payload]));
    return undefined;
  } catch (e) {
    return fsReason(e);
  }
}

/** A machine read back: its size at once, the machine itself decoded on first use. */
export interface CachedMachine {
  readonly states: number;
  readonly arcs: number;
  machine(): Fst;
}

export type CacheRead =
  | { readonly state: "missing" }
  | { readonly state: "corrupt"; readonly reason: string }
  | { readonly state: "ok"; readonly meta: unknown; readonly machines: CachedMachine[]; readonly blobs: (Uint8Array | null)[] };

/** Reads a cache file; a wrong magic, format, checksum or a truncated body is "corrupt". */
export function readCache(dir: string, key: string, machineCount: (meta: unknown) => number): CacheRead {
  const file = cachePath(dir, key);
  let buf: Buffer;
  try {
    buf = readFileSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === "ENOENT" || code === "ENOTDIR") return { state: "missing" };
    return { state: "corrupt", reason: `it cannot be read (${fsReason(e)})` };
  }
  const min = MAGIC.length + 4 + 32 + 4;
  if (buf.length < min || !buf.subarray(0, MAGIC.length).equals(MAGIC)) return { state: "corrupt", reason: "not a Strata cache file" };
  if (buf.readUInt32LE(MAGIC.length) !== FORMAT) return { state: "corrupt", reason: "written by another cache format" };
  const digest = buf.subarray(MAGIC.length + 4, MAGIC.length + 36);
  const payload = buf.subarray(MAGIC.length + 36);
  if (!createHash("sha256").update(payload).digest().equals(digest)) return { state: "corrupt", reason: "checksum mismatch" };
  try {
    let pos = 0;
    const u32 = (): number => { const v = payload.readUInt32LE(pos); pos += 4; return v; };
    const jl = u32();
    const meta: unknown = JSON.parse(payload.subarray(pos, pos + jl).toString("utf8"));
    pos += jl;
    const bl = u32();
    if (bl % 4 !== 0 || pos + bl > payload.length) return { state: "corrupt", reason: "truncated machine data" };
    const body = payload.subarray(pos, pos + bl);
    pos += bl;
    const words = new Int32Array(body.buffer.slice(body.byteOffset, body.byteOffset + body.length));
    const starts = machineStarts(words, machineCount(meta));
    if (starts === null || starts[starts.length - 1] !== words.length) return { state: "corrupt", reason: "machine data does not match its description" };
    const machines = starts.slice(0, -1).map((at): CachedMachine => {
      let made: Fst | undefined;
      return { ...machineSize(words, at), machine: () => (made ??= decodeMachine(words, { i: at })) };
    });
    const nb = u32();
    const blobs: (Uint8Array | null)[] = [];
    for (let k = 0; k < nb; k++) {
      const len = u32();
      if (pos + len > payload.length) return { state: "corrupt", reason: "truncated runner data" };
      blobs.push(len === 0 ? null : new Uint8Array(payload.subarray(pos, pos + len)));
      pos += len;
    }
    if (pos !== payload.length) return { state: "corrupt", reason: "trailing bytes" };
    return { state: "ok", meta, machines, blobs };
  } catch (e) {
    return { state: "corrupt", reason: `unreadable: ${(e as Error).message}` };
  }
}

/** Removes a cache file (used before rebuilding a corrupt one); a file that cannot be removed stays. */
export function dropCache(dir: string, key: string): void {
  try {
    unlinkSync(cachePath(dir, key));
  } catch {
    // Missing, a folder, or no permission: the rebuilt machine's write reports it if it matters.
  }
}

/** A warning about the cache (positioned at the cache file or folder); never an error. */
export function cacheWarning(path: string, message: string): Diagnostic {
  return diagnostic("warning", "cache/unusable", message, { file: path, line: 1, column: 1 });
}

/**
 * Checks once, before a command uses it, that `dir` can hold cache files (creating it), and
 * removes temporaries that killed runs left there. A folder that cannot be used (a file in the
 * way, no permission, a read-only file system) means "no cache", with one warning.
 */
export function probeCacheDir(dir: string): { readonly dir?: string; readonly diagnostics: readonly Diagnostic[] } {
  try {
    mkdirSync(dir, { recursive: true });
    const probe = tempPath(join(dir, "probe"));
    writeFileSync(probe, "");
    unlinkSync(probe);
  } catch (e) {
    return { diagnostics: [cacheWarning(dir, `The cache folder ${dir} cannot be used (${fsReason(e)}); continuing without a cache.`)] };
  }
  removeStaleTemps(dir);
  return { dir, diagnostics: [] };
}
