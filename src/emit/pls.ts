// The W3C Pronunciation Lexicon Specification (PLS) 1.0 writer (Recommendation, 14 October 2008),
// streamed one lexeme at a time so a large lexicon is never held as one document; xmlbuilder2
// serialises the document frame, and is the reference the lexeme writer is tested against.

import { diagnostic } from "../diagnostics.js";
import type { Diagnostic, SourcePos } from "../diagnostics.js";
import { writeFileAtomic } from "./atomic.js";
import { ByteChunks, putAscii, putUtf8 } from "./bytes.js";

/** PLS 1.0 §4.1: the namespace of every PLS element. */
export const PLS_NAMESPACE = "http://www.w3.org/2005/01/pronunciation-lexicon";
/** XML Namespaces 1.0 §3: the namespace bound to the `xml` prefix (for `xml:lang`). */

/** One lexeme: a word and its pronunciations. */
export interface PlsEntry {
  /** The spelling, written as the lexeme's one `grapheme` (NFC on output). */
  readonly word: string;
  /** Narrow IPA, one `phoneme` each, in order (NFC on output); identical ones are written once. */
  readonly phonemes: readonly string[];
  /** Index into `phonemes` of the preferred pronunciation (default 0). */
  readonly preferred?: number;
  /** Example sentences, written as `example` elements after the pronunciations. */
  readonly examples?: readonly string[];
  /** Where the entry came from, for error messages. */
  readonly source?: SourcePos;
}

export interface PlsOptions {
  /** The variety's BCP 47 language tag, written as `xml:lang` (checked for RFC 5646 well-formedness). */
  readonly lang: string;
  /** Name of the output, used in diagnostics for entries without a `source`. */
  readonly file?: string;
  /** Indent the document (default true): one element per line, two spaces per level. */
  readonly prettyPrint?: boolean;
}

/** Thrown by `plsChunks` when an entry cannot be written; `writePls` turns it into a result. */
export class PlsError extends Error {
  readonly diagnostic: Diagnostic;
  constructor(d: Diagnostic) {
    super(d.message);
    this.name = "PlsError";
    this.diagnostic = d;
  }
}

// ---------------------------------------------------------------------------------------------
// Character and language-tag checks

/**
 * W3C XML 1.0 (Fifth Edition) §2.2, production [2]:
 * Char ::= #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF].
 * Returns the first code point of `text` outside Char (a lone surrogate counts as outside) with its
 * 0-based code-point offset, or undefined when every character is allowed.
 */
export function findNonXmlChar(text: string): { readonly offset: number; readonly codePoint: number } | undefined {
  let offset = 0;
  for (let i = 0; i < text.length; offset++) {
    const cp = text.codePointAt(i)!;
    const ok =
      cp === 0x9 || cp === 0xa || cp === 0xd ||
      (cp >= 0x20 && cp <= 0xd7ff) ||
      (cp >= 0xe000 && cp <= 0xfffd) ||
      (cp >= 0x10000 && cp <= 0x10ffff);
    if (!ok) return { offset, codePoint: cp };
    i += cp > 0xffff ? 2 : 1;
  }
  return undefined;
}

/** `U+00AD`-style name of a code point. */
export const codePointLabel = (cp: number): string => `U+${cp.toString(16).toUpperCase().padStart(4, "0")}`;

/*
 * RFC 5646 §2.1 (BCP 47) ABNF, well-formedness only (no registry look-up), case-insensitive:
 *   Language-Tag = langtag / privateuse / grandfathered
 *   langtag      = language ["-" script] ["-" region] *("-" variant) *("-" extension) ["-" privateuse]
 *   language     = 2*3ALPHA ["-" extlang] / 4ALPHA / 5*8ALPHA ;  extlang = 3ALPHA *2("-" 3ALPHA)
 *   script = 4ALPHA ; region = 2ALPHA / 3DIGIT ; variant = 5*8alphanum / (DIGIT 3alphanum)
 *   extension = singleton 1*("-" (2*8alphanum)) ; singleton = alphanum except "x"
 *   privateuse = "x" 1*("-" (1*8alphanum)) ; grandfathered = the 26 tags listed in §2.1
 */
