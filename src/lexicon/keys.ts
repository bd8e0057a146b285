// Entry keys: what a comparison of two builds matches entries by. The lexicon's `id` column when
// the row has one, otherwise the word, '#', and the pronunciation's 1-based index among that
// word's rows in file order (`tram#2`).

import { grown, WordTable } from "./word-table.js";

/** Gives each row its index among its word's rows, in file order, and its key when asked (words numbered by a WordTable). */
export class EntryKeys {
  private readonly words = new WordTable();
  /** Rows so far of each word, by its number. */
  private counts = new Int32Array(1 << 14);

  /** `before`: rows of each word earlier in the file than the first row given here (a chunk's, chunks.ts). */
  constructor(before?: Iterable<readonly [string, number]>) {
    if (before === undefined) return;
    // Sorted first, so the words go into the table's list (the chunk's own rows follow them in the file).
    const sorted = [...before].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
    for (const [w, n] of sorted) this.countAt(this.words.numberOf(w), n);
  }

  /** The 1-based index of the next row of `word` among that word's rows. */
  count(word: string): number {
    const i = this.words.numberOf(word);
    return this.countAt(i, (this.counts[i] ?? 0) + 1);
  }

  /** The key of the next row of `word` (with its `id`, when the row has one). */
  next(word: string, id?: string): string {
    return keyOf(word, id, this.count(word));
  }

  /** Sets the rows of word number `i` to `n`; returns n. */
  private countAt(i: number, n: number): number {
    if (i >= this.counts.length) this.counts = grown(this.counts, i + 1);
    this.counts[i] = n;
    return n;
  }
}

/** The key of the `n`th row of `word` (its `id` when it has one). */
export const keyOf = (word: string, id: string | undefined, n: number): string => (id !== undefined && id !== "" ? id : `${word}#${n}`);
