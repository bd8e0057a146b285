// The JSON Lines output: one JSON object per pronunciation, with the TSV fields plus every variant
// the optional rules produced and the rules that applied. Keys are always written in one fixed order.

/** One output record. */
export interface JsonlEntry {
  /** The entry key (the `id` column, or word#index): what comparisons match entries by. */
  readonly key?: string;
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
  /** The preferred variant step by step: each step that changed it and the narrow form after it. */
  readonly derivation?: readonly { readonly step: string; readonly form: string }[];
  /** Parallel to `variants`: the steps that changed each variant. */
  readonly variantSteps?: readonly (readonly string[])[];
  /** The input row as read: pronunciation as written, part of speech (when given), tags. */
  readonly input?: { readonly pron: string; readonly pos?: string; readonly tags: readonly string[] };
  /** Some variants were left out (more than the cap). */
  readonly capped?: boolean;
  /** The preferred machine gave several outputs; the first by symbol order was taken. */
  readonly ambiguous?: boolean;
}

/**
 * One entry as one LF-terminated line of JSON (RFC 8259).
 * Invariants: keys appear in the order key, word, narrow, broad, variants, rules, id, source,
 * derivation, variantSteps, input (absent optional keys are left out, never written as null); JSON.stringify escapes control characters
 * and writes lone surrogates as \u escapes (ECMAScript 2019 well-formed JSON.stringify), and we
 * also escape U+2028/U+2029 (valid raw in JSON, but line breaks to many line readers), so the line
 * never contains a raw line break.
 */
export function formatJsonLine(e: JsonlEntry): string {
  return formatJsonRecord(e) + "\n";
}

/** `formatJsonLine` without its line feed (one flat string, for writers that add the line end themselves). */
export function formatJsonRecord(e: JsonlEntry): string {
  const o: Record<string, unknown> = {};
  if (e.key !== undefined) o["key"] = e.key;
  o["word"] = e.word;
  o["narrow"] = e.narrow;
  o["broad"] = e.broad;
  // Arrays are written as they are (JSON.stringify gives the same text for a copy).
  o["variants"] = e.variants;
  o["rules"] = e.rules;
  if (e.id !== undefined) o["id"] = e.id;
  if (e.source !== undefined) o["source"] = { file: e.source.file, line: e.source.line };
  if (e.derivation !== undefined) o["derivation"] = e.derivation.map((d) => ({ step: d.step, form: d.form }));
  if (e.variantSteps !== undefined) o["variantSteps"] = e.variantSteps;
  if (e.input !== undefined) o["input"] = e.input.pos !== undefined ? { pron: e.input.pron, pos: e.input.pos, tags: e.input.tags } : { pron: e.input.pron, tags: e.input.tags };
  if (e.capped === true) o["capped"] = true;
  if (e.ambiguous === true) o["ambiguous"] = true;
  const json = JSON.stringify(o);
  if (json.indexOf("\u2028") < 0 && json.indexOf("\u2029") < 0) return json;
  return json.replace(/[\u2028\u2029]/g, (c) => (c === "\u2028" ? "\\u2028" : "\\u2029"));
}
