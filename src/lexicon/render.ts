// Narrow IPA from machine output: symbol ids → text with stress marks at the start of stressed
// syllables and '.' between the others (Handbook of the IPA, 1999: the stress mark precedes the
// syllable it marks and serves as its boundary).

import type { Inventory } from "../inventory/types.js";
import type { Alphabet } from "../compile/alphabet.js";
import { FIRST_SEGMENT, JOIN, SYLL, WORD } from "../compile/alphabet.js";

/** Flat per-id tables, built once per alphabet, read for every symbol of every entry. */
export interface SymbolView {
  readonly texts: readonly string[];
  /** 0 ε, 1 '#', 2 '.', 3 segment, 4 '+'. */
  readonly kind: Uint8Array;
  /** 1 primary, 2 secondary, 0 anything else (unstressed, unassigned, non-nucleus). */
  readonly stress: Uint8Array;
  /** 1 for [+syllabic] segments. */
  readonly nucleus: Uint8Array;
}

// Unicode Spacing Modifier Letters: U+02C8 MODIFIER LETTER VERTICAL LINE (primary stress),
// U+02CC MODIFIER LETTER LOW VERTICAL LINE (secondary stress) — IPA Handbook 1999.
export const PRIMARY_MARK = "\u02C8";
export const SECONDARY_MARK = "\u02CC";

export function symbolView(alphabet: Alphabet, inventory: Inventory): SymbolView {
  const n = alphabet.size;
  const texts: string[] = new Array<string>(n).fill("");
  const kind = new Uint8Array(n);
  const stress = new Uint8Array(n);
  const nucleusOf = new Uint8Array(n);
  kind[WORD] = 1;
  kind[SYLL] = 2;
  kind[JOIN] = 4;
  texts[WORD] = "#";
  texts[SYLL] = ".";
  texts[JOIN] = "+";
  const iStress = inventory.featureIndex.get("stress");
  const iPrimary = inventory.featureIndex.get("primary");
  const iSyllabic = inventory.featureIndex.get("syllabic");
  for (const s of alphabet.segments) {
    kind[s.id] = 3;
    texts[s.id] = s.text;
    const nucleus = iSyllabic !== undefined && s.bundle[iSyllabic] === "+";
    if (nucleus) nucleusOf[s.id] = 1;
    if (!nucleus || iStress === undefined || iPrimary === undefined) continue;
    if (s.bundle[iStress] === "+") stress[s.id] = s.bundle[iPrimary] === "+" ? 1 : 2;
  }
  if (alphabet.segments.length > 0 && alphabet.segments[0]!.id !== FIRST_SEGMENT) {
    throw new Error("alphabet segments must start at FIRST_SEGMENT");
  }
  return { texts, kind, stress, nucleus: nucleusOf };
}

export interface RenderOptions {
  /** Write '.' between unstressed syllables (default true); stress marks are always written. */
  readonly syllables?: boolean;
  /** Write each morpheme join '+' (the broad form; default false: narrow forms leave joins out). */
  readonly joins?: boolean;
}

/**
 * Renders one entry, exactly as the interpreter's `symsToIpa` writes symbol arrays: outer '#'
 * dropped, an inner run of '#' (between words of a phrase) becomes one space; each stretch between
 * boundaries is prefixed by ˈ / ˌ when its first nucleus is stressed, otherwise by '.' when a
 * syllable boundary opened it; a later stressed nucleus in the same stretch (a word not
 * syllabified) gets its mark right before it.
 */