const LANGTAG = new RegExp(
  "^(?:[a-z]{2,3}(?:-[a-z]{3}){0,3}|[a-z]{4}|[a-z]{5,8})" + // language (with extlang)
    "(?:-[a-z]{4})?" + // script
    "(?:-(?:[a-z]{2}|[0-9]{3}))?" + // region
    "(?:-(?:[a-z0-9]{5,8}|[0-9][a-z0-9]{3}))*" + // variants
    "(?:-[0-9a-wy-z](?:-[a-z0-9]{2,8})+)*" + // extensions
    "(?:-x(?:-[a-z0-9]{1,8})+)?$", // private use
  "i",
);
const PRIVATEUSE = /^x(?:-[a-z0-9]{1,8})+$/i;
const GRANDFATHERED = new Set(
  [
    "en-GB-oed", "i-ami", "i-bnn", "i-default", "i-enochian", "i-hak", "i-klingon", "i-lux", "i-mingo",
    "i-navajo", "i-pwn", "i-tao", "i-tay", "i-tsu", "sgn-BE-FR", "sgn-BE-NL", "sgn-CH-DE",
    "art-lojban", "cel-gaulish", "no-bok", "no-nyn", "zh-guoyu", "zh-hakka", "zh-min", "zh-min-nan", "zh-xiang",
  ].map((t) => t.toLowerCase()),
);

/** True when `tag` is a well-formed BCP 47 language tag (RFC 5646 §2.1, §2.2.9 "well-formed"). */
export function isWellFormedLanguageTag(tag: string): boolean {
  return LANGTAG.test(tag) || PRIVATEUSE.test(tag) || GRANDFATHERED.has(tag.toLowerCase());
}

// ---------------------------------------------------------------------------------------------
// Streaming writer

export interface CheckedEntry {
  readonly grapheme: string;
  readonly phonemes: readonly string[];
  readonly preferred: number;
  readonly examples: readonly string[];
}

/**
 * Checks one entry and returns its text normalised to NFC, or throws PlsError.
 * `ordinal` is the entry's 1-based position in the stream (used when it has no `source`).
 */
export function checkEntry(e: PlsEntry, ordinal: number, file: string): CheckedEntry {
  const grapheme = checkedText(e, ordinal, file, "grapheme", e.word);
  if (e.phonemes.length === 0) failEntry(e, ordinal, file, "pls/no-pronunciation", `entry '${printable(e.word)}' has no pronunciation (PLS 1.0 §4.4 needs at least one phoneme or alias)`);
  const preferredIndex = e.preferred ?? 0;
  if (!Number.isInteger(preferredIndex) || preferredIndex < 0 || preferredIndex >= e.phonemes.length) {
    failEntry(e, ordinal, file, "pls/bad-preferred", `entry '${printable(e.word)}': preferred index ${preferredIndex} is not one of its ${e.phonemes.length} pronunciations`);
  }
  // Identical pronunciations are written once; the preferred one keeps its place among the rest.
  const phonemes: string[] = [];
  let preferred = 0;
  for (let i = 0; i < e.phonemes.length; i++) {
    const nfc = checkedText(e, ordinal, file, i, e.phonemes[i]!);
    let at = phonemes.indexOf(nfc);
    if (at < 0) {
      at = phonemes.length;
      phonemes.push(nfc);
    }
    if (i === preferredIndex) preferred = at;
  }
  const examples = e.examples === undefined || e.examples.length === 0 ? NO_EXAMPLES : e.examples.map((x, i) => checkedText(e, ordinal, file, `example ${i + 1}`, x));
  return { grapheme, phonemes, preferred, examples };
}

const NO_EXAMPLES: readonly string[] = [];

/**
 * `raw` normalised to NFC, or a PlsError when it cannot be an element's text. `what` names it in
 * the message: a number is pronunciation what + 1 (the label is made only for a message: checkEntry
 * runs for every entry of a build, and closures and labels made each time cost about 40 ms of a CMU build).
 */
function checkedText(e: PlsEntry, ordinal: number, file: string, what: string | number, raw: string): string {
  const bad = plsTextProblem(raw);
  if (bad !== undefined) {
    const label = typeof what === "number" ? `pronunciation ${what + 1}` : what;
    failEntry(e, ordinal, file, bad.code, `entry '${printable(e.word)}': the ${label} ${bad.reason}`, bad.offset);
  }
  return raw.normalize("NFC");
}

