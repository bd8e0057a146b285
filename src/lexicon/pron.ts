// A memoising fast path for reading pronunciations: the common case (IPA already in canonical
// order, no ASCII g, no tie bars, no error) read straight from the UTF-16 string, every distinct
// segment (symbol plus diacritics, per stress) built once and shared, so the runner's encoder finds
// its id by identity. Anything else returns undefined and the caller takes the general path
// (`tokenise` + `applyStress`), which also writes every error; tests/lexicon/pron.test.ts checks
// that both give the same symbols.

import { lookup } from "../inventory/lookup.js";
import { splitTable } from "../inventory/diphthong.js";
import type { Bundle, FeatureValue, Inventory } from "../inventory/types.js";
import { ASCII_PRIMARY, ASCII_SECONDARY, MORPHEME_JOIN, PRIMARY_STRESS, RESERVED, SECONDARY_STRESS, SYLLABLE_BREAK, TIE_BARS, WORD_BREAK } from "../inventory/ipa.js";
import { JOIN_EDGE, SYLLABLE_EDGE, WORD_EDGE, segment, type Sym } from "../interp/types.js";

/** One distinct segment as read (symbol plus diacritics), with its symbol per stress setting, made on demand. */
interface SegmentType {
  readonly bundle: Bundle;
  readonly nucleus: boolean;
  /** As read; [+stress +primary]; [+stress -primary]; [-stress -primary]. */
  readonly syms: (Sym | undefined)[];
}

// Character classes, decided once per UTF-16 unit.
const UNKNOWN = 0;
const PLAIN = 1; // a letter that may start or continue a symbol
const MARK = 2; // a combining mark (two in a row may need canonical reordering: general path)
const SPACE = 3;
const PRIMARY = 4;
const SECONDARY = 5;
const SYLLABLE = 6;
const WORDBREAK = 7;
const JOIN = 9; // '+', a morpheme join
const GENERAL = 8; // needs the general path: ASCII g, tie bars, surrogates, characters NFD changes

const IS_MARK = /^\p{M}$/u;
const IS_SPACE = /^\s$/u;

function classify(code: number): number {
  const c = String.fromCharCode(code);
  if (c === PRIMARY_STRESS || c === ASCII_PRIMARY) return PRIMARY;
  if (c === SECONDARY_STRESS || c === ASCII_SECONDARY) return SECONDARY;
  if (c === SYLLABLE_BREAK) return SYLLABLE;
  if (c === WORD_BREAK) return WORDBREAK;
  if (c === MORPHEME_JOIN) return JOIN;
  if (code >= 0xd800 && code <= 0xdfff) return GENERAL;
  if (c === "g" || TIE_BARS.has(c) || c.normalize("NFD") !== c) return GENERAL;
  if (IS_SPACE.test(c)) return SPACE;
  return IS_MARK.test(c) ? MARK : PLAIN;
}

/**
 * The longest key of a set of strings that starts at a position of a text, found by walking the
 * text's UTF-16 units through a trie (no substring made and hashed per candidate length). The trie
 * is a dense table: each unit that occurs in a key has a column, each node a row of targets (0:
 * none; the root is no node's child), so a step is two typed-array look-ups, not a Map's.
 */
class KeyTrie {
  /** Column of each UTF-16 unit (0: in no key). */
  private readonly column = new Uint16Array(65536);
  private readonly columns: number;
  /** Target of node n on column c at n × columns + c; 0 for none. */
  private readonly next: Int32Array;
  /** Per node: the index of the key ending there, or -1. */
  private readonly ends: Int32Array;
  /** Length of the last match `longest` found. */
  matched = 0;

  constructor(keys: Iterable<string>) {
    const children: Map<number, number>[] = [new Map()];
    const ends: number[] = [-1];
    let columns = 1;
    let k = 0;
    for (const key of keys) {
      let node = 0;
      for (let i = 0; i < key.length; i++) {
        const c = key.charCodeAt(i);
        if (this.column[c] === 0) this.column[c] = columns++;
        let next = children[node]!.get(c);
        if (next === undefined) {
          next = ends.length;
          children[node]!.set(c, next);
          children.push(new Map());
          ends.push(-1);
        }
        node = next;
      }
      if (key.length > 0) ends[node] = k;
      k++;
    }
    this.columns = columns;
    this.next = new Int32Array(ends.length * columns);
    children.forEach((m, node) => m.forEach((target, c) => void (this.next[node * columns + this.column[c]!] = target)));
    this.ends = Int32Array.from(ends);
  }

