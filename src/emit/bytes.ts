// Text to UTF-8 bytes in large chunks. Node's `Buffer.from(string)` and `stream.write(string)`
// take a slow path for strings holding characters past U+00FF (every IPA line): about 60 MB/s,
// against about 800 MB/s for `TextEncoder.encodeInto` into a buffer that is already there. A whole
// lexicon's output goes through this: lines are encoded into a 1 MiB buffer as they come, and a full
// buffer is handed on as one chunk.

const encoder = new TextEncoder();

/** Bytes per chunk handed on. */
export const CHUNK_BYTES = 1 << 20;

/** UTF-8 bytes of `text` (one encodeInto into a fresh buffer of the largest size it can need). */
export function utf8Bytes(text: string): Uint8Array {
  const buf = new Uint8Array(text.length * 3);
  const { written } = encoder.encodeInto(text, buf);
  return buf.subarray(0, written);
}

/*
 * Chunk buffers are used again once written. A whole lexicon's outputs are some 90 MB of chunks;
 * each new one is memory outside the JavaScript heap, and growing that makes the garbage collector
 * sweep the whole heap (a build holds much) every few tens of megabytes. A full chunk handed on is
 * remembered here; whoever writes it (writeFileAtomic) gives it back with `releaseChunk` once it
 * is written and no longer used, and the next ByteChunks of this thread takes it instead of a new one.
 */
const free: Uint8Array[] = [];
/** Chunks handed on that may come back, with the whole buffer each is part of. */
const handedOn = new WeakMap<Uint8Array, Uint8Array>();
/** Most buffers kept for use again (per thread). */
const KEEP = 8;

function newBuffer(size: number): Uint8Array {
  if (size === CHUNK_BYTES) {
    const b = free.pop();
    if (b !== undefined) return b;
  }
  return new Uint8Array(size);
}

/**
 * Gives back a chunk a ByteChunks handed on, once it has been written and nothing holds it (its
 * bytes will be overwritten). Anything else is left alone.
 */
export function releaseChunk(chunk: Uint8Array): void {
  const whole = handedOn.get(chunk);
  if (whole === undefined) return;
  handedOn.delete(chunk);
  if (free.length < KEEP) free.push(whole);
}

/** Encodes strings into chunks of about `size` bytes; each full chunk goes to `emit`. */
export class ByteChunks {
  private buf: Uint8Array;
  private at = 0;

  constructor(private readonly emit: (chunk: Uint8Array) => void, private readonly size = CHUNK_BYTES) {
    this.buf = newBuffer(size);
  }

  /** Bytes gathered and not yet handed on. */
  get pending(): number {
    return this.at;
  }

  push(text: string): void {
    // A UTF-16 unit is at most 3 bytes of UTF-8 (a surrogate pair, two units, is 4).
    const most = text.length * 3;
    if (this.at + most > this.buf.length) {
      this.flush();
      if (most > this.buf.length) {
        this.emit(utf8Bytes(text));
        return;
      }
    }
    this.at += encoder.encodeInto(text, this.buf.subarray(this.at)).written;
  }

  /**
   * `text` and a line feed. Cheaper than pushing `text + "\n"`: the joined string would be a
   * rope, which the encoder first copies flat.
   */
  pushLine(text: string): void {
    this.push(text);
    if (this.at >= this.buf.length) this.flush();
    this.buf[this.at++] = 10;
  }

  /**
   * Makes room for `most` more bytes (flushing what is gathered when the chunk lacks it), for `put`;
   * false when a whole chunk is too small (the caller then pushes text instead).
   */
  room(most: number): boolean {
    if (this.at + most <= this.buf.length) return true;
    this.flush();
    return most <= this.buf.length;
  }

  /** The chunk being filled, for a writer that puts bytes itself after `room` (then `moveTo` the position it reached). */
  get target(): Uint8Array {
    return this.buf;
  }

  /** Where the next byte goes in `target`. */
  get position(): number {
    return this.at;
  }

  /** Takes the bytes a writer put into `target` up to `at` (no further than the room it made). */
  moveTo(at: number): void {
    this.at = at;
  }

  /** Bytes as they are (copied). */
  pushBytes(bytes: Uint8Array): void {
    if (!this.room(bytes.length)) {
      this.emit(bytes.slice());
      return;
    }
    this.buf.set(bytes, this.at);
    this.at += bytes.length;
  }

  /** One byte; the caller made room. */
  putByte(b: number): void {
    this.buf[this.at++] = b;
  }

  /** Hands on what is gathered (nothing when empty). */
  flush(): void {
    if (this.at === 0) return;
    // A chunk mostly empty (flushed early) is copied out and the buffer kept; a full one is handed on.
    const out = this.at < this.buf.length >> 1 ? this.buf.slice(0, this.at) : this.buf.subarray(0, this.at);
    if (out.buffer === this.buf.buffer) {
      if (this.buf.length === CHUNK_BYTES) handedOn.set(out, this.buf);
      this.buf = newBuffer(this.size);
    }
    this.at = 0;
    this.emit(out);
  }
}

/**
 * The character starting at text[i] (`c`, its first code unit, at least 0x80) as UTF-8 at `at`, a
 * lone surrogate as U+FFFD (as TextEncoder writes it); the position after. Four bytes exactly when
 * it wrote a surrogate pair: the caller then steps over text[i + 1]. The TSV and PLS writers share it.
 */
export function putUtf8(buf: Uint8Array, at: number, text: string, i: number, c: number): number {
  const next = putNonAscii(buf, at, text, i, c);
  return next < 0 ? putNonAscii(buf, at, "\ufffd", 0, 0xfffd) : next;
}

/** ASCII text (tags, keys, punctuation) at `at`, one byte per character; the position after. */
export function putAscii(buf: Uint8Array, at: number, text: string): number {
  for (let i = 0; i < text.length; i++) buf[at++] = text.charCodeAt(i);
  return at;
}

/**
 * The UTF-8 bytes of the character starting at text[i] (`c`, its first code unit, at least 0x80)
 * put at `at`: two or three bytes, four for a surrogate pair (the caller then steps over text[i + 1]:
 * `c` is a high surrogate). Returns the position after, or -1 for a lone surrogate (nothing
 * written: each writer has its own way with one). The writers that put text straight into chunks
 * (tsv-batch.ts, jsonl-bytes.ts, the PLS lexemes) share it.
 */
export function putNonAscii(buf: Uint8Array, at: number, text: string, i: number, c: number): number {
  if (c < 0x800) {
    buf[at] = 0xc0 | (c >> 6);
    buf[at + 1] = 0x80 | (c & 0x3f);
    return at + 2;
  }
  if (c >= 0xd800 && c <= 0xdfff) {
    const d = i + 1 < text.length ? text.charCodeAt(i + 1) : 0;
    if (c > 0xdbff || d < 0xdc00 || d > 0xdfff) return -1;
    const cp = 0x10000 + ((c - 0xd800) << 10) + (d - 0xdc00);
    buf[at] = 0xf0 | (cp >> 18);
    buf[at + 1] = 0x80 | ((cp >> 12) & 0x3f);
    buf[at + 2] = 0x80 | ((cp >> 6) & 0x3f);
    buf[at + 3] = 0x80 | (cp & 0x3f);
    return at + 4;
  }
  buf[at] = 0xe0 | (c >> 12);
  buf[at + 1] = 0x80 | ((c >> 6) & 0x3f);
  buf[at + 2] = 0x80 | (c & 0x3f);
  return at + 3;
}