/** Throws the PlsError of an entry (at its source, or at its ordinal in `file` and `offset`). */
function failEntry(e: PlsEntry, ordinal: number, file: string, code: string, message: string, offset = 0): never {
  const pos: SourcePos = e.source
    ? { file: e.source.file, line: e.source.line, column: e.source.column }
    : { file, line: ordinal, column: offset + 1 };
  throw new PlsError(diagnostic("error", code, message, pos));
}

/**
 * Why `raw` cannot be the text of a PLS element (a grapheme or phoneme), or undefined when it can:
 * a character outside XML 1.0's Char production, a carriage return, or nothing but white space.
 * `reason` continues a sentence ("the grapheme …"); `offset` is a 0-based code-point offset.
 * The runner asks this of every entry before any format writes it, so an entry PLS cannot hold is
 * a reject in every output, not only in the PLS.
 */
export function plsTextProblem(raw: string): { readonly code: string; readonly reason: string; readonly offset: number } | undefined {
  if (plainXmlText(raw)) return undefined;
  const bad = findNonXmlChar(raw);
  if (bad !== undefined) {
    return {
      code: "pls/invalid-xml-char",
      reason: `contains ${codePointLabel(bad.codePoint)} at character ${bad.offset + 1}, which XML 1.0 does not allow (XML 1.0 §2.2, production Char)`,
      offset: bad.offset,
    };
  }
  const nfc = raw.normalize("NFC");
  const cr = nfc.indexOf("\r");
  if (cr >= 0) {
    return {
      code: "pls/carriage-return",
      reason: "contains U+000D CARRIAGE RETURN, which every XML parser turns into a line feed (XML 1.0 §2.11) and which has no place in a lexicon",
      offset: [...nfc.slice(0, cr)].length,
    };
  }
  if (nfc.trim() === "") return { code: "pls/empty-text", reason: "is empty", offset: 0 };
  return undefined;
}

/**
 * The common case, decided in one pass: every UTF-16 unit is in U+0021–U+D7FF (XML 1.0 Char, no
 * control character, no CR, no surrogate) and the first is printable ASCII or the text is not all
 * white space — so `plsTextProblem` has nothing to report.
 */
function plainXmlText(raw: string): boolean {
  const n = raw.length;
  if (n === 0) return false;
  for (let i = 0; i < n; i++) {
    const c = raw.charCodeAt(i);
    if (c <= 0x20 || c >= 0xd800) return false;
  }
  return raw.charCodeAt(0) < 0x7f || raw.trim() !== "";
}

/** A word shown in a message: control characters made visible. */
const printable = (s: string): string =>
  s.replace(/[\u0000-\u001f\u007f\ud800-\udfff]/gu, (c) => `<${codePointLabel(c.charCodeAt(0))}>`);


/**
 * The PLS document as a stream of chunks, one batch per lexeme.
 *
 * Structure written (PLS 1.0): the XML declaration; root `lexicon` in the PLS namespace with
 * `version="1.0"`, `alphabet="ipa"` and `xml:lang` (§4.1); then per entry one `lexeme` (§4.4) holding
 * its `grapheme` (§4.5), then its `phoneme`s (§4.6) — `prefer="true"` on the preferred one when there
 * are several (§4.6, §4.9) — then its `example`s (§4.8). Memory: one lexeme at a time.
 * (Section numbers §4.1, §4.4, §4.5 checked against sources quoting the Recommendation; the rest from memory.)
 * Memory stays flat however many lexemes are written (chunks of about 64 KiB).
 * Throws PlsError (before anything of the bad entry is emitted) for an entry that cannot be written.
 */
export async function* plsChunks(
  entries: Iterable<PlsEntry> | AsyncIterable<PlsEntry>,
  opts: PlsOptions,
): AsyncGenerator<string, number> {
  const { file, pretty, head, tail } = documentFrame(opts);
  yield head;
  let ordinal = 0;
  let batch = "";
  // A plain iterable is read without an asynchronous step per lexeme (one per chunk instead).
  if (Symbol.iterator in entries) {
    for (const e of entries as Iterable<PlsEntry>) {
      ordinal++;
      batch += lexemeXml(checkEntry(e, ordinal, file), pretty);
      if (batch.length >= 1 << 16) {
        yield batch;
        batch = "";
      }
    }
  } else {
    for await (const e of entries) {
      ordinal++;
      batch += lexemeXml(checkEntry(e, ordinal, file), pretty);
      if (batch.length >= 1 << 16) {
        yield batch;
        batch = "";
      }
    }
  }
  yield batch + tail;
  return ordinal;
}