  /** The node of the longest key starting at `text[at]` (its length in `matched`), or -1 when no key starts there. */
  longest(text: string, at: number): number {
    const column = this.column;
    const next = this.next;
    const columns = this.columns;
    let node = 0;
    let best = -1;
    this.matched = 0;
    for (let i = at; i < text.length; i++) {
      const c = column[text.charCodeAt(i)]!;
      if (c === 0) break;
      const to = next[node * columns + c]!;
      if (to === 0) break;
      node = to;
      if (this.ends[node]! >= 0) {
        best = node;
        this.matched = i - at + 1;
      }
    }
    return best;
  }

  /** Index (in the order given) of the key ending at `node`. */
  keyAt(node: number): number {
    return this.ends[node]!;
  }
}

export interface PronSymbols {
  readonly symbols: Sym[];
  readonly marked: boolean;
}

export class PronReader {
  private readonly classes = new Uint8Array(65536);
  private readonly types = new Map<string, SegmentType>();
  /** Segment symbols' keys and diacritics' keys, as tries; the segment index of each symbol key. */
  private readonly symbolTrie: KeyTrie;
  private readonly symbolIndex: number[];
  private readonly diacriticTrie: KeyTrie;
  private readonly diacriticKeys: string[];
  /** Per symbol-trie node: the type of that symbol read without diacritics (what `types` holds under its key). */
  private readonly plainTypes: (SegmentType | undefined)[] = [];
  private readonly usable: boolean;
  private readonly syllabic: number;
  private readonly stressF: number;
  private readonly primaryF: number;
  /** First letters of symbols whose marks the writer puts after that letter (inventory/diphthong.ts). */
  private readonly heads: ReadonlySet<string>;

  constructor(private readonly inv: Inventory) {
    const lk = lookup(inv);
    this.syllabic = inv.featureIndex.get("syllabic") ?? -1;
    this.stressF = inv.featureIndex.get("stress") ?? -1;
    this.primaryF = inv.featureIndex.get("primary") ?? -1;
    this.heads = splitTable(inv).heads;
    this.symbolTrie = new KeyTrie(lk.symbolByKey.keys());
    this.symbolIndex = [...lk.symbolByKey.values()];
    this.diacriticKeys = [...lk.diacriticByKey.keys()];
    this.diacriticTrie = new KeyTrie(this.diacriticKeys);
    // The fast path reads a stress mark, '.', '#' or white space as itself; keys holding one would
    // be read differently by the tokeniser's longest match, so such an inventory always takes the general path.
    const plainKey = (k: string): boolean => [...k].every((c) => !RESERVED.has(c) && !IS_SPACE.test(c));
    this.usable = this.syllabic >= 0 && this.stressF >= 0 && this.primaryF >= 0
      && [...lk.symbolByKey.keys()].every(plainKey) && [...lk.diacriticByKey.keys()].every(plainKey);
  }

  private cls(code: number): number {
    let k = this.classes[code]!;
    if (k === UNKNOWN) {
      k = classify(code);
      this.classes[code] = k;
    }
    return k;
  }

  private typeOf(text: string, segIndex: number, diacritics: readonly string[]): SegmentType {
    let t = this.types.get(text);
    if (t === undefined) {
      const lk = lookup(this.inv);
      let bundle: Bundle = this.inv.segments[segIndex]!.bundle;
      for (const d of diacritics) {
        const next: FeatureValue[] = bundle.slice();
        for (const [f, v] of lk.diacriticByKey.get(d)!.sets) next[f] = v;
        bundle = next;
      }
      t = { bundle, nucleus: bundle[this.syllabic] === "+", syms: [undefined, undefined, undefined, undefined] };
      this.types.set(text, t);
    }
    return t;
  }

  /** Symbol `which` (0 as read, 1 primary, 2 secondary, 3 unstressed) of a segment type, as `applyStress` builds it. */
  private sym(t: SegmentType, which: number): Sym {
    let s = t.syms[which];
    if (s === undefined) {
      const b = t.bundle;
      if (which === 0) s = segment(b);
      else {
        const [st, pr]: [FeatureValue, FeatureValue] = which === 1 ? ["+", "+"] : which === 2 ? ["+", "-"] : ["-", "-"];
        if (b[this.stressF] === st && b[this.primaryF] === pr) s = segment(b);
        else {
          const c = b.slice();
          c[this.stressF] = st;
          c[this.primaryF] = pr;
          s = segment(c);
        }
      }
      t.syms[which] = s;
    }
    return s;
  }

