// The fields of one lexicon CSV record: RFC 4180 quoting checked, values unquoted, and the column where
// each value starts; and the characters no field may hold. One linear pass per record.

import { codePointsBetween } from "../lines.js";

/** Where one field's value starts (1-based code-point column of its first character) and whether it was quoted. */
export interface FieldSpan {
  readonly column: number;
  readonly quoted: boolean;
}

/** One field: its value (quotes removed, `""` read as `"`) and where it starts. */
export interface Field extends FieldSpan {
  readonly value: string;
}

export type QuoteCheck =
  | { readonly ok: true; readonly fields: readonly Field[] }
  | { readonly ok: false; readonly column: number; readonly code: string; readonly reason: string };

const QUOTE = 34;
const COMMA = 44;

/**
 * Splits one record (its text without the line end) into fields, checking RFC 4180 §2 quoting as
 * csv-parse reads it with `relax_quotes`: a field that starts with `"` is quoted and must close
 * before the next comma or the end of the record (`""` inside is one quote); a `"` inside an
 * unquoted field is an ordinary character. Columns count code points from 1. Linear in the record's
 * length whatever characters it holds.
 */
export function checkQuoting(raw: string): QuoteCheck {
  const n = raw.length;
  const astral = /[\ud800-\udfff]/.test(raw);
  // The code-point column of UTF-16 offset `i`, advanced incrementally: the offsets asked for never
  // decrease and always fall on ASCII characters (quotes, commas) or the end, never inside a pair.
  let at = 0;
  let atCol = 1;
  const col = (i: number): number => {
    if (!astral) return i + 1;
    atCol += codePointsBetween(raw, at, i);
    at = i;
    return atCol;
  };
  const fields: Field[] = [];
  let i = 0;
  for (;;) {
    if (raw.charCodeAt(i) === QUOTE) {
      const open = i;
      const column = col(i) + 1;
      i++;
      let value = "";
      let from = i;
      for (;;) {
        const q = raw.indexOf('"', i);
        if (q < 0) {
          const c = col(open);
          return { ok: false, column: c, code: "lexicon/unclosed-quote", reason: `The quoted field that starts at column ${c} is not closed on this line (a field cannot span lines).` };
        }
        if (raw.charCodeAt(q + 1) === QUOTE) {
          value += raw.slice(from, q + 1);
          i = q + 2;
          from = i;
          continue;
        }
        value += raw.slice(from, q);
        i = q + 1;
        break;
      }
      fields.push({ value, column, quoted: true });
      if (i < n && raw.charCodeAt(i) !== COMMA) {
        const ch = String.fromCodePoint(raw.codePointAt(i)!);
        return { ok: false, column: col(i), code: "lexicon/text-after-quote", reason: `Unexpected '${ch}' after the closing quote of a field; write a quote inside a quoted field as "".` };
      }
    } else {
      const comma = raw.indexOf(",", i);
      const end = comma < 0 ? n : comma;
      fields.push({ value: raw.slice(i, end), column: col(i), quoted: false });
      i = end;
    }
    if (i >= n) return { ok: true, fields };
    i++; // the comma
    if (i === n) {
      fields.push({ value: "", column: col(i), quoted: false });
      return { ok: true, fields };
    }
  }
}

/**
 * The column (1-based) on the record's line of the character at code-point `offset` of a field's
 * value: inside a quoted field every `""` before it counts two columns. Linear in the record.
 */
export function columnInField(raw: string, field: FieldSpan, offset: number): number {
  if (!field.quoted) return field.column + offset;
  const cps = Array.from(raw);
  let col = field.column;
  for (let k = 0; k < offset; k++) col += cps[col - 1] === '"' ? 2 : 1;
  return col;
}

/** A character no field may hold, with its code and message. */
export interface Forbidden {
  /** 1-based code-point column on the record's first line. */
  readonly column: number;
  readonly code: string;
  readonly reason: string;
}

/*
 * Characters refused anywhere in a record (header or row), each a positioned reject of the row:
 * - U+FFFD: the decoder's stand-in for bytes that are not UTF-8 (`lexicon/bad-encoding`);
 * - U+0000 NUL (`lexicon/nul`) and U+FEFF, a byte-order mark anywhere but the start of the file (`lexicon/bom`);
 * - every other C0 control but tab (a CR can only be here inside a quoted field: outside quotes it
 *   ends the line), DEL and the C1 controls (`lexicon/control-character`);
 * - lone surrogates and the noncharacters U+FFFE, U+FFFF (`lexicon/not-a-character`).
 * XML 1.0 (§2.2 Char) forbids the C0 controls but tab, LF, CR, the lone surrogates and U+FFFE/U+FFFF;
 * the rest are refused because no spelling, pronunciation, id or tag holds them and they are invisible.
 */
const FORBIDDEN = /[\u0000-\u0008\u000a-\u001f\u007f-\u009f\ufeff\ufffd\ufffe\uffff]|\p{Cs}/u;

/** The first forbidden character of a record (or an entry of another file: codes start with `room/`), if any. */
export function findForbidden(raw: string, room = "lexicon"): Forbidden | undefined {
  const m = FORBIDDEN.exec(raw);
  if (m === null) return undefined;
  const column = codePointsBetween(raw, 0, m.index) + 1;
  const c = m[0].charCodeAt(0);
  const hex = `U+${c.toString(16).toUpperCase().padStart(4, "0")}`;
  const code = (name: string): string => `${room}/${name}`;
  if (c === 0xfffd) return { column, code: code("bad-encoding"), reason: "This line is not valid UTF-8 (U+FFFD stands for bytes that could not be decoded)." };
  if (c === 0) return { column, code: code("nul"), reason: "A NUL character (U+0000) is not allowed here." };
  if (c === 0xfeff) return { column, code: code("bom"), reason: "A byte-order mark (U+FEFF) is allowed only at the very start of the file, not inside a line." };
  if (c === 13) return { column, code: code("control-character"), reason: "A carriage return (CR) inside a quoted field: it does not end the line there (RFC 4180), but no field may hold one." };
  if (c === 10) return { column, code: code("control-character"), reason: "A line feed (LF) is not allowed here." };
  if (c < 0x20 || (c >= 0x7f && c <= 0x9f)) return { column, code: code("control-character"), reason: `The control character ${hex} is not allowed here.` };
  return { column, code: code("not-a-character"), reason: `${hex} is not a character (a lone surrogate or a noncharacter) and is not allowed here.` };
}
