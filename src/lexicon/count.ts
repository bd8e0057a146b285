// An independent count of a lexicon file's data records, on raw bytes, sharing no code with the
// reader: what a build's reconciliation compares the rows written and rejected against.

import { open } from "node:fs/promises";

/*
 * The same record grammar as the reader (records.ts, README "The lexicon file"), restated on
 * bytes: UTF-8 never uses bytes below 0x80 inside a multi-byte character, so LF, CR, `"`, `,`, `#`,
 * space and tab are found exactly without decoding. A record ends at LF, CR LF or a lone CR, except a
 * lone CR inside a quoted field (data). A record starting with `#` is a comment; one of only spaces
 * and tabs is blank; the first other record is the header; every later one is a data record.
 */

export interface RecordCount {
  /** Physical lines (CR LF, LF and a lone CR each end one). */
  readonly lines: number;
  /** Data records after the header: what the reader turns into rows + rejects, when the header is usable. */
  readonly dataRecords: number;
  /** Line the header starts on, 0 when the file has none. */
  readonly headerLine: number;
}

const LF = 0x0a;
const CR = 0x0d;
const QUOTE = 0x22;
const COMMA = 0x2c;
const HASH = 0x23;
const SPACE = 0x20;
const TAB = 0x09;

/** Counts records incrementally over byte chunks. */
export class RecordCounter {
  private lines = 0;
  private data = 0;
  private header = 0;
  // The record being read: its start line, whether it has begun, and its kind so far.
  private recordLine = 1;
  private inRecord = false;
  private comment = false;
  private blank = true;
  // Quote state: at a field's start, inside quotes, or just after a quote that may close the field.
  private fieldStart = true;
  private quoted = false;
  private maybeClosed = false;
  private pendingCR = false;
  private bomBytes = 0;

  push(bytes: Uint8Array): void {
    for (let i = 0; i < bytes.length; i++) this.byte(bytes[i]!);
  }

  /** The final count (call once, after the last chunk). */
  end(): RecordCount {
    if (this.pendingCR) {
      this.pendingCR = false;
      this.lineEnd();
    }
    if (this.inRecord) this.lineEnd();
    return { lines: this.lines, dataRecords: this.data, headerLine: this.header };
  }

  private byte(b: number): void {
    // A byte-order mark (EF BB BF) at the very start is not text.
    if (this.lines === 0 && !this.inRecord && this.bomBytes < 3 && b === [0xef, 0xbb, 0xbf][this.bomBytes]) {
      this.bomBytes++;
      return;
    }
    if (this.bomBytes > 0 && this.bomBytes < 3) {
      // The start of a BOM that was not one: those bytes were text (not blank, not a comment, not a quote).
      this.inRecord = true;
      this.blank = false;
      this.fieldStart = false;
    }
    this.bomBytes = 3;
    if (this.pendingCR) {
      this.pendingCR = false;
      if (b === LF) {
        this.lineEnd();
        return;
      }
      if (this.quoted) {
        // a lone CR inside a quoted field: data, but a line of its own for numbering
        this.lines++;
      } else {
        this.lineEnd();
      }
    }
    if (b === CR) {
      this.pendingCR = true;
      this.inRecord = true;
      return;
    }
    if (b === LF) {
      this.inRecord = true;
      this.lineEnd();
      return;
    }
    if (!this.inRecord) {
      this.inRecord = true;
      this.comment = b === HASH;
    }
    if (b !== SPACE && b !== TAB) this.blank = false;
    if (this.comment) return;
    if (this.quoted) {
      if (b === QUOTE) {
        this.quoted = false;
        this.maybeClosed = true;
      }
      return;
    }
    if (this.maybeClosed) {
      this.maybeClosed = false;
      if (b === QUOTE) {
        this.quoted = true; // "" inside a quoted field
        return;
      }
    }
    if (b === COMMA) this.fieldStart = true;
    else if (this.fieldStart) {
      this.fieldStart = false;
      if (b === QUOTE) this.quoted = true;
    }
  }

  /** The current line ends; the record ends with it (a quoted lone CR never gets here). */
  private lineEnd(): void {
    this.lines++;
    if (!this.comment && !this.blank) {
      if (this.header === 0) this.header = this.recordLine;
      else this.data++;
    }
    this.recordLine = this.lines + 1;
    this.inRecord = false;
    this.comment = false;
    this.blank = true;
    this.fieldStart = true;
    this.quoted = false;
    this.maybeClosed = false;
  }
}

/** Counts the records of a text or bytes. */
export function countRecordsIn(text: string | Uint8Array): RecordCount {
  const c = new RecordCounter();
  c.push(typeof text === "string" ? Buffer.from(text, "utf8") : text);
  return c.end();
}

/** Counts the records of a lexicon file, streaming (64 KB at a time). */
export async function countRecords(path: string): Promise<RecordCount> {
  const fh = await open(path, "r");
  try {
    const c = new RecordCounter();
    const buf = Buffer.allocUnsafe(1 << 16);
    for (;;) {
      const { bytesRead } = await fh.read(buf, 0, buf.length, null);
      if (bytesRead === 0) break;
      c.push(buf.subarray(0, bytesRead));
    }
    return c.end();
  } finally {
    await fh.close();
  }
}
