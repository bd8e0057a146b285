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
 * derivation, variantSteps, input (absent optional keys are left out, never written as null); the
 * text is exactly what JSON.stringify gives for an object with those keys in that order (control
 * characters escaped, lone surrogates written as \u escapes as ECMAScript 2019 well-formed
 * JSON.stringify does), except that U+2028/U+2029 are escaped too (valid raw in JSON, but line
 * breaks to many line readers), so the line never contains a raw line break.
 */
export function formatJsonLine(e: JsonlEntry): string {
  return formatJsonRecord(e) + "\n";
}

/** `formatJsonLine` without its line feed (one flat string, for writers that add the line end themselves). */
export function formatJsonRecord(e: JsonlEntry): string {
  // Derivation steps copied as {step, form}: an element with other keys would write them too.
  const d = e.derivation !== undefined ? { derivation: e.derivation.map(stepOnly) } : {};
  return e.source !== undefined ? jsonRecord({ ...e, ...d }, e.source.file, e.source.line) : jsonRecord({ ...e, ...d });
}

/**
 * The record writer behind `formatJsonRecord`: one object of one fixed shape per record, with the
 * keys in the written order, given to JSON.stringify (which leaves out a key whose value is
 * undefined, and serialises objects of one shape on its fast path). Measured on the CMU dictionary,
 * formatting alone, CPU time: this 0.35–0.42 s, the former object built key by key then copied
 * 0.39–0.61 s, a hand-written serialiser (escaping in JavaScript) 0.50–0.59 s.
 * `sourceFile` and `sourceLine`, when given, are the `source` object (in place of `e.source`, for
 * a caller whose record holds file and line flat). The derivation's elements are written as they
 * are: objects of the keys `step` and `form` only, in that order (as the engines make them).
 * tests/emit/jsonl-writer.test.ts compares it with JSON.stringify of the documented object.
 */
export function jsonRecord(e: Omit<JsonlEntry, "source">, sourceFile?: string, sourceLine?: number): string {
  const input = e.input;
  const json = JSON.stringify({
    key: e.key,
    word: e.word,
    narrow: e.narrow,
    broad: e.broad,
    variants: e.variants,
    rules: e.rules,
    id: e.id,
    source: sourceFile !== undefined ? { file: sourceFile, line: sourceLine } : undefined,
    derivation: e.derivation,
    variantSteps: e.variantSteps,
    input: input !== undefined ? { pron: input.pron, pos: input.pos, tags: input.tags } : undefined,
    capped: e.capped === true ? true : undefined,
    ambiguous: e.ambiguous === true ? true : undefined,
  });
  if (json.indexOf("\u2028") < 0 && json.indexOf("\u2029") < 0) return json;
  return json.replace(/[\u2028\u2029]/g, (c) => (c === "\u2028" ? "\\u2028" : "\\u2029"));
}

const stepOnly = (d: { readonly step: string; readonly form: string }): { step: string; form: string } => ({ step: d.step, form: d.form });
