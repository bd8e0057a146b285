// Reading one chunk of a lexicon file on its own (a worker thread's share of the file, chunks.ts):
// the chunk starts at a record boundary (just after a line feed, which always ends a record) on a
// known line, and is read exactly as the streaming reader (read.ts) reads that part of the file,
// except for what needs the rest of the file: the header (read from an earlier chunk, unless this
// chunk holds it) and duplicate ids (every id is reported, and the main thread, which sees every
// chunk's ids in file order, names the duplicates; chunks.ts).

import { Utf8Decoder } from "../files.js";
import type { Diagnostic } from "../diagnostics.js";
import type { Inventory } from "../inventory/types.js";
import { duplicateIdReason, recordTaker, type HeaderColumns, type LexiconItem, type RejectedRow } from "./read.js";
import { RecordSplitter } from "./records.js";

/** An id of a row of the chunk: the item it is on, and where. */
export interface ChunkId {
  readonly at: number;
  readonly id: string;
  readonly line: number;
  readonly column: number;
}

/** The counts of one chunk's records. */
export interface ChunkStats {
  commentLines: number;
  blankLines: number;
  headerLine: number;
  dataLines: number;
}

export interface ChunkRead {
  readonly items: LexiconItem[];
  readonly ids: readonly ChunkId[];
  readonly stats: ChunkStats;
  /** The header, when this chunk held it (or it was given). */
  readonly header: HeaderColumns | undefined;
  readonly headerFailed: boolean;
  /** The header's problems, when this chunk held it. */
  readonly diagnostics: Diagnostic[];
}

/**
 * Reads the records of `bytes` (UTF-8), the first on line `line`; `first`: the chunk starts the file
 * (a byte-order mark is dropped). Records after a header that cannot be read are not read.
 */
export function readChunk(bytes: Uint8Array, at: { readonly line: number; readonly first: boolean }, header: HeaderColumns | undefined, file: string, inv: Inventory): ChunkRead {
  const text = new Utf8Decoder().end(bytes);
  const splitter = at.first ? new RecordSplitter() : new RecordSplitter({ line: at.line });
  const stats: ChunkStats = { commentLines: 0, blankLines: 0, headerLine: 0, dataLines: 0 };
  const diagnostics: Diagnostic[] = [];
  const ids: ChunkId[] = [];
  const items: LexiconItem[] = [];
  const taker = recordTaker(inv, file, stats, diagnostics, { first: (id, line, column) => void ids.push({ at: items.length, id, line, column }) }, header);
  for (const rec of [...splitter.push(text), ...splitter.end()]) {
    const item = taker.take(rec);
    if (taker.headerFailed) break;
    if (item !== undefined) items.push(item);
  }
  return { items, ids, stats, header: taker.header, headerFailed: taker.headerFailed, diagnostics };
}

/** The item at `id.at` rejected as a duplicate of the id first used on line `first`. */
export function duplicateId(item: LexiconItem, id: ChunkId, first: number): RejectedRow {
  return { kind: "reject", file: item.file, line: item.line, column: id.column, code: "lexicon/duplicate-id", reason: duplicateIdReason(id.id, first), raw: item.raw };
}

/** Line ends in `bytes` (LF, and a CR not followed by LF): the lines a chunk moves the next one on by. */
export function lineEnds(bytes: Uint8Array): number {
  let n = 0;
  for (let i = bytes.indexOf(10); i >= 0; i = bytes.indexOf(10, i + 1)) n++;
  for (let i = bytes.indexOf(13); i >= 0; i = bytes.indexOf(13, i + 1)) if (bytes[i + 1] !== 10) n++;
  return n;
}
