// Entry keys: what a comparison of two builds matches entries by. The lexicon's `id` column when
// the row has one, otherwise the word, '#', and the pronunciation's 1-based index among that
// word's rows in file order (`tram#2`).

/**
 * Gives each row its index among its word's rows, in file order, and its key when asked. Words
 * are kept in an ascending list while the file is sorted (the usual case: a word after the last one
 * is new, found without hashing) and in a map when one comes out of order. The list holds the
 * words' code units in typed arrays, not the strings: a long list of strings costs the garbage
 * collector on every pass while the file is read.
 */
export class EntryKeys {
  /** Word `i` of the list is `units[starts[i] … starts[i + 1])`; `counts[i]` its rows so far. */
  private units = new Uint16Array(1 << 16);
  private starts = new Int32Array(1 << 14);
  private counts = new Int32Array(1 << 14);
  private size = 0;
  /** Words that came out of order (each less than the list's last when first seen). */
  private readonly others = new Map<string, number>();

  /** `before`: rows of each word earlier in the file than the first row given here (a chunk's, chunks.ts). */
  constructor(before?: Iterable<readonly [string, number]>) {
    if (before === undefined) return;
    const sorted = [...before].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
    for (const [w, n] of sorted) {
      if (this.size > 0 && this.compareAt(w, this.size - 1) === 0) this.counts[this.size - 1] = n;
      else this.append(w, n);
    }
  }

  /** The 1-based index of the next row of `word` among that word's rows. */
  count(word: string): number {
    const last = this.size - 1;
    // A word after the list's last was never seen: every word in `others` is less than it.
    const order = last < 0 ? 1 : this.compareAt(word, last);
    if (order > 0) {
      this.append(word, 1);
      return 1;
    }
    if (order === 0) return ++this.counts[last]!;
    let lo = 0;
    let hi = last;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (this.compareAt(word, mid) > 0) lo = mid + 1;
      else hi = mid;
    }
    if (this.compareAt(word, lo) === 0) return ++this.counts[lo]!;
    const n = (this.others.get(word) ?? 0) + 1;
    this.others.set(word, n);
    return n;
  }

  /** The key of the next row of `word` (with its `id`, when the row has one). */
  next(word: string, id?: string): string {
    return keyOf(word, id, this.count(word));
  }

  /** -1, 0 or 1 as `word` is less than, equal to or greater than word `i` of the list (the order of `<` on strings: UTF-16 code units). */
  private compareAt(word: string, i: number): number {
    const units = this.units;
    const from = this.starts[i]!;
    const len = this.starts[i + 1]! - from;
    const n = Math.min(word.length, len);
    for (let k = 0; k < n; k++) {
      const d = word.charCodeAt(k) - units[from + k]!;
      if (d !== 0) return d < 0 ? -1 : 1;
    }
    return word.length === len ? 0 : word.length < len ? -1 : 1;
  }

  private append(word: string, n: number): void {
    const i = this.size++;
    if (this.size + 1 > this.starts.length) {
      this.starts = grown(this.starts, this.size + 1);
      this.counts = grown(this.counts, this.size + 1);
    }
    const from = this.starts[i]!;
    if (from + word.length > this.units.length) this.units = grown(this.units, from + word.length);
    for (let k = 0; k < word.length; k++) this.units[from + k] = word.charCodeAt(k);
    this.starts[i + 1] = from + word.length;
    this.counts[i] = n;
  }
}

function grown<T extends Uint16Array | Int32Array>(a: T, need: number): T {
  const b = new (a.constructor as new (n: number) => T)(Math.max(need, a.length * 2));
  b.set(a);
  return b;
}

/** The key of the `n`th row of `word` (its `id` when it has one). */
export const keyOf = (word: string, id: string | undefined, n: number): string => (id !== undefined && id !== "" ? id : `${word}#${n}`);
