// The PLS lexemes a run gathers, one book per variety: each word's phonemes in order of first
// appearance, in the order of the words' first rows. The varieties of a run on one thread share
// the numbers of their words (a WordTable, word-table.ts), so a row's word is looked up once, not once per
// variety: in a four-variety build of the CMU dictionary the four maps of 135,000 words took about
// 0.37 s of the main thread's CPU (a CPU profile).

import { WordTable } from "./word-table.js";

/**
 * A PLS lexeme as gathered: the word's phonemes in order of first appearance (one string while
 * there is one, as most words have: a run keeps a lexeme per word, and fewer objects per lexeme
 * make less for the garbage collector to copy), and the file and line of its first row.
 */
export interface Lexeme {
  readonly word: string;
  phonemes: string | string[];
  readonly file: string;
  readonly line: number;
}

/** A lexeme's phonemes as a list. */
export const phonemesOf = (lx: Lexeme): string[] => (typeof lx.phonemes === "string" ? [lx.phonemes] : lx.phonemes);

/** One variety's lexemes, found by the numbers `words` gives their words (shared by the books of one run's varieties on one thread). */
export class LexemeBook {
  private readonly byId: (Lexeme | undefined)[] = [];
  private readonly list: Lexeme[] = [];

  constructor(readonly words: WordTable = new WordTable()) {}

  /** Distinct words. */
  get size(): number {
    return this.list.length;
  }

  /** The lexemes in the order of their words' first rows. */
  [Symbol.iterator](): IterableIterator<Lexeme> {
    return this.list[Symbol.iterator]();
  }

  /**
   * Adds a row's phonemes (one, or a list) to its word's lexeme (a new lexeme at the word's first
   * row, `file` and `line`). `id`: the word's number from this book's `words`, when the caller has it.
   */
  add(word: string, mine: string | string[], file: string, line: number, id = this.words.numberOf(word)): void {
    const byId = this.byId;
    // Kept dense (no holes far ahead of the end, which would turn the array into a dictionary).
    while (byId.length <= id) byId.push(undefined);
    const lx = byId[id];
    if (lx === undefined) {
      const made: Lexeme = { word, phonemes: typeof mine === "string" || mine.length !== 1 ? mine : mine[0]!, file, line };
      byId[id] = made;
      this.list.push(made);
      return;
    }
    if (typeof mine === "string") addOne(lx, mine);
    else for (const p of mine) addOne(lx, p);
  }
}

function addOne(lx: Lexeme, p: string): void {
  const have = lx.phonemes;
  if (typeof have === "string") {
    if (have !== p) lx.phonemes = [have, p];
  } else if (!have.includes(p)) have.push(p);
}
