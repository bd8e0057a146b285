// Reading a variety's written files back for the reconciliation (reconcile.ts), on bytes: a lexicon's
// JSON Lines output is tens of megabytes, and decoding it to text only to find two fields per line
// cost more than writing it. Lines end at LF (one CR before it dropped), as `eachLine` in
// reconcile.ts reads them; the fields are found with the same rules as its regular expressions.

import { open, type FileHandle } from "node:fs/promises";

/** Bytes read per call (the buffer grows only for a line longer than this). */
const READ_BYTES = 1 << 20;

/**
 * Calls `fn(buf, start, end)` for every line of a file (bytes `start` … `end` of `buf`, no line end).
 * The file is read into one buffer, used again for every read (the unfinished line moved to its
 * start): a reader that made a buffer per chunk, and joined each to the tail of the one before,
 * allocated twice the file's size outside the heap, which made the garbage collector sweep a
 * build's whole heap again and again while its outputs were read back. `size`: bytes per read.
 */
export async function eachLineBytes(path: string, fn: LineFn, size = READ_BYTES): Promise<void> {
  const h = await open(path, "r");
  try {
    const lines = new LineFeeder(fn, size);
    await lines.feed(h);
    lines.end();
  } finally {
    await h.close();
  }
}

/** What gets each line: bytes `start` … `end` of `buf` (no line end). */
export type LineFn = (buf: Buffer, start: number, end: number) => void;

/**
 * The lines of a file read in steps (`feed`, then `end` once the file is complete): each read goes
 * on from where the one before stopped, and a line cut by the end of a read waits for the rest.
 * A build's checking thread reads a file this way while it is being written (check-written.ts).
 */
export class LineFeeder {
  private buf: Buffer;
  private kept = 0;
  /** Bytes of the file read so far. */
  position = 0;

  constructor(private readonly fn: LineFn, size = READ_BYTES) {
    this.buf = Buffer.allocUnsafe(Math.max(1, size));
  }

  /** Reads from `h` (from `position` on) up to byte `upTo` of the file, or to its end when absent. */
  async feed(h: FileHandle, upTo = Infinity): Promise<void> {
    while (this.position < upTo) {
      let buf = this.buf;
      const kept = this.kept;
      if (kept === buf.length) {
        const bigger = Buffer.allocUnsafe(buf.length * 2);
        buf.copy(bigger, 0, 0, kept);
        this.buf = buf = bigger;
      }
      const { bytesRead } = await h.read(buf, kept, Math.min(buf.length - kept, upTo - this.position), this.position);
      if (bytesRead === 0) break;
      this.position += bytesRead;
      const filled = kept + bytesRead;
      const view = buf.subarray(0, filled);
      let start = 0;
      // `view` is a new object per read (the same memory): callers may key what they found on it.
      for (let nl = view.indexOf(10); nl >= 0; nl = view.indexOf(10, start)) {
        this.fn(view, start, nl > start && view[nl - 1] === 13 ? nl - 1 : nl);
        start = nl + 1;
      }
      buf.copy(buf, 0, start, filled);
      this.kept = filled - start;
    }
  }

  /** The file is complete: its last line, when it has no line end. */
  end(): void {
    const kept = this.kept;
    this.kept = 0;
    if (kept > 0) this.fn(this.buf.subarray(0, kept), 0, this.buf[kept - 1] === 13 ? kept - 1 : kept);
  }
}

/** Counts the occurrences (not overlapping) of an ASCII tag in a file's bytes, read as `eachLineBytes` reads them (one buffer; `size`: bytes per read). */
export async function countTag(path: string, tag: string, size = READ_BYTES): Promise<number> {
  const t = Buffer.from(tag, "latin1");
  const h = await open(path, "r");
  let n = 0;
  try {
    const buf = Buffer.allocUnsafe(Math.max(1, size) + t.length);
    let kept = 0;
    for (;;) {
      const { bytesRead } = await h.read(buf, kept, buf.length - kept, null);
      if (bytesRead === 0) break;
      const filled = kept + bytesRead;
      const view = buf.subarray(0, filled);
      let from = 0;
      for (let at = view.indexOf(t, 0); at >= 0; at = view.indexOf(t, at + t.length)) {
        n++;
        from = at + t.length;
      }
      // Keep the last bytes that could begin the tag (shorter than it, never counted twice).
      const keep = Math.max(from, filled - (t.length - 1));
      buf.copy(buf, 0, keep, filled);
      kept = filled - keep;
    }
  } finally {
    await h.close();
  }
  return n;
}

/** Index just past the JSON string that starts (after its opening quote) at `at`, or -1 when it does not close before `end`. */
function stringEnd(buf: Buffer, at: number, end: number): number {
  for (let i = at; i < end; i++) {
    const c = buf[i]!;
    if (c === 92 /* \ */) i++;
    else if (c === 34 /* " */) return i + 1;
  }
  return -1;
}

/** Finds `pattern` within a line; `from` advances only, so scanning a file stays linear. */
class Finder {
  private next = -1;
  private searched = -1;
  constructor(private readonly pattern: Buffer) {}
  find(buf: Buffer, from: number, end: number): number {
    if (buf !== this.buf || from > this.next || this.searched > from) {
      this.buf = buf;
      this.searched = from;
      this.next = buf.indexOf(this.pattern, from);
      if (this.next < 0) this.next = Number.MAX_SAFE_INTEGER;
    }
    return this.next < end ? this.next : -1;
  }
  private buf: Buffer | undefined;
}

