// What the runner needs from a compiled grammar: one word (symbols from the reader) in, the
// preferred narrow IPA, the syllabified broad form, every variant and the steps that changed it out.

import type { Word } from "../interp/types.js";

export interface EntryResult {
  readonly kind: "entry";
  readonly file: string;
  readonly line: number;
  readonly word: string;
  readonly id?: string;
  /** Narrow IPA of the preferred variant. */
  readonly narrow: string;
  /** The input after syllabification and default stress only (broad, syllabified). */
  readonly broad: string;
  /** Every narrow variant, the preferred one first. */
  readonly variants: readonly string[];
  /** Names of the steps that changed the preferred variant, in grammar order. */
  readonly rules: readonly string[];
  /** Some variants were left out: the entry had more than the cap (16 by default). */
  readonly capped?: true;
  /** The preferred machine gave more than one output; the first by symbol order was taken. */
  readonly ambiguous?: true;
}

export interface Transcription {
  readonly narrow: string;
  readonly broad: string;
  readonly variants: readonly string[];
  readonly rules: readonly string[];
  /** Some variants were left out (more than the cap); absent when none were. */
  readonly capped?: true;
  /** The preferred machine gave more than one output and the first by symbol order was taken; absent otherwise. */
  readonly ambiguous?: true;
}

export interface Engine {
  /** Step names in grammar order (rules, syllabify and stress steps). */
  readonly steps: readonly string[];
  /** Undefined when a symbol of the word is outside the compiled alphabet. */
  transcribeWord(symbols: Word): Transcription | undefined;
}
