// The JSON Lines output: one JSON object per pronunciation, with the TSV fields plus every variant
// the optional rules produced and the rules that applied. Keys are always written in one fixed order.

/** One output record. */
export interface JsonlEntry {
  readonly word: string;
  /** The narrow IPA of the preferred variant. */
  readonly narrow: string;
  /** The syllabified broad form. */
  readonly broad: string;
  /** Every narrow variant, the preferred one first (a single element when no optional rule applied). */
  readonly variants: readonly string[];
  /** Names of the rules that changed the preferred variant, in the order they applied. */
  readonly rules: readonly string[];
  /** The input row's `id` column, when it had one. */
  readonly id?: string;
  /** Where the pronunciation came from in the input lexicon. */
  readonly source?: { readonly file: string; readonly line: number };
}

/**
 * One entry as one LF-terminated line of JSON (RFC 8259).
 * Invariants: keys appear in the order word, id, narrow, broad, variants, rules, source (absent
 * optional keys are left out, never written as null); JSON.stringify escapes control characters
 * and writes lone surrogates as \u escapes (ECMAScript 2019 well-formed JSON.stringify), and we
 * also escape U+2028/U+2029 (valid raw in JSON, but line breaks to many line readers), so the line
 * never contains a raw line break.
 */
export function formatJsonLine(e: JsonlEntry): string {
  const o: Record<string, unknown> = { word: e.word };
  if (e.id !== undefined) o["id"] = e.id;
  o["narrow"] = e.narrow;
  o["broad"] = e.broad;
  o["variants"] = [...e.variants];
  o["rules"] = [...e.rules];
  if (e.source !== undefined) o["source"] = { file: e.source.file, line: e.source.line };
  const json = JSON.stringify(o);
  if (json.indexOf("\u2028") < 0 && json.indexOf("\u2029") < 0) return json + "\n";
  return json.replace(/[\u2028\u2029]/g, (c) => (c === "\u2028" ? "\\u2028" : "\\u2029")) + "\n";
}
