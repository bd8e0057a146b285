// Writing an output file whole or not at all: the data goes to a temporary file in the same folder,
// is flushed to disk (fsync) and then renamed over the target, so readers never see a half-written file.

import { mkdir, open, rename, unlink } from "node:fs/promises";
import type { FileHandle } from "node:fs/promises";
import { dirname } from "node:path";
import { tempPath } from "../tempfile.js";
import { ByteChunks, releaseChunk, utf8Bytes } from "./bytes.js";

/** What can be written: one string or buffer, or a (possibly asynchronous) sequence of string or byte chunks. */
export type AtomicData = string | Uint8Array | Iterable<string | Uint8Array> | AsyncIterable<string | Uint8Array>;

export interface AtomicOptions {
  /**
   * Told after each chunk of a sequence is written: the temporary file and the bytes in it so far
   * (for a reader that follows the file as it grows; the file is renamed, not copied, at the end,
   * so a handle opened on it reads the finished file).
   */
  readonly written?: (temp: string, bytes: number) => void;
}

/**
 * Writes `data` to `path` atomically and returns the number of bytes written. A chunk of `data`
 * that a ByteChunks made is given back to it once written (emit/bytes.ts): the caller does not
 * use a chunk after handing it here.
 *
 * Invariants: the parent folder is created if missing; the temporary file lives beside the target
 * (same file system, so rename(2) is atomic on POSIX); it is fsynced before the rename; if anything
 * fails (including an exception thrown by the chunk iterator) the temporary file is removed, the
 * target keeps its previous content (or stays absent) and the error is re-thrown.
 */
export async function writeFileAtomic(path: string, data: AtomicData, opts: AtomicOptions = {}): Promise<number> {
  const dir = dirname(path);
  await mkdir(dir, { recursive: true });
  // Named after this process (src/tempfile.ts), so a later run removes it if this one is killed.
  const temp = tempPath(path);
  let handle: FileHandle | undefined;
  let bytes = 0;
  try {
    handle = await open(temp, "wx");
    const h = handle;
    if (typeof data === "string" || data instanceof Uint8Array) {
      const buf = typeof data === "string" ? utf8Bytes(data) : data;
      await writeAll(h, buf);
      bytes = buf.byteLength;
    } else {
      // Strings are encoded into chunks of about 1 MiB (emit/bytes.ts); byte chunks are written as they are.
      const full: Uint8Array[] = [];
      const chunks = new ByteChunks((c) => void full.push(c));
      const drain = async (): Promise<void> => {
        for (const c of full.splice(0)) {
          await writeAll(h, c);
          bytes += c.byteLength;
          opts.written?.(temp, bytes);
          // Written: a ByteChunks' chunk goes back to be filled again (emit/bytes.ts).
          releaseChunk(c);
        }
      };
      for await (const chunk of data as AsyncIterable<string | Uint8Array>) {
        if (typeof chunk === "string") chunks.push(chunk);
        else {
          chunks.flush();
          full.push(chunk);
        }
        if (full.length > 0) await drain();
      }
      chunks.flush();
      await drain();
    }
    await h.sync();
    await h.close();
    handle = undefined;
    await rename(temp, path);
  } catch (err) {
    if (handle !== undefined) await handle.close().catch(() => undefined);
    await unlink(temp).catch(() => undefined);
    throw err;
  }
  await syncFolder(dir);
  return bytes;
}

/** The name used in DEVELOPERS.md's contract list. */
export const writeAtomic = writeFileAtomic;

async function writeAll(h: FileHandle, buf: Uint8Array): Promise<void> {
  let offset = 0;
  while (offset < buf.byteLength) {
    const { bytesWritten } = await h.write(buf, offset, buf.byteLength - offset);
    offset += bytesWritten;
  }
}

/** Makes the rename itself durable where the platform allows fsync on a folder (best effort). */
export async function syncFolder(dir: string): Promise<void> {
  let h: FileHandle | undefined;
  try {
    h = await open(dir, "r");
    await h.sync();
  } catch {
    // Some platforms (Windows, some network file systems) refuse fsync on folders; the rename stands.
  } finally {
    if (h !== undefined) await h.close().catch(() => undefined);
  }
}
