// TSV lines put straight into byte chunks (emit/bytes.ts), without the line as a string: the same
// bytes as `formatTsvEntry` encoded as UTF-8. The key `word#n` is written from its parts.

import type { ByteChunks } from "./bytes.js";
import { escapeTsvField, formatTsvEntry, type TsvEntry } from "./tsv.js";

const TAB = 9;
const LF = 10;
const HASH = 35;

/** Whether a field needs `escapeTsvField` (a backslash, tab, line feed or carriage return). */
function plain(s: string): boolean {
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c === 92 || c === TAB || c === LF || c === 13) return false;
  }
  return true;
}

function putField(out: ByteChunks, s: string): void {
  out.put(plain(s) ? s : escapeTsvField(s));
}

/**
 * One entry's line: key, word, narrow, broad. The key is `id` when it is given and not empty,
 * otherwise `word#n` (lexicon/keys.ts).
 */
export function putTsvEntry(out: ByteChunks, id: string | undefined, n: number, word: string, narrow: string, broad: string): void {
  const keyed = id !== undefined && id !== "";
  // Escaping at most doubles a field; 3 bytes per UTF-16 unit; the index's digits, tabs and line feed.
  const most = 6 * ((keyed ? id.length : word.length) + word.length + narrow.length + broad.length) + 24;
  if (!out.room(most)) {
    out.push(formatTsvEntry({ key: keyed ? id : `${word}#${n}`, word, narrow, broad }));
    return;
  }
  if (keyed) putField(out, id);
  else {
    putField(out, word);
    out.putByte(HASH);
    if (n < 10) out.putByte(48 + n);
    else out.put(String(n));
  }
  out.putByte(TAB);
  putField(out, word);
  out.putByte(TAB);
  putField(out, narrow);
  out.putByte(TAB);
  putField(out, broad);
  out.putByte(LF);
}

/**
 * One entry's line with its key as given (a build's entries carry theirs). Returns where the line
 * starts in `out.target` (it ends at `out.position`), or -1 when it was too long for a chunk and
 * went in as text. Written as a string and then encoded, the lines cost about 0.1 s of a
 * one-variety CMU build (a CPU profile).
 */
export function putTsvLine(out: ByteChunks, e: TsvEntry): number {
  // Escaping at most doubles a field; 3 bytes per UTF-16 unit; the tabs and line feed.
  if (!out.room(6 * (e.key.length + e.word.length + e.narrow.length + e.broad.length) + 4)) {
    out.push(formatTsvEntry(e));
    return -1;
  }
  const start = out.position;
  putField(out, e.key);
  out.putByte(TAB);
  putField(out, e.word);
  out.putByte(TAB);
  putField(out, e.narrow);
  out.putByte(TAB);
  putField(out, e.broad);
  out.putByte(LF);
  return start;
}
