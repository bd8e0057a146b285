// Options of the IPA a run writes for other software: what PLS phonemes hold (every narrow variant,
// or the broad form for engines with limited IPA support), and which language tag PLS declares.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { isWellFormedLanguageTag } from "../emit/pls.js";
import type { Grammar } from "../grammar/ast.js";
import type { EntryResult } from "./engine.js";

/** `narrow`: the preferred narrow form, then the other variants (default); `broad`: the broad form alone. */
export const PLS_PHONEMES = ["narrow", "broad"] as const;
export type PlsPhonemes = (typeof PLS_PHONEMES)[number];

/** An entry's PLS pronunciations: the preferred narrow form first, then the other variants; or the broad form alone. */
export function plsPhonemes(r: EntryResult, form: PlsPhonemes = "narrow"): string[] {
  const p = plsPhonemesCompact(r, form);
  return typeof p === "string" ? [p] : p;
}

/** `plsPhonemes`, as the string itself when there is one (most entries: the broad form, or one narrow variant). */
export function plsPhonemesCompact(r: EntryResult, form: PlsPhonemes = "narrow"): string | string[] {
  if (form === "broad") return r.broad;
  const v = r.variants;
  return v.length === 1 && v[0] === r.narrow ? r.narrow : [r.narrow, ...v.filter((x) => x !== r.narrow)];
}

/**
 * The PLS xml:lang: the tag given (the command line's, or the variety's in varieties.json), else
 * the grammar's `language` statement, else `und` (BCP 47: undetermined). A grammar's tag that is
 * not well-formed BCP 47 (RFC 5646 §2.1) is an error at the statement when PLS is written.
 */
export function pickLanguage(given: string | undefined, grammar: Grammar, forPls: boolean): { readonly lang: string } | { readonly diagnostic: Diagnostic } {
  if (given !== undefined) return { lang: given };
  const declared = grammar.language;
  if (declared === undefined) return { lang: "und" };
  if (forPls && !isWellFormedLanguageTag(declared.tag)) {
    return { diagnostic: diagnostic("error", "grammar/bad-language", `The language tag '${declared.tag}' is not a well-formed BCP 47 tag (such as en-US).`, declared.span) };
  }
  return { lang: declared.tag };
}
