// One lane of a chunked run (chunks.ts): the work on a chunk of the lexicon file, in two steps
// (`read`: decode, split into records, parse and tokenise, giving back the chunk's words and ids;
// `run`: with the keys and duplicate ids the main thread resolved from the chunks before,
// transcribe, check, count and format, the same batch work as a run on one thread,
// batch-work.ts). A worker thread runs a lane (worker.ts); so does the main thread beside its
// workers, with the engines it has already loaded.

import { ByteChunks } from "../emit/bytes.js";
import type { Inventory } from "../inventory/types.js";
import { BatchWork, SideState, type Side } from "./batch-work.js";
import type { LexemeBook } from "./lexemes.js";
import { WordTable } from "./word-table.js";
import { EntryKeys } from "./keys.js";
import { duplicateId, readChunk, type ChunkRead } from "./read-chunk.js";
import type { LexiconItem } from "./read.js";
import { relativeFiles } from "./summary.js";
import type { ChunkDone, ChunkWords, SideChunk, ToWorker } from "./worker.js";

export class ChunkLane {
  private readonly work: BatchWork;
  private readonly read = new Map<number, ChunkRead>();
  private readonly relFile: (f: string) => string;

  /**
   * `file`: the lexicon as rows name it; `sourceRoot`: file names in JSON Lines and stress.csv are
   * relative to it (absent: as rows name them); `assignsStress`: per side, for the stress checks.
   */
  constructor(
    private readonly sides: readonly Side[],
    private readonly assignsStress: readonly boolean[],
    private readonly inventory: Inventory,
    private readonly file: string,
    sourceRoot: string | undefined,
  ) {
    this.work = new BatchWork(sides);
    this.relFile = sourceRoot === undefined ? (f) => f : relativeFiles(sourceRoot);
  }

  /** One message from the main thread; the reply, and the buffers it hands over. */
  handle(m: ToWorker): [ChunkWords | ChunkDone, ArrayBuffer[]] {
    if (m.kind === "read") {
      const c = readChunk(m.bytes, m, m.header, this.file, this.inventory);
      this.read.set(m.chunk, c);
      return [chunkWords(m.chunk, c), []];
    }
    const c = this.read.get(m.chunk)!;
    this.read.delete(m.chunk);
    return this.run(m.chunk, c, m.dups, m.before);
  }

  private run(chunk: number, c: ChunkRead, dups: readonly (readonly [number, number])[], before: readonly (readonly [string, number])[]): [ChunkDone, ArrayBuffer[]] {
    const items = c.items;
    for (const [k, first] of dups) {
      const id = c.ids[k]!;
      items[id.at] = duplicateId(items[id.at]!, id, first);
    }
    const keys = new EntryKeys(before);
    const rowKeys = items.map((item) => (item.kind === "row" ? keys.next(item.word, item.id) : ""));
    const transfer: ArrayBuffer[] = [];
    const words = new WordTable();
    const states = this.sides.map((s, i) => {
      const tsv: Uint8Array[] = [];
      const jsonl: Uint8Array[] = [];
      const state = new SideState({ inventory: this.inventory, assignsStress: this.assignsStress[i]! }, this.relFile,
        s.formats.has("tsv") ? new ByteChunks((b) => void tsv.push(b)) : undefined,
        s.formats.has("jsonl") ? new ByteChunks((b) => void jsonl.push(b)) : undefined, words);
      return { state, tsv, jsonl };
    });
    this.work.take(items, rowKeys, states.map((s) => s.state));
    let rows = 0;
    for (const item of items) if (item.kind === "row") rows++;
    const out: SideChunk[] = states.map(({ state, tsv, jsonl }) => {
      state.tsv?.flush();
      state.jsonl?.flush();
      for (const b of [...tsv, ...jsonl]) transfer.push(b.buffer as ArrayBuffer);
      const lexemes = packLexemes(state.lexemes, this.file);
      transfer.push(lexemes.lines.buffer as ArrayBuffer);
      const [, ...stressLines] = state.hygiene.report();
      return {
        tsv, jsonl, rejects: state.rejects, lexemes, counts: state.counts, changed: [...state.changed],
        stress: state.hygiene.summary(), stressLines,
      };
    });
    return [{ kind: "done", chunk, sides: out, stats: { ...c.stats, rows, rejects: items.length - rows } }, transfer];
  }
}

/** The chunk's distinct words (in first-row order, as one string: lines hold no line feed) with their rows, and its ids. */
function chunkWords(chunk: number, c: ChunkRead): ChunkWords {
  const index = new Map<string, number>();
  const words: string[] = [];
  const counts: number[] = [];
  const wordOf = (item: LexiconItem): number => {
    if (item.kind !== "row") return -1;
    let k = index.get(item.word);
    if (k === undefined) {
      index.set(item.word, (k = words.length));
      words.push(item.word);
      counts.push(0);
    }
    return k;
  };
  for (const item of c.items) if (item.kind === "row") counts[wordOf(item)]!++;
  return {
    kind: "read", chunk, words: words.join("\n"), counts: Int32Array.from(counts), ids: c.ids.map((id) => ({ id: id.id, line: id.line, column: id.column, word: wordOf(c.items[id.at]!) })),
    ...(c.header !== undefined ? { header: c.header } : {}), headerFailed: c.headerFailed, diagnostics: c.diagnostics,
  };
}

/** A chunk's lexemes in a few strings (one structured clone each, not one per lexeme). */
function packLexemes(lexemes: LexemeBook, file: string): SideChunk["lexemes"] {
  const words: string[] = [];
  const phonemes: string[] = [];
  const lines = new Int32Array(lexemes.size);
  let k = 0;
  for (const lx of lexemes) {
    words.push(lx.word);
    phonemes.push(typeof lx.phonemes === "string" ? lx.phonemes : lx.phonemes.join("\0"));
    lines[k++] = lx.line;
  }
  return { words: words.join("\n"), phonemes: phonemes.join("\n"), lines, file };
}

/** Adds a chunk's packed lexemes to the run's, in file order (as the rows would have been added one by one). */
export function unpackLexemes(into: LexemeBook, p: SideChunk["lexemes"]): void {
  if (p.lines.length === 0) return;
  const words = p.words.split("\n");
  const phonemes = p.phonemes.split("\n");
  for (let k = 0; k < words.length; k++) {
    const ph = phonemes[k]!;
    into.add(words[k]!, ph.includes("\0") ? ph.split("\0") : ph, p.file, p.lines[k]!);
  }
}