  /**
   * The symbols of a pronunciation exactly as `tokenise` then `applyStress` give them, or undefined
   * when the pronunciation needs the general path (unusual characters, or any error).
   */
  read(pron: string): PronSymbols | undefined {
    if (!this.usable) return undefined;
    const n = pron.length;
    let marked = false;
    let prevMark = false;
    for (let i = 0; i < n; i++) {
      const k = this.cls(pron.charCodeAt(i));
      if (k === GENERAL) return undefined;
      if (k === PRIMARY || k === SECONDARY) marked = true;
      const isMark = k === MARK;
      if (isMark && prevMark) return undefined;
      prevMark = isMark;
    }
    const out: Sym[] = [];
    let pending = 0; // 0 none, 1 primary, 2 secondary
    let wordHasSegment = false;
    let sawWordBreak = false;
    // A join must follow a segment and be followed by a segment or a stress mark (joins.ts);
    // anything else takes the general path, which writes the error.
    let afterJoin = false;
    let i = 0;
    while (i < n) {
      const k = this.classes[pron.charCodeAt(i)]!;
      if (k === SPACE) {
        i++;
        continue;
      }
      if (k === JOIN) {
        if (afterJoin || pending !== 0 || out.length === 0 || out[out.length - 1]!.kind !== "segment") return undefined;
        afterJoin = true;
        out.push(JOIN_EDGE);
        i++;
        continue;
      }
      if (afterJoin && k !== PRIMARY && k !== SECONDARY) {
        if (k === SYLLABLE || k === WORDBREAK) return undefined;
        afterJoin = false;
      }
      if (k === PRIMARY || k === SECONDARY) {
        if (pending !== 0) return undefined;
        pending = k === PRIMARY ? 1 : 2;
        i++;
        continue;
      }
      if (k === SYLLABLE) {
        out.push(SYLLABLE_EDGE);
        i++;
        continue;
      }
      if (k === WORDBREAK) {
        if (pending !== 0 || !wordHasSegment) return undefined;
        wordHasSegment = false;
        sawWordBreak = true;
        out.push(WORD_EDGE);
        i++;
        continue;
      }
      // The longest symbol key at i, then the longest diacritic keys after it, one after another
      // (as trying each length from the longest down would find them).
      const node = this.symbolTrie.longest(pron, i);
      if (node < 0) return undefined;
      const len = this.symbolTrie.matched;
      const segIndex = this.symbolIndex[this.symbolTrie.keyAt(node)]!;
      let j = i + len;
      let diacritics: string[] | undefined;
      for (;;) {
        const d = this.diacriticTrie.longest(pron, j);
        if (d < 0) break;
        (diacritics ??= []).push(this.diacriticKeys[this.diacriticTrie.keyAt(d)]!);
        j += this.diacriticTrie.matched;
      }
      // Marks after a diphthong's first letter (ãɪ, aːɪ): the general path reads them (inventory/diphthong.ts).
      if (diacritics !== undefined && this.heads.has(pron.substr(i, len))) return undefined;
      // A symbol without diacritics: its type by trie node (one per key, as `types` keys it by text).
      let t: SegmentType;
      if (diacritics === undefined) t = this.plainTypes[node] ??= this.typeOf(pron.slice(i, j), segIndex, NONE);
      else t = this.typeOf(pron.slice(i, j), segIndex, diacritics);
      wordHasSegment = true;
      if (t.nucleus) {
        out.push(this.sym(t, pending === 1 ? 1 : pending === 2 ? 2 : marked ? 3 : 0));
        pending = 0;
      } else out.push(this.sym(t, 0));
      i = j;
    }
    if (pending !== 0 || afterJoin) return undefined;
    if (!wordHasSegment && sawWordBreak) return undefined;
    return { symbols: out, marked };
  }
}

const NONE: readonly string[] = [];

const readers = new WeakMap<Inventory, PronReader>();

/** The fast pronunciation reader of an inventory (one per inventory, kept while it lives). */
export function pronReader(inv: Inventory): PronReader {
  let r = readers.get(inv);
  if (r === undefined) {
    r = new PronReader(inv);
    readers.set(inv, r);
  }
  return r;
}