/** The document's frame for `opts`, its language tag checked (PlsError when it is not well-formed). */
function documentFrame(opts: PlsOptions): { file: string; pretty: boolean; head: string; tail: string } {
  const file = opts.file ?? "<pls>";
  if (!isWellFormedLanguageTag(opts.lang)) {
    throw new PlsError(
      diagnostic("error", "pls/bad-language-tag", `'${printable(opts.lang)}' is not a well-formed BCP 47 language tag (RFC 5646 §2.1), needed for xml:lang`, { file, line: 1, column: 1 }),
    );
  }
  const pretty = opts.prettyPrint ?? true;
  return { file, pretty, ...frame(opts.lang, pretty) };
}

/**
 * `plsChunks` as UTF-8 byte chunks of about 1 MiB (emit/bytes.ts), each lexeme written straight
 * into the chunk (`putLexeme`) instead of built as text and then encoded: the same bytes
 * (tests/emit/pls-fast.test.ts compares them on random entries). What `writePls` writes.
 */
export async function* plsByteChunks(
  entries: Iterable<PlsEntry> | AsyncIterable<PlsEntry>,
  opts: PlsOptions,
): AsyncGenerator<Uint8Array, number> {
  const { file, pretty, head, tail } = documentFrame(opts);
  const full: Uint8Array[] = [];
  const out = new ByteChunks((c) => void full.push(c));
  out.push(head);
  let ordinal = 0;
  if (Symbol.iterator in entries) {
    for (const e of entries as Iterable<PlsEntry>) {
      ordinal++;
      putLexeme(out, checkEntry(e, ordinal, file), pretty);
      if (full.length > 0) yield* full.splice(0);
    }
  } else {
    for await (const e of entries) {
      ordinal++;
      putLexeme(out, checkEntry(e, ordinal, file), pretty);
      if (full.length > 0) yield* full.splice(0);
    }
  }
  out.push(tail);
  out.flush();
  yield* full.splice(0);
  return ordinal;
}

/** `lexemeXml(c, pretty)` put into `out` as UTF-8 (its text is well-formed: checkEntry let it through). */
function putLexeme(out: ByteChunks, c: CheckedEntry, pretty: boolean): void {
  let units = c.grapheme.length;
  for (const p of c.phonemes) units += p.length;
  for (const x of c.examples) units += x.length;
  // `&amp;` is 5 bytes for one UTF-16 unit, other units at most 3; the tags around each text.
  if (!out.room(5 * units + 64 * (2 + c.phonemes.length + c.examples.length))) {
    out.push(lexemeXml(c, pretty));
    return;
  }
  const buf = out.target;
  let at = out.position;
  at = putAscii(buf, at, pretty ? "\n  <lexeme>\n    <grapheme>" : "<lexeme><grapheme>");
  at = putText(buf, at, c.grapheme);
  at = putAscii(buf, at, "</grapheme>");
  const several = c.phonemes.length > 1;
  for (let i = 0; i < c.phonemes.length; i++) {
    if (pretty) at = putAscii(buf, at, "\n    ");
    at = putAscii(buf, at, several && i === c.preferred ? '<phoneme prefer="true">' : "<phoneme>");
    at = putText(buf, at, c.phonemes[i]!);
    at = putAscii(buf, at, "</phoneme>");
  }
  for (const ex of c.examples) {
    at = putAscii(buf, at, pretty ? "\n    <example>" : "<example>");
    at = putText(buf, at, ex);
    at = putAscii(buf, at, "</example>");
  }
  at = putAscii(buf, at, pretty ? "\n  </lexeme>" : "</lexeme>");
  out.moveTo(at);
}