const SOURCE = Buffer.from('"source":{"file":"');
const LINE = Buffer.from(',"line":');
const WORD = Buffer.from('"word":"');

/** What a JSON Lines file read back gives: the line count, and each record's `source.line` (0 when absent), `source.file` ("" when absent) and `word` ("" when absent). */
export interface JsonlBack {
  count: number;
  lines: number[];
  files: string[];
  words: string[];
}

/** JSON Lines read back (`JsonlReader.line` for each line). */
export async function readBackJsonl(path: string): Promise<JsonlBack> {
  const r = new JsonlReader();
  await eachLineBytes(path, r.line);
  return r.result();
}

/** The JSON Lines read-back, line by line. */
export class JsonlReader {
  private readonly lines: number[] = [];
  private readonly files: string[] = [];
  private readonly words: string[] = [];
  private readonly source = new Finder(SOURCE);
  private readonly word = new Finder(WORD);
  // Every record of a run names one file or two: its JSON string is decoded once per change (the
  // bytes compared with the last ones in place, no string made per record).
  private lastRaw: Buffer = Buffer.alloc(0);
  private lastFile = "";

  readonly line: LineFn = (buf, start, end) => {
    const s = sourceOf(buf, start, end, this.source);
    this.lines.push(s === undefined ? 0 : s.line);
    if (s === undefined) this.files.push("");
    else {
      const n = s.close - s.open;
      if (n !== this.lastRaw.length || buf.compare(this.lastRaw, 0, n, s.open, s.close) !== 0) {
        this.lastRaw = Buffer.from(buf.subarray(s.open, s.close));
        this.lastFile = JSON.parse(buf.toString("utf8", s.open, s.close)) as string;
      }
      this.files.push(this.lastFile);
    }
    this.words.push(wordOf(buf, start, end, this.word));
  };

  result(): JsonlBack {
    return { count: this.lines.length, lines: this.lines, files: this.files, words: this.words };
  }
}

/**
 * `"source":{"file":"…","line":N}` — the first such match in the line, as
 * /"source":\{"file":("(?:[^"\\]|\\.)*"),"line":(\d+)\}/: the line, and where the file's JSON string lies.
 */
function sourceOf(buf: Buffer, start: number, end: number, finder: Finder): { line: number; open: number; close: number } | undefined {
  for (let at = finder.find(buf, start, end); at >= 0; at = finder.find(buf, at + 1, end)) {
    const open = at + SOURCE.length - 1;
    const close = stringEnd(buf, open + 1, end);
    if (close < 0 || buf.compare(LINE, 0, LINE.length, close, close + LINE.length) !== 0) continue;
    let i = close + LINE.length;
    let n = 0;
    const digits = i;
    while (i < end && buf[i]! >= 48 && buf[i]! <= 57) n = n * 10 + (buf[i++]! - 48);
    if (i > digits && i < end && buf[i] === 125 /* } */) return { line: n, open, close };
  }
  return undefined;
}

/** The first `"word":"…"` of the line, decoded, as /"word":("(?:[^"\\]|\\.)*")/ then JSON.parse. */
function wordOf(buf: Buffer, start: number, end: number, finder: Finder): string {
  for (let at = finder.find(buf, start, end); at >= 0; at = finder.find(buf, at + 1, end)) {
    const open = at + WORD.length - 1;
    // The string's end, and whether it holds an escape (without one its text is its bytes between the quotes).
    let close = -1;
    let escaped = false;
    for (let i = open + 1; i < end; i++) {
      const c = buf[i]!;
      if (c === 92 /* \ */) {
        escaped = true;
        i++;
      } else if (c === 34 /* " */) {
        close = i + 1;
        break;
      }
    }
    if (close < 0) continue;
    return escaped ? (JSON.parse(buf.toString("utf8", open, close)) as string) : buf.toString("utf8", open + 1, close - 1);
  }
  return "";
}

/** What a TSV file read back gives: entry lines (header excluded) and the number of distinct values of its `word` column. */
export interface TsvBack {
  entries: number;
  words: number;
}

/** TSV read back (`TsvReader.line` for each line). */
export async function readBackTsv(path: string): Promise<TsvBack> {
  const r = new TsvReader();
  await eachLineBytes(path, r.line);
  return r.result();
}

/** The TSV read-back, line by line. */
export class TsvReader {
  private wordAt = -1;
  private readonly words = new Set<string>();
  private n = -1;

  readonly line: LineFn = (buf, start, end) => {
    if (this.n === -1) this.wordAt = buf.toString("utf8", start, end).split("\t").indexOf("word");
    else if (this.wordAt >= 0) {
      let from = start;
      for (let k = 0; k < this.wordAt && from >= 0; k++) {
        const tab = buf.indexOf(9, from);
        from = tab >= 0 && tab < end ? tab + 1 : -1;
      }
      if (from < 0) this.words.add("");
      else {
        const tab = buf.indexOf(9, from);
        // Distinct byte strings are distinct latin1 strings: no UTF-8 decoding needed to count them.
        this.words.add(buf.toString("latin1", from, tab >= 0 && tab < end ? tab : end));
      }
    }
    this.n++;
  };

  result(): TsvBack {
    return { entries: Math.max(0, this.n), words: this.words.size };
  }
}