export function renderIpa(ids: ArrayLike<number>, view: SymbolView, opts: RenderOptions = {}): string {
  const dots = opts.syllables ?? true;
  const joins = opts.joins ?? false;
  const { kind, stress } = view;
  const units = unitsOf(view.texts);
  let from = 0;
  let to = ids.length;
  while (from < to && kind[ids[from]!] === 1) from++;
  while (to > from && kind[ids[to - 1]!] === 1) to--;
  // The text is gathered as UTF-16 code units and made into one flat string at the end: a string
  // built by `+=` per symbol is a tree of pieces that every later reader (the JSON writer, the
  // UTF-8 encoder) first copies flat, and each piece is an object for the garbage collector.
  let buf = scratch;
  let n = 0;
  let i = from;
  let opener = 0; // 0 start, 1 word, 2 syllable
  while (i <= to) {
    let j = i;
    while (j < to && kind[ids[j]!]! >= 3) j++;
    // Room for every symbol of the stretch with a mark before each, and the opener.
    const most = n + 1 + (j - i) * (units.widest + 1);
    if (most > buf.length) buf = grow(buf, most);
    let firstNucleus = -1;
    let firstMark = 0;
    for (let k = i; k < j; k++) {
      if (view.nucleus[ids[k]!] === 1) {
        firstNucleus = k;
        firstMark = stress[ids[k]!]!;
        break;
      }
    }
    if (opener === 1) buf[n++] = SPACE;
    if (firstMark === 1) buf[n++] = PRIMARY;
    else if (firstMark === 2) buf[n++] = SECONDARY;
    else if (opener === 2 && dots) buf[n++] = DOT;
    for (let k = i; k < j; k++) {
      const id = ids[k]!;
      if (kind[id] === 4) {
        if (joins) buf[n++] = PLUS;
        continue;
      }
      if (k !== firstNucleus && view.nucleus[id] === 1) {
        const st = stress[id];
        if (st === 1) buf[n++] = PRIMARY;
        else if (st === 2) buf[n++] = SECONDARY;
      }
      const at = units.start[id]!;
      const end = units.start[id + 1]!;
      for (let u = at; u < end; u++) buf[n++] = units.codes[u]!;
    }
    if (j >= to) break;
    opener = kind[ids[j]!] === 1 ? 1 : 2;
    i = j + 1;
    while (opener === 1 && i < to && kind[ids[i]!] === 1) i++;
  }
  scratch = buf;
  return textOf(buf, n);
}

const SPACE = 0x20;
const DOT = 0x2e;
const PLUS = 0x2b;
const PRIMARY = PRIMARY_MARK.charCodeAt(0);
const SECONDARY = SECONDARY_MARK.charCodeAt(0);

/** Each symbol's text as UTF-16 code units: those of id `i` are `codes[start[i] … start[i+1])`. */
interface SymbolUnits {
  readonly codes: Uint16Array;
  readonly start: Int32Array;
  /** The most code units of one symbol's text. */
  readonly widest: number;
}

/** Made once per texts table (a view and its tied variant have their own). */
const unitsCache = new WeakMap<readonly string[], SymbolUnits>();

function unitsOf(texts: readonly string[]): SymbolUnits {
  let u = unitsCache.get(texts);
  if (u !== undefined) return u;
  const start = new Int32Array(texts.length + 1);
  let widest = 0;
  for (let i = 0; i < texts.length; i++) {
    start[i + 1] = start[i]! + texts[i]!.length;
    widest = Math.max(widest, texts[i]!.length);
  }
  const codes = new Uint16Array(start[texts.length]!);
  for (let i = 0; i < texts.length; i++) for (let k = 0; k < texts[i]!.length; k++) codes[start[i]! + k] = texts[i]!.charCodeAt(k);
  u = { codes, start, widest };
  unitsCache.set(texts, u);
  return u;
}

/** The buffer every rendering fills (one per thread: a module's state is per worker). */
let scratch: Uint16Array = new Uint16Array(256);

function grow(buf: Uint16Array, need: number): Uint16Array {
  const next = new Uint16Array(Math.max(need, buf.length * 2));
  next.set(buf);
  return next;
}

/** Code units per `String.fromCharCode` call (an argument list that stays well inside the stack). */
const PIECE = 4096;

/**
 * Plain arrays, one per length, the code units of a short text are copied to: `apply` takes one
 * about twice as fast as a typed array's view (and setting one array's length each time costs too).
 */
const SHORT = 64;
const shortUnits: number[][] = [];

/** `buf[0 … n)` as one string. */
function textOf(buf: Uint16Array, n: number): string {
  if (n <= SHORT) {
    const units = (shortUnits[n] ??= new Array<number>(n).fill(0));
    for (let i = 0; i < n; i++) units[i] = buf[i]!;
    return String.fromCharCode.apply(null, units);
  }
  if (n <= PIECE) return String.fromCharCode.apply(null, buf.subarray(0, n) as unknown as number[]);
  let text = "";
  for (let at = 0; at < n; at += PIECE) text += String.fromCharCode.apply(null, buf.subarray(at, Math.min(n, at + PIECE)) as unknown as number[]);
  return text;
}

/**
 * Each symbol's text as UTF-8 bytes (those of id `i` are `bytes[start[i] … start[i+1])`), for the
 * texts `renderIpaUtf8` can write as they are: `plain[i]` is 1 when every UTF-16 unit of the text is
 * in U+0021–U+D7FF (XML 1.0 characters, no white-space control, no surrogate) other than '\', which
 * a TSV field would escape; `visible[i]` when the text is not all white space.
 */
interface SymbolBytes {
  readonly bytes: Uint8Array;
  readonly start: Int32Array;
  readonly plain: Uint8Array;
  readonly visible: Uint8Array;
  /** The most bytes of one symbol's text. */
  readonly widest: number;
}

const bytesCache = new WeakMap<readonly string[], SymbolBytes>();

