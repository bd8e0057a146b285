// JSON Lines records put straight into byte chunks (emit/bytes.ts), without the record as a string:
// the same bytes as `jsonRecord` (jsonl.ts) and a line feed, encoded as UTF-8. A whole CMU build
// writes some 60 MB of JSON Lines; building each record as a string with JSON.stringify, then
// encoding it, made that the largest stage of a build and a large share of its garbage.
//
// Escaping is JSON.stringify's (ECMAScript 2019, well-formed): `"` `\` and the short escapes \b \f
// \n \r \t, other controls below U+0020 as \u00xx, a lone surrogate as \udxxx (lower-case hex),
// everything else as itself; and, as jsonRecord adds, U+2028 and U+2029 as \u2028 and \u2029.

import { putAscii, putNonAscii, type ByteChunks } from "./bytes.js";
import { jsonRecord, type JsonlEntry } from "./jsonl.js";

const HEX = "0123456789abcdef";

/** Bytes of the short escapes (after the backslash), by character code; 0: written as \u00xx. */
const SHORT = new Uint8Array(0x60);
SHORT[8] = 98; // b
SHORT[9] = 116; // t
SHORT[10] = 110; // n
SHORT[12] = 102; // f
SHORT[13] = 114; // r
SHORT[34] = 34; // "
SHORT[92] = 92; // \

/** `\u` and four lower-case hex digits of `c`, at `at`; the position after. */
function unicodeEscape(buf: Uint8Array, at: number, c: number): number {
  buf[at++] = 92;
  buf[at++] = 117;
  buf[at++] = HEX.charCodeAt(c >> 12);
  buf[at++] = HEX.charCodeAt((c >> 8) & 15);
  buf[at++] = HEX.charCodeAt((c >> 4) & 15);
  buf[at++] = HEX.charCodeAt(c & 15);
  return at;
}

/** `s` as a JSON string (quotes included) in UTF-8 at `at`; the position after. At most 6 bytes per UTF-16 unit and 2 more. */
export function putJsonString(buf: Uint8Array, at: number, s: string): number {
  buf[at++] = 34;
  const n = s.length;
  for (let i = 0; i < n; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) {
      if (c >= 0x20 && c !== 34 && c !== 92) buf[at++] = c;
      else if (SHORT[c] !== 0) {
        buf[at++] = 92;
        buf[at++] = SHORT[c]!;
      } else at = unicodeEscape(buf, at, c);
    } else if (c === 0x2028 || c === 0x2029) at = unicodeEscape(buf, at, c);
    else {
      const next = putNonAscii(buf, at, s, i, c);
      if (next < 0) at = unicodeEscape(buf, at, c);
      else {
        if (c <= 0xdbff && c >= 0xd800) i++;
        at = next;
      }
    }
  }
  buf[at++] = 34;
  return at;
}

/**
 * The JSON bytes of strings a run writes in every record (step names, the source file, tags): each
 * is escaped and encoded once. The map is kept small; a string past its limit is written as any other.
 */
const known = new Map<string, Uint8Array>();
const KNOWN_MOST = 512;
const KNOWN_LONGEST = 64;

/** `s` as putJsonString writes it, copied from `known` (escaped and encoded the first time it comes). */
function putKnownString(buf: Uint8Array, at: number, s: string): number {
  let b = known.get(s);
  if (b === undefined) {
    if (known.size >= KNOWN_MOST || s.length > KNOWN_LONGEST) return putJsonString(buf, at, s);
    const tmp = new Uint8Array(6 * s.length + 2);
    b = tmp.slice(0, putJsonString(tmp, 0, s));
    known.set(s, b);
  }
  for (let i = 0; i < b.length; i++) buf[at++] = b[i]!;
  return at;
}

/** A non-negative whole number's digits (anything else as JSON.stringify writes it). */
function putNumber(buf: Uint8Array, at: number, x: number): number {
  return putAscii(buf, at, Number.isInteger(x) && x >= 0 && x < 1e21 ? String(x) : JSON.stringify(x));
}

/** Copies buf[from … to) (written earlier in this record) to `at`; the position after. */
function copyBytes(buf: Uint8Array, at: number, from: number, to: number): number {
  for (let i = from; i < to; i++) buf[at++] = buf[i]!;
  return at;
}

/** `["a","b"]` (step names or tags: strings that come again and again) */
function putStrings(buf: Uint8Array, at: number, list: readonly string[]): number {
  buf[at++] = 91;
  for (let i = 0; i < list.length; i++) {
    if (i > 0) buf[at++] = 44;
    at = putKnownString(buf, at, list[i]!);
  }
  buf[at++] = 93;
  return at;
}

/** UTF-16 units of a list's strings, and the list's length (for the bound on its bytes). */
function unitsOf(list: readonly string[]): number {
  let u = list.length;
  for (let i = 0; i < list.length; i++) u += list[i]!.length;
  return u;
}

type Record = Omit<JsonlEntry, "source">;

