// Numbers for words, 0, 1, 2, … in order of first appearance, without hashing the usual lexicon.
// Words are kept in an ascending list while they come in sorted order (the usual case: a word after
// the list's last is new, found by comparing it with that one word) and in a map when one comes out
// of order. The list holds the words' code units in typed arrays, not the strings: a long list of
// strings costs the garbage collector on every pass while the file is read. A Map of the CMU
// dictionary's 135,000 words took about 70 ms of a one-variety build's main thread (a CPU profile).

export class WordTable {
  /** Word `i` of the list is `units[starts[i] … starts[i + 1])`; `numbers[i]` its number. */
  private units = new Uint16Array(1 << 16);
  private starts = new Int32Array(1 << 14);
  private numbers = new Int32Array(1 << 14);
  private listed = 0;
  /** Words that came out of order (each less than the list's last when first seen), and their numbers. */
  private readonly others = new Map<string, number>();
  /** Distinct words so far. */
  size = 0;

  /** The number of `word`: the next free one when the word is new. */
  numberOf(word: string): number {
    const last = this.listed - 1;
    // A word after the list's last was never seen: every word in `others` is less than it.
    const order = last < 0 ? 1 : this.compareAt(word, last);
    if (order > 0) return this.append(word);
    if (order === 0) return this.numbers[last]!;
    let lo = 0;
    let hi = last;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (this.compareAt(word, mid) > 0) lo = mid + 1;
      else hi = mid;
    }
    if (this.compareAt(word, lo) === 0) return this.numbers[lo]!;
    let n = this.others.get(word);
    if (n === undefined) {
      n = this.size++;
      this.others.set(word, n);
    }
    return n;
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

  private append(word: string): number {
    const i = this.listed++;
    if (this.listed + 1 > this.starts.length) {
      this.starts = grown(this.starts, this.listed + 1);
      this.numbers = grown(this.numbers, this.listed + 1);
    }
    const from = this.starts[i]!;
    if (from + word.length > this.units.length) this.units = grown(this.units, from + word.length);
    for (let k = 0; k < word.length; k++) this.units[from + k] = word.charCodeAt(k);
    this.starts[i + 1] = from + word.length;
    const n = this.size++;
    this.numbers[i] = n;
    return n;
  }
}

export function grown<T extends Uint16Array | Int32Array>(a: T, need: number): T {
  const b = new (a.constructor as new (n: number) => T)(Math.max(need, a.length * 2));
  b.set(a);
  return b;
}
