// Entry keys: what a comparison of two builds matches entries by. The lexicon's `id` column when
// the row has one, otherwise the word, '#', and the pronunciation's 1-based index among that
// word's rows in file order (`tram#2`).

/**
 * Gives each row its index among its word's rows, in file order, and its key when asked. Words
 * are kept in an ascending list while the file is sorted (the usual case: a word after the last one
 * is new, found without hashing) and in a map when one comes out of order.
 */
export class EntryKeys {
  private readonly words: string[] = [];
  private readonly counts: number[] = [];
  /** Words that came out of order (each less than the list's last when first seen). */
  private readonly others = new Map<string, number>();

  /** `before`: rows of each word earlier in the file than the first row given here (a chunk's, chunks.ts). */
  constructor(before?: Iterable<readonly [string, number]>) {
    if (before === undefined) return;
    const sorted = [...before].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
    for (const [w, n] of sorted) {
      if (this.words.length > 0 && this.words[this.words.length - 1] === w) this.counts[this.counts.length - 1] = n;
      else {
        this.words.push(w);
        this.counts.push(n);
      }
    }
  }

  /** The 1-based index of the next row of `word` among that word's rows. */
  count(word: string): number {
    const words = this.words;
    const last = words.length - 1;
    // A word after the list's last was never seen: every word in `others` is less than it.
    if (last < 0 || word > words[last]!) {
      words.push(word);
      this.counts.push(1);
      return 1;
    }
    if (word === words[last]) return ++this.counts[last]!;
    let lo = 0;
    let hi = last;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (words[mid]! < word) lo = mid + 1;
      else hi = mid;
    }
    if (words[lo] === word) return ++this.counts[lo]!;
    const n = (this.others.get(word) ?? 0) + 1;
    this.others.set(word, n);
    return n;
  }

  /** The key of the next row of `word` (with its `id`, when the row has one). */
  next(word: string, id?: string): string {
    return keyOf(word, id, this.count(word));
  }
}

/** The key of the `n`th row of `word` (its `id` when it has one). */
export const keyOf = (word: string, id: string | undefined, n: number): string => (id !== undefined && id !== "" ? id : `${word}#${n}`);