/** Text content as `escapeText` escapes it, in UTF-8 (a lone surrogate, which checkEntry refuses, as U+FFFD). */
function putText(buf: Uint8Array, at: number, s: string): number {
  const n = s.length;
  for (let i = 0; i < n; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) {
      if (c === 38) at = putAscii(buf, at, "&amp;");
      else if (c === 60) at = putAscii(buf, at, "&lt;");
      else if (c === 62) at = putAscii(buf, at, "&gt;");
      else buf[at++] = c;
    } else {
      const next = putUtf8(buf, at, s, i, c);
      if (next - at === 4) i++;
      at = next;
    }
  }
  return at;
}

/**
 * The document frame — XML declaration, the root `lexicon` start tag with its namespace and
 * attributes (§4.1), and the end tag — in the layout xmlbuilder2's serialiser gives (written
 * directly: loading the library cost a build about 150 ms; tests/emit/pls-fast.test.ts compares
 * whole documents with xmlbuilder2's). `lang` is a well-formed BCP 47 tag: letters, digits and
 * hyphens, nothing to escape.
 */
function frame(lang: string, pretty: boolean): { head: string; tail: string } {
  const nl = pretty ? "\n" : "";
  const head = `<?xml version="1.0" encoding="UTF-8"?>${nl}<lexicon xmlns="${PLS_NAMESPACE}" version="1.0" alphabet="ipa" xml:lang="${lang}">`;
  return { head, tail: `${nl}</lexicon>\n` };
}

/** Text content escaped as xmlbuilder2 escapes it: & < > (XML 1.0 §2.4). */
const escapeText = (s: string): string =>
  /[&<>]/.test(s) ? s.replace(/[&<>]/g, (c) => (c === "&" ? "&amp;" : c === "<" ? "&lt;" : "&gt;")) : s;

/**
 * One `lexeme` element (§4.4): its grapheme (§4.5), its phonemes (§4.6, `prefer="true"` on the
 * preferred one when there are several), its examples (§4.8), in the layout xmlbuilder2's
 * serialiser gives (two spaces per level when pretty). Written directly rather than through
 * xmlbuilder2's builder, which allocates a DOM fragment per element (tens of microseconds each:
 * about 14 s for the CMU dictionary); tests/emit/pls-fast.test.ts checks that both give the same bytes.
 */
export function lexemeXml(c: CheckedEntry, pretty = true): string {
  const n1 = pretty ? "\n  " : "";
  const n2 = pretty ? "\n    " : "";
  let x = `${n1}<lexeme>${n2}<grapheme>${escapeText(c.grapheme)}</grapheme>`;
  const several = c.phonemes.length > 1;
  for (let i = 0; i < c.phonemes.length; i++) {
    x += `${n2}<phoneme${several && i === c.preferred ? ' prefer="true"' : ""}>${escapeText(c.phonemes[i]!)}</phoneme>`;
  }
  for (const ex of c.examples) x += `${n2}<example>${escapeText(ex)}</example>`;
  return `${x}${n1}</lexeme>`;
}

export type PlsResult =
  | { readonly ok: true; readonly lexemes: number; readonly bytes: number }
  | { readonly ok: false; readonly error: Diagnostic };

/**
 * Writes a PLS file atomically (temp file, then rename). A bad entry or language tag gives
 * `{ ok: false, error }` and leaves no file behind (nor changes an existing one).
 */
export async function writePls(
  path: string,
  entries: Iterable<PlsEntry> | AsyncIterable<PlsEntry>,
  opts: PlsOptions,
): Promise<PlsResult> {
  let lexemes = 0;
  async function* counted(): AsyncGenerator<Uint8Array> {
    const gen = plsByteChunks(entries, { ...opts, file: opts.file ?? path });
    for (;;) {
      const r = await gen.next();
      if (r.done) {
        lexemes = r.value;
        return;
      }
      yield r.value;
    }
  }
  try {
    const bytes = await writeFileAtomic(path, counted());
    return { ok: true, lexemes, bytes };
  } catch (err) {
    if (err instanceof PlsError) return { ok: false, error: err.diagnostic };
    throw err;
  }
}

/** The whole document as one string (small lexicons, tests). */
export async function plsToString(entries: Iterable<PlsEntry> | AsyncIterable<PlsEntry>, opts: PlsOptions): Promise<string> {
  const parts: string[] = [];
  for await (const chunk of plsChunks(entries, opts)) parts.push(chunk);
  return parts.join("");
}
