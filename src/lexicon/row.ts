// The reader's fast path for the usual record: no quote, no character the reader refuses, no
// surrogate, no problem with its fields. One pass finds the commas (and any reason to leave); the
// row is then made as `readRow` makes it. Anything else, and every reject but a duplicate id, is
// left to the general path (read.ts), which gives the same rows and the same diagnostics.

import type { Inventory } from "../inventory/types.js";
import type { Word } from "../interp/types.js";
import { pronReader } from "./pron.js";
import { unstressAll } from "./stress.js";
import type { HeaderColumns, IdBook, LexiconItem, LexiconRow, RejectedRow } from "./read.js";

const COMMA = 44;
const QUOTE = 34;
const TAB = 9;

/**
 * Where the fields of a plain record end (the offset of each comma, then the record's length), or
 * undefined when the record is not plain: it holds a quote, a character `findForbidden` refuses
 * (controls but tab, DEL, C1 controls, U+FEFF, U+FFFD, U+FFFE, U+FFFF) or any surrogate, or has
 * more than `most` fields. The fields are then those `checkQuoting` gives, at columns offset + 1.
 */
export function plainFieldEnds(raw: string, most: number, ends: number[]): number | undefined {
  let n = 0;
  const len = raw.length;
  for (let i = 0; i < len; i++) {
    const c = raw.charCodeAt(i);
    if (c === COMMA) {
      if (n + 1 >= most) return undefined;
      ends[n++] = i;
    } else if (c < 0x20 ? c !== TAB : c === QUOTE || (c >= 0x7f && (c <= 0x9f || (c >= 0xd800 && c <= 0xdfff) || c === 0xfeff || c >= 0xfffd))) {
      return undefined;
    }
  }
  ends[n++] = len;
  return n;
}

/** The fast path's view of a header: the field of each known column (-1 when absent). */
export interface PlainColumns {
  readonly fields: number;
  readonly word: number;
  readonly pron: number;
  readonly id: number;
  readonly pos: number;
  readonly tags: number;
  readonly note: number;
}

export const plainColumns = (h: HeaderColumns): PlainColumns => ({
  fields: h.fields, word: h.map.get("word") ?? -1, pron: h.map.get("pron") ?? -1, id: h.map.get("id") ?? -1,
  pos: h.map.get("pos") ?? -1, tags: h.map.get("tags") ?? -1, note: h.map.get("note") ?? -1,
});

const ASCII = /^[\x00-\x7f]*$/;
const WEAK_TAG = "weak";

/**
 * The item `readRow` gives for a plain record (a row, or a duplicate id's reject), or undefined to
 * leave the record to it. Ids are remembered only when the record is taken here.
 */
export function readPlainRow(inv: Inventory, file: string, line: number, raw: string, h: PlainColumns, ids: IdBook, ends: number[]): LexiconItem | undefined {
  const n = plainFieldEnds(raw, h.fields, ends);
  if (n === undefined) return undefined;
  const field = (k: number): string | undefined => (k < 0 || k >= n ? undefined : raw.slice(k === 0 ? 0 : ends[k - 1]! + 1, ends[k]));
  const trimmed = (field(h.word) ?? "").trim();
  const word = ASCII.test(trimmed) ? trimmed : trimmed.normalize("NFC");
  if (word === "") return undefined;
  const pron = field(h.pron) ?? "";
  if (h.pron >= n || pron.trim() === "") return undefined;
  const s: { readonly symbols: Word; readonly marked: boolean } | undefined = pronReader(inv).read(pron);
  if (s === undefined) return undefined;
  const tagText = field(h.tags);
  const tags = tagText === undefined || tagText === "" ? [] : tagText.split(/[\s,;]+/u).filter((x) => x !== "");
  const weak = tags.includes(WEAK_TAG);
  if (weak && s.marked) return undefined;
  const id = field(h.id)?.trim();
  if (id !== undefined && id !== "") {
    const column = h.id === 0 ? 1 : ends[h.id - 1]! + 2;
    const first = ids.first(id, line, column);
    if (first !== undefined) {
      const r: RejectedRow = { kind: "reject", file, line, column, code: "lexicon/duplicate-id", reason: duplicateIdReason(id, first), raw };
      return r;
    }
  }
  const row: { -readonly [K in keyof LexiconRow]: LexiconRow[K] } = {
    kind: "row", file, line, raw, word, pron, pronColumn: h.pron === 0 ? 1 : ends[h.pron - 1]! + 2, tags,
    symbols: weak ? unstressAll(inv, s.symbols) : s.symbols, stressMarked: s.marked || weak,
  };
  if (id !== undefined && id !== "") row.id = id;
  const pos = field(h.pos)?.trim();
  if (pos !== undefined && pos !== "") row.pos = pos;
  const note = field(h.note)?.trim();
  if (note !== undefined && note !== "") row.note = note;
  return row;
}

export const duplicateIdReason = (id: string, first: number): string => `The id '${id}' is already used on line ${first}; ids must be unique in the file.`;
