// Compounds: an entry whose spelling is one word (no white space) and whose pronunciation joins
// its parts with `#`. Every stage sees a compound's parts as it sees the words of a phrase (each
// part syllabified on its own, no onset across the `#`); the written forms differ: a phrase's
// words are separated by a space, a compound's narrow forms join its parts with no space (a stress
// mark or '.' opens the next part, as it opens a syllable), and its broad form keeps the `#`
// (DEVELOPERS.md, "The string every stage sees").

import type { LexiconRow } from "./read.js";
import type { Transcription } from "./engine.js";

const SPACE = /\s/u;
const PRIMARY = "\u02C8";
const SECONDARY = "\u02CC";

/** True for a compound: a one-word spelling whose pronunciation holds `#` between parts. */
export function isCompound(row: Pick<LexiconRow, "word" | "symbols">): boolean {
  // The symbols first: most entries have no inner word boundary, and the spelling's test is dearer.
  const syms = row.symbols;
  for (let i = 0; i < syms.length; i++) {
    const s = syms[i]!;
    if (s.kind === "boundary" && s.which === "word") return !SPACE.test(row.word);
  }
  return false;
}

/**
 * A narrow form of a compound: the space the IPA writer puts between two words becomes nothing
 * before a stress mark (the mark opens the part) and '.' otherwise (`syllables`; nothing without).
 */
export function compoundNarrow(text: string, syllables: boolean): string {
  let out = "";
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c !== " ") out += c;
    else if (text[i + 1] !== PRIMARY && text[i + 1] !== SECONDARY && syllables) out += ".";
  }
  return out;
}

/** The broad form of a compound: its parts joined by `#` instead of the writer's space. */
export const compoundBroad = (text: string): string => text.replace(/ /g, "#");

/** A transcription of a compound with its written forms as above; any other entry as it is. */
export function asCompound(row: Pick<LexiconRow, "word" | "symbols">, t: Transcription, syllables: boolean): Transcription {
  if (!isCompound(row)) return t;
  const n = (s: string): string => compoundNarrow(s, syllables);
  return {
    ...t,
    narrow: n(t.narrow),
    broad: compoundBroad(t.broad),
    variants: t.variants.map(n),
    derivation: t.derivation.map((d) => ({ ...d, form: n(d.form) })),
  };
}
