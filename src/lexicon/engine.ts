// What the runner needs from a compiled grammar: one word (symbols from the reader) in, the
// preferred narrow IPA, the syllabified broad form, every variant and the steps that changed it out.

import type { Word } from "../interp/types.js";
import type { DerivationStep } from "./derivation.js";

export interface EntryResult {
  readonly kind: "entry";
  readonly file: string;
  readonly line: number;
  readonly word: string;
  /** The entry key: the `id` column when present, else word + '#' + its 1-based pronunciation index (keys.ts). */
  readonly key: string;
  readonly id?: string;
  /** Narrow IPA of the preferred variant. */
  readonly narrow: string;
  /** The input after syllabification and default stress only (broad, syllabified). */
  readonly broad: string;
  /** Every narrow variant, the preferred one first. */
  readonly variants: readonly string[];
  /** Names of the steps that changed the preferred variant, in grammar order. */
  readonly rules: readonly string[];
  /** For the preferred variant: each step that changed it, with the narrow form after that step. */
  readonly derivation: readonly DerivationStep[];
  /** Parallel to `variants`: the steps that changed each variant. */
  readonly variantSteps: readonly (readonly string[])[];
  /** The input row as read (pronunciation as written, part of speech, tags): what a comparison calls the input. */
  readonly input: EntryInput;
  /** Some variants were left out: the entry had more than the cap (16 by default). */
  readonly capped?: true;
  /** The preferred machine gave more than one output; the first by symbol order was taken. */
  readonly ambiguous?: true;
}

export interface EntryInput {
  readonly pron: string;
  readonly pos?: string;
  readonly tags: readonly string[];
}

export interface Transcription {
  readonly narrow: string;
  readonly broad: string;
  readonly variants: readonly string[];
  readonly rules: readonly string[];
  readonly derivation: readonly DerivationStep[];
  readonly variantSteps: readonly (readonly string[])[];
  /** Some variants were left out (more than the cap); absent when none were. */
  readonly capped?: true;
  /** The preferred machine gave more than one output and the first by symbol order was taken; absent otherwise. */
  readonly ambiguous?: true;
}

/**
 * What the caller's outputs print beyond the narrow and broad forms: every variant (JSON Lines,
 * PLS, the summary's counts) and the steps that changed the entry (JSON Lines, the summary). An
 * engine may skip what is not asked for: `variants` is then just the narrow form, `rules` empty.
 */
export interface Needs {
  readonly variants?: boolean;
  readonly rules?: boolean;
}

export const ALL_NEEDS: Needs = { variants: true, rules: true };
export const NARROW_ONLY: Needs = { variants: false, rules: false };

export interface Engine {
  /** Step names in grammar order (rules, syllabify and stress steps). */
  readonly steps: readonly string[];
  /** Whether narrow forms carry '.' between unstressed syllables (a compound's parts are joined the same way; default true). */
  readonly writesSyllables?: boolean;
  /** Undefined when a symbol of the word is outside the compiled alphabet. */
  transcribeWord(symbols: Word, needs?: Needs): Transcription | undefined;
}
