// Entry keys: what a comparison of two builds matches entries by. The lexicon's `id` column when
// the row has one, otherwise the word, '#', and the pronunciation's 1-based index among that
// word's rows in file order (`tram#2`).

/** Gives each row its key, in file order. */
export class EntryKeys {
  private readonly seen: Map<string, number>;

  /** `before`: rows of each word earlier in the file than the first row given here (a chunk's, chunks.ts). */
  constructor(before?: Iterable<readonly [string, number]>) {
    this.seen = new Map(before);
  }

  /** The key of the next row of `word` (with its `id`, when the row has one). */
  next(word: string, id?: string): string {
    const n = (this.seen.get(word) ?? 0) + 1;
    this.seen.set(word, n);
    return id !== undefined && id !== "" ? id : `${word}#${n}`;
  }
}