/** The most bytes `putJsonRecord` can write for `e`: 6 per UTF-16 unit, and room for the keys, quotes and commas. */
function bound(e: Record, sourceFile: string | undefined): number {
  let units = e.word.length + e.narrow.length + e.broad.length + unitsOf(e.variants) + unitsOf(e.rules);
  if (e.key !== undefined) units += e.key.length;
  if (e.id !== undefined) units += e.id.length;
  if (sourceFile !== undefined) units += sourceFile.length;
  let items = e.variants.length + e.rules.length;
  if (e.derivation !== undefined) {
    for (const d of e.derivation) units += d.step.length + d.form.length;
    items += 4 * e.derivation.length;
  }
  if (e.variantSteps !== undefined) {
    for (const s of e.variantSteps) units += unitsOf(s);
    items += e.variantSteps.length;
  }
  if (e.input !== undefined) {
    units += e.input.pron.length + unitsOf(e.input.tags) + (e.input.pos?.length ?? 0);
    items += e.input.tags.length;
  }
  return 6 * units + 8 * items + 256;
}

/**
 * One record and its line feed, as `jsonRecord(e, sourceFile, sourceLine) + "\n"` encoded as
 * UTF-8 (the same keys in the same order, absent keys left out; the derivation's elements written
 * as {step, form}, as jsonRecord writes the engines' elements).
 * Returns where the record starts in `out.target` (it ends at `out.position`), or -1 when it was
 * too long for a chunk and went in as text. tests/emit/jsonl-bytes.test.ts checks the bytes
 * against jsonRecord on random records.
 */
export function putJsonRecord(out: ByteChunks, e: Record, sourceFile?: string, sourceLine?: number): number {
  if (!out.room(bound(e, sourceFile))) {
    out.pushLine(jsonRecord(e, sourceFile, sourceLine));
    return -1;
  }
  const buf = out.target;
  const start = out.position;
  let at = start;
  buf[at++] = 123;
  let first = true;
  if (e.key !== undefined) {
    at = putAscii(buf, at, '"key":');
    at = putJsonString(buf, at, e.key);
    first = false;
  }
  at = putAscii(buf, at, first ? '"word":' : ',"word":');
  at = putJsonString(buf, at, e.word);
  at = putAscii(buf, at, ',"narrow":');
  // The narrow form and the rules come back as the first variant, the last derivation form and the
  // first variant's steps: their bytes are copied from where they were first written.
  const narrow = e.narrow;
  const narrowAt = at;
  at = putJsonString(buf, at, narrow);
  const narrowEnd = at;
  at = putAscii(buf, at, ',"broad":');
  at = putJsonString(buf, at, e.broad);
  at = putAscii(buf, at, ',"variants":[');
  const variants = e.variants;
  for (let i = 0; i < variants.length; i++) {
    if (i > 0) buf[at++] = 44;
    at = variants[i] === narrow ? copyBytes(buf, at, narrowAt, narrowEnd) : putJsonString(buf, at, variants[i]!);
  }
  at = putAscii(buf, at, '],"rules":');
  const rules = e.rules;
  const rulesAt = at;
  at = putStrings(buf, at, rules);
  const rulesEnd = at;
  if (e.id !== undefined) {
    at = putAscii(buf, at, ',"id":');
    at = putJsonString(buf, at, e.id);
  }
  if (sourceFile !== undefined) {
    at = putAscii(buf, at, ',"source":{"file":');
    at = putKnownString(buf, at, sourceFile);
    if (sourceLine !== undefined) {
      at = putAscii(buf, at, ',"line":');
      at = putNumber(buf, at, sourceLine);
    }
    buf[at++] = 125;
  }
  const derivation = e.derivation;
  if (derivation !== undefined) {
    at = putAscii(buf, at, ',"derivation":[');
    for (let i = 0; i < derivation.length; i++) {
      at = putAscii(buf, at, i > 0 ? ',{"step":' : '{"step":');
      at = putKnownString(buf, at, derivation[i]!.step);
      at = putAscii(buf, at, ',"form":');
      const form = derivation[i]!.form;
      at = form === narrow ? copyBytes(buf, at, narrowAt, narrowEnd) : putJsonString(buf, at, form);
      buf[at++] = 125;
    }
    buf[at++] = 93;
  }
  const vs = e.variantSteps;
  if (vs !== undefined) {
    at = putAscii(buf, at, ',"variantSteps":[');
    for (let i = 0; i < vs.length; i++) {
      if (i > 0) buf[at++] = 44;
      at = vs[i] === rules ? copyBytes(buf, at, rulesAt, rulesEnd) : putStrings(buf, at, vs[i]!);
    }
    buf[at++] = 93;
  }
  const input = e.input;
  if (input !== undefined) {
    at = putAscii(buf, at, ',"input":{"pron":');
    at = putJsonString(buf, at, input.pron);
    if (input.pos !== undefined) {
      at = putAscii(buf, at, ',"pos":');
      at = putJsonString(buf, at, input.pos);
    }
    at = putAscii(buf, at, ',"tags":');
    at = putStrings(buf, at, input.tags);
    buf[at++] = 125;
  }
  if (e.capped === true) at = putAscii(buf, at, ',"capped":true');
  if (e.ambiguous === true) at = putAscii(buf, at, ',"ambiguous":true');
  buf[at++] = 125;
  buf[at++] = 10;
  out.moveTo(at);
  return start;
}
