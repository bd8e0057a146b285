// TSV lines put straight into byte chunks (emit/bytes.ts), without the line as a string: the same
// bytes as `formatTsvEntry` encoded as UTF-8 (a lone surrogate as U+FFFD, as TextEncoder writes
// it). Each field is escaped and encoded in one pass. The key `word#n` is written from its parts.

import { putAscii, putUtf8, type ByteChunks } from "./bytes.js";
import { formatTsvEntry, type TsvEntry } from "./tsv.js";

const TAB = 9;
const LF = 10;
const HASH = 35;

/** `s` escaped as escapeTsvField escapes it, in UTF-8 at `at`; the position after. At most 3 bytes per UTF-16 unit. */
function putField(buf: Uint8Array, at: number, s: string): number {
  const n = s.length;
  for (let i = 0; i < n; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) {
      if (c === 92) {
        buf[at++] = 92;
        buf[at++] = 92;
      } else if (c === TAB || c === LF || c === 13) {
        buf[at++] = 92;
        buf[at++] = c === TAB ? 116 : c === LF ? 110 : 114;
      } else buf[at++] = c;
    } else {
      const next = putUtf8(buf, at, s, i, c);
      if (next - at === 4) i++;
      at = next;
    }
  }
  return at;
}

/** A line after its key: a tab before each of word, narrow and broad, and the line feed; the position after. */
function putRest(buf: Uint8Array, at: number, word: string, narrow: string, broad: string): number {
  buf[at++] = TAB;
  at = putField(buf, at, word);
  buf[at++] = TAB;
  at = putField(buf, at, narrow);
  buf[at++] = TAB;
  at = putField(buf, at, broad);
  buf[at++] = LF;
  return at;
}

/**
 * One entry's line: key, word, narrow, broad. The key is `id` when it is given and not empty,
 * otherwise `word#n` (lexicon/keys.ts).
 */
export function putTsvEntry(out: ByteChunks, id: string | undefined, n: number, word: string, narrow: string, broad: string): void {
  const keyed = id !== undefined && id !== "";
  // 3 bytes per UTF-16 unit (an escape is 2 for 1); the index's digits, tabs and line feed.
  const most = 3 * ((keyed ? id.length : word.length) + word.length + narrow.length + broad.length) + 24;
  if (!out.room(most)) {
    out.push(formatTsvEntry({ key: keyed ? id : `${word}#${n}`, word, narrow, broad }));
    return;
  }
  const buf = out.target;
  out.moveTo(putRest(buf, putKey(buf, out.position, id, n, word), word, narrow, broad));
}

/** The key at `at`: `id` when it is given and not empty, otherwise `word#n`; the position after. */
function putKey(buf: Uint8Array, at: number, id: string | undefined, n: number, word: string): number {
  if (id !== undefined && id !== "") return putField(buf, at, id);
  at = putField(buf, at, word);
  buf[at++] = HASH;
  if (n < 10) buf[at++] = 48 + n;
  else at = putAscii(buf, at, String(n));
  return at;
}

/**
 * The start of an entry's line, the key (as `putTsvEntry` writes it), a tab, the word and a tab,
 * at `at` (room: 3 bytes per UTF-16 unit of key and word, and 16 more); the position after. The
 * caller writes the forms and the line feed.
 */
export function putTsvHead(buf: Uint8Array, at: number, id: string | undefined, n: number, word: string): number {
  at = putKey(buf, at, id, n, word);
  buf[at++] = TAB;
  at = putField(buf, at, word);
  buf[at++] = TAB;
  return at;
}

/**
 * One entry's line with its key as given (a build's entries carry theirs). Returns where the line
 * starts in `out.target` (it ends at `out.position`), or -1 when it was too long for a chunk and
 * went in as text. Written as a string and then encoded, the lines cost about 0.1 s of a
 * one-variety CMU build (a CPU profile).
 */
export function putTsvLine(out: ByteChunks, e: TsvEntry): number {
  if (!out.room(3 * (e.key.length + e.word.length + e.narrow.length + e.broad.length) + 4)) {
    out.push(formatTsvEntry(e));
    return -1;
  }
  const buf = out.target;
  const start = out.position;
  out.moveTo(putRest(buf, putField(buf, start, e.key), e.word, e.narrow, e.broad));
  return start;
}