function bytesOf(texts: readonly string[]): SymbolBytes {
  let b = bytesCache.get(texts);
  if (b !== undefined) return b;
  const encoder = new TextEncoder();
  const pieces = texts.map((t) => encoder.encode(t));
  const start = new Int32Array(texts.length + 1);
  const plain = new Uint8Array(texts.length);
  const visible = new Uint8Array(texts.length);
  let widest = 0;
  for (let i = 0; i < texts.length; i++) {
    const t = texts[i]!;
    start[i + 1] = start[i]! + pieces[i]!.length;
    widest = Math.max(widest, pieces[i]!.length);
    let ok = true;
    for (let k = 0; k < t.length; k++) {
      const c = t.charCodeAt(k);
      if (c <= 0x20 || c >= 0xd800 || c === 0x5c) ok = false;
    }
    plain[i] = ok ? 1 : 0;
    visible[i] = t.trim() !== "" ? 1 : 0;
  }
  const bytes = new Uint8Array(start[texts.length]!);
  pieces.forEach((p, i) => bytes.set(p, start[i]!));
  b = { bytes, start, plain, visible, widest };
  bytesCache.set(texts, b);
  return b;
}

/** The most bytes `renderIpaUtf8` writes for `ids`: each symbol's widest text with a mark before it. */
export function utf8Bound(ids: ArrayLike<number>, view: SymbolView): number {
  return ids.length * (bytesOf(view.texts).widest + 2) + 2;
}

// U+02C8 and U+02CC in UTF-8.
const MARK_LEAD = 0xcb;
const PRIMARY_TAIL = 0x88;
const SECONDARY_TAIL = 0x8c;

/**
 * `renderIpa(ids, view, opts)` as UTF-8 bytes at `buf[at …]` (room for `utf8Bound(ids, view)`), for
 * an entry whose text needs no escape and no check: returns the position after, or -1 — nothing
 * to rely on written — when the text would hold a space (words of a phrase), a symbol that is not
 * plain (see SymbolBytes), or nothing visible; the caller then renders the text and checks it as
 * before. Such a text is one that TSV writes unescaped and `plsTextProblem` passes at once (every
 * unit in U+0021–U+D7FF and not all white space), so a transcription written this way skips the
 * string, its check and its encoding. tests/lexicon/render-utf8.test.ts compares it with renderIpa.
 */
export function renderIpaUtf8(ids: ArrayLike<number>, view: SymbolView, opts: RenderOptions, buf: Uint8Array, at: number): number {
  const dots = opts.syllables ?? true;
  const joins = opts.joins ?? false;
  const { kind, stress, nucleus } = view;
  const sb = bytesOf(view.texts);
  const { bytes, start, plain } = sb;
  let from = 0;
  let to = ids.length;
  while (from < to && kind[ids[from]!] === 1) from++;
  while (to > from && kind[ids[to - 1]!] === 1) to--;
  let visible = false;
  let i = from;
  let opener = 0; // 0 start, 1 word, 2 syllable
  while (i <= to) {
    let j = i;
    while (j < to && kind[ids[j]!]! >= 3) j++;
    let firstNucleus = -1;
    let firstMark = 0;
    for (let k = i; k < j; k++) {
      if (nucleus[ids[k]!] === 1) {
        firstNucleus = k;
        firstMark = stress[ids[k]!]!;
        break;
      }
    }
    if (opener === 1) return -1;
    if (firstMark !== 0) {
      buf[at++] = MARK_LEAD;
      buf[at++] = firstMark === 1 ? PRIMARY_TAIL : SECONDARY_TAIL;
      visible = true;
    } else if (opener === 2 && dots) {
      buf[at++] = DOT;
      visible = true;
    }
    for (let k = i; k < j; k++) {
      const id = ids[k]!;
      if (kind[id] === 4) {
        if (joins) {
          buf[at++] = PLUS;
          visible = true;
        }
        continue;
      }
      if (k !== firstNucleus && nucleus[id] === 1) {
        const st = stress[id];
        if (st !== 0) {
          buf[at++] = MARK_LEAD;
          buf[at++] = st === 1 ? PRIMARY_TAIL : SECONDARY_TAIL;
          visible = true;
        }
      }
      if (plain[id] !== 1) return -1;
      if (sb.visible[id] === 1) visible = true;
      const end = start[id + 1]!;
      for (let u = start[id]!; u < end; u++) buf[at++] = bytes[u]!;
    }
    if (j >= to) break;
    opener = kind[ids[j]!] === 1 ? 1 : 2;
    i = j + 1;
    while (opener === 1 && i < to && kind[ids[i]!] === 1) i++;
  }
  return visible ? at : -1;
}
