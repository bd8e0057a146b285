// Splitting lexicon CSV text into records, incrementally (text arrives in chunks), with the physical
// line each record starts on. Linear in the text; holds at most one incomplete record.

/*
 * The record grammar (README "The lexicon file"; RFC 4180 §2 with two documented differences):
 * - A physical line ends at CR LF, LF or a lone CR (src/lines.ts, shared with diagnostics).
 * - A record ends at the end of its line, with one exception from RFC 4180: a lone CR inside a
 *   quoted field is data and does not end the record (the record then spans more than one line).
 * - Difference 1: an LF (or CR LF) always ends the record, even inside a quoted field, so that a
 *   broken quote costs one record, never the rest of the file (the field parser reports it).
 * - Difference 2: a lone CR outside a quoted field ends the line and the record, as LF does (CR-only
 *   files read line by line; `row CR CR LF` is a row and then a blank line).
 * - A record whose first character is `#` is a comment up to the end of its line (quotes in it mean
 *   nothing); a record of only spaces and tabs is blank.
 * - A byte-order mark at the very start of the text is not part of the first record.
 */

export type RecordKind = "data" | "comment" | "blank";

/** One record of the text. */
export interface SourceRecord {
  /** 1-based physical line it starts on. */
  readonly line: number;
  /** How many physical lines it spans (1, plus one per lone CR inside a quoted field). */
  readonly lines: number;
  /** Its text without the line end. */
  readonly raw: string;
  readonly kind: RecordKind;
}

const LF = 10;
const CR = 13;
const QUOTE = 34;
const COMMA = 44;

const enum State {
  FieldStart,
  Unquoted,
  Quoted,
  AfterQuote,
  Comment,
}

/** Finds the next occurrence of one character at or after a position that only grows (amortised linear). */
class Finder {
  /** The last occurrence found (-1 when none), and the end of the stretch known to hold no other. */
  private at = -1;
  private to = 0;
  constructor(private readonly ch: string) {}
  find(buf: string, pos: number): number {
    if (this.at >= pos) return this.at;
    const k = buf.indexOf(this.ch, Math.max(pos, this.to));
    this.at = k;
    this.to = k < 0 ? buf.length : k + 1;
    return k;
  }
  /** The buffer lost its first `n` characters. */
  shift(n: number): void {
    this.at = this.at >= n ? this.at - n : -1;
    this.to = Math.max(0, this.to - n);
  }
}

/** Splits text fed in chunks into records: `push` each chunk, then `end`. */
export class RecordSplitter {
  private buf = "";
  private pos = 0;
  private line = 1;
  private begun = false;
  private readonly lf = new Finder("\n");
  private readonly cr = new Finder("\r");
  /** A slow scan of the record at `pos` that stopped for want of text, to be resumed. */
  private scan: { i: number; state: State; crs: number } | undefined;

  /**
   * `from`: where the text starts, when it is a part of a file that starts at a record boundary
   * (read-chunk.ts): the line of its first record, and no byte-order mark is looked for.
   */
  constructor(from?: { readonly line: number }) {
    if (from !== undefined) {
      this.line = from.line;
      this.begun = true;
    }
  }

  /** The physical lines completed so far (after `end`: the text's line count; with `from`, the last line's number). */
  get lines(): number {
    return this.line - 1;
  }

  /** Adds a chunk; returns the records it completes. */
  push(text: string): SourceRecord[] {
    if (!this.begun) {
      if (text === "") return [];
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
      this.begun = true;
    }
    if (this.pos > 0) {
      this.buf = this.buf.slice(this.pos);
      this.lf.shift(this.pos);
      this.cr.shift(this.pos);
      if (this.scan !== undefined) this.scan.i -= this.pos;
      this.pos = 0;
    }
    this.buf += text;
    return this.take(false);
  }

  /** The end of the text: returns the last records. */
  end(): SourceRecord[] {
    return this.take(true);
  }

  private take(final: boolean): SourceRecord[] {
    const out: SourceRecord[] = [];
    const buf = this.buf;
    while (this.pos < buf.length) {
      if (this.scan === undefined) {
        // Fast path: no CR before the next LF other than the CR of a CR LF.
        const lf = this.lf.find(buf, this.pos);
        const cr = this.cr.find(buf, this.pos);
        if (lf >= 0 && (cr < 0 || cr >= lf - 1)) {
          out.push(this.record(buf.slice(this.pos, cr >= 0 && cr === lf - 1 ? lf - 1 : lf), 1));
          this.pos = lf + 1;
          continue;
        }
        if (cr < 0) {
          if (!final) break;
          out.push(this.record(buf.slice(this.pos), 1));
          this.pos = buf.length;
          break;
        }
        this.scan = { i: this.pos, state: buf.charCodeAt(this.pos) === 35 ? State.Comment : State.FieldStart, crs: 0 };
      }
      const done = this.slowScan(final);
      if (done === undefined) break;
      out.push(this.record(buf.slice(this.pos, done.end), 1 + done.crs));
      this.pos = done.next;
      this.scan = undefined;
    }
    return out;
  }

  /** Character by character from the saved state: where the record at `pos` ends, or undefined to wait for more text. */
  private slowScan(final: boolean): { end: number; next: number; crs: number } | undefined {
    const s = this.scan!;
    const buf = this.buf;
    const n = buf.length;
    let { i, state, crs } = s;
    for (; i < n; i++) {
      const c = buf.charCodeAt(i);
      if (c === LF) return { end: i, next: i + 1, crs };
      if (c === CR) {
        if (i + 1 === n && !final) break; // a CR LF may be split across chunks: wait
        if (buf.charCodeAt(i + 1) === LF) return { end: i, next: i + 2, crs };
        if (i + 1 < n && state === State.Quoted) {
          crs++;
          continue;
        }
        return { end: i, next: i + 1, crs };
      }
      switch (state) {
        case State.FieldStart:
          state = c === QUOTE ? State.Quoted : c === COMMA ? State.FieldStart : State.Unquoted;
          break;
        case State.Unquoted:
          if (c === COMMA) state = State.FieldStart;
          break;
        case State.Quoted:
          if (c === QUOTE) state = State.AfterQuote;
          break;
        case State.AfterQuote:
          state = c === QUOTE ? State.Quoted : c === COMMA ? State.FieldStart : State.Unquoted;
          break;
        case State.Comment:
          break;
      }
    }
    if (final) return { end: n, next: n, crs };
    this.scan = { i, state, crs };
    return undefined;
  }

  private record(raw: string, lines: number): SourceRecord {
    const line = this.line;
    this.line += lines;
    const kind = raw.charCodeAt(0) === 35 ? "comment" : /^[ \t]*$/.test(raw) ? "blank" : "data";
    return { line, lines, raw, kind };
  }
}

/** Every record of a whole text (for tests and small inputs). */
export function splitRecords(text: string): SourceRecord[] {
  const s = new RecordSplitter();
  return [...s.push(text), ...s.end()];
}
