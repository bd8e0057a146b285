// Deriving legal onsets and codas from a lexicon: the consonant clusters that begin and end its
// words, counted, and written as grammar lines (`onsets = …`, `codas = …`) for a linguist to edit.

import type { Diagnostic } from "../diagnostics.js";
import type { Cluster } from "../grammar/ast.js";
import { tokenise } from "../inventory/index.js";
import type { Bundle, Inventory } from "../inventory/types.js";
import { realiseBundle, resolveClusters, sameSegment } from "../interp/index.js";
import type { Word } from "../interp/index.js";
import { readLexicon } from "./read.js";

/*
 * Method: a word's initial consonants (everything before its first [+syllabic] segment) are a legal
 * onset, its final consonants (everything after its last nucleus) a legal coda — the usual way of
 * finding a language's syllable margins from its words (Kahn 1976; Selkirk 1984: the word edge
 * shows the margins a syllable edge allows). Each word of a phrase counts on its own. Words
 * without a nucleus show no margins and are counted as skipped. Empty margins are not clusters.
 */

/** One derived cluster. */
export interface ClusterCount {
  /** The cluster's segments in narrow IPA, one string per segment. */
  readonly segments: readonly string[];
  /** The segments written together, as in a grammar's `onsets =` line. */
  readonly text: string;
  readonly count: number;
  /** Whether the grammar the inventory came from declares it already (undefined: no declared list to compare with). */
  readonly declared?: boolean;
  /**
   * False when the joined text reads back as different segments (e.g. t + ʃ written `tʃ` is the
   * affricate): such a cluster cannot be pasted into a grammar line and is left out of it.
   */
  readonly writable: boolean;
}

export interface DerivedClusters {
  /** Sorted by count (highest first), then by text in code-point order. */
  readonly onsets: readonly ClusterCount[];
  readonly codas: readonly ClusterCount[];
  /** Words looked at (each word of a phrase counts). */
  readonly words: number;
  /** Words without a nucleus (no margins to read). */
  readonly skipped: number;
}

/** Counts clusters as words arrive; `result()` sorts them. */
export class ClusterCounter {
  private readonly onsets = new Map<string, { segments: string[]; bundles: Bundle[]; count: number }>();
  private readonly codas = new Map<string, { segments: string[]; bundles: Bundle[]; count: number }>();
  private words = 0;
  private skipped = 0;
  private readonly syllabic: number | undefined;

  constructor(private readonly inv: Inventory) {
    this.syllabic = inv.featureIndex.get("syllabic");
  }

  /** Adds one entry's symbols (a word, or a phrase with `#` between words; `.` ignored). */
  add(symbols: Word): void {
    let word: Bundle[] = [];
    for (const s of symbols) {
      if (s.kind === "boundary") {
        if (s.which === "word") {
          this.addWord(word);
          word = [];
        }
        continue;
      }
      word.push(s.bundle);
    }
    this.addWord(word);
  }

  private addWord(word: readonly Bundle[]): void {
    if (word.length === 0) return;
    this.words++;
    const nucleus = (b: Bundle): boolean => this.syllabic !== undefined && b[this.syllabic] === "+";
    const first = word.findIndex(nucleus);
    if (first < 0) {
      this.skipped++;
      return;
    }
    let last = word.length - 1;
    while (!nucleus(word[last]!)) last--;
    this.count(this.onsets, word.slice(0, first));
    this.count(this.codas, word.slice(last + 1));
  }

  private count(into: Map<string, { segments: string[]; bundles: Bundle[]; count: number }>, cluster: readonly Bundle[]): void {
    if (cluster.length === 0) return;
    const segments = cluster.map((b) => realiseBundle(this.inv, b) ?? "?");
    const key = segments.join(" ");
    const hit = into.get(key);
    if (hit !== undefined) hit.count++;
    else into.set(key, { segments, bundles: [...cluster], count: 1 });
  }

  /** The counts, sorted; `declared` compares with a grammar's lists when given (null lists: nothing declared). */
  result(declared?: { readonly onsets: readonly Cluster[] | null; readonly codas: readonly Cluster[] | null }): DerivedClusters {
    const onsetList = declared !== undefined ? resolveClusters(declared.onsets, this.inv).list : undefined;
    const codaList = declared !== undefined ? resolveClusters(declared.codas, this.inv).list : undefined;
    return {
      onsets: this.sorted(this.onsets, onsetList),
      codas: this.sorted(this.codas, codaList),
      words: this.words,
      skipped: this.skipped,
    };
  }

  private sorted(m: Map<string, { segments: string[]; bundles: Bundle[]; count: number }>, list: readonly (readonly Bundle[])[] | null | undefined): ClusterCount[] {
    const out: ClusterCount[] = [];
    for (const v of m.values()) {
      const text = v.segments.join("");
      const back = tokenise(this.inv, text);
      const writable =
        back.ok &&
        back.tokens.length === v.bundles.length &&
        back.tokens.every((t, i) => t.kind === "segment" && sameSegment(this.inv, t.bundle, v.bundles[i]!));
      const c: ClusterCount = { segments: v.segments, text, count: v.count, writable };
      out.push(list === undefined || list === null ? c : { ...c, declared: list.some((d) => d.length === v.bundles.length && d.every((b, i) => sameSegment(this.inv, b, v.bundles[i]!))) });
    }
    // Code-point order (not locale order) keeps the output byte-stable; the segment split breaks ties of equal text.
    const cmp = (x: string, y: string): number => (x < y ? -1 : x > y ? 1 : 0);
    return out.sort((a, b) => b.count - a.count || cmp(a.text, b.text) || cmp(a.segments.join(" "), b.segments.join(" ")));
  }
}

/** Reads a lexicon CSV (path or stream) and counts its word-initial and word-final clusters; rejected rows are counted, not read. */
export async function deriveClusters(
  source: string | NodeJS.ReadableStream,
  inv: Inventory,
  opts: { readonly file?: string } = {},
): Promise<{ counter: ClusterCounter; rows: number; rejects: number; diagnostics: readonly Diagnostic[] }> {
  const reader = readLexicon(source, { inventory: inv, ...(opts.file !== undefined ? { file: opts.file } : {}) });
  const counter = new ClusterCounter(inv);
  for await (const item of reader) if (item.kind === "row") counter.add(item.symbols);
  return { counter, rows: reader.stats.rows, rejects: reader.stats.rejects, diagnostics: reader.diagnostics };
}

/** Keeps clusters seen at least `min` times. */
export const atLeast = (cs: readonly ClusterCount[], min: number): ClusterCount[] => cs.filter((c) => c.count >= min);

/** `name = a b c …` wrapped before `width` columns, continuation lines indented under the first cluster. */
export function grammarLine(name: "onsets" | "codas", clusters: readonly string[], width = 96): string {
  const head = `${name} = `;
  const indent = " ".repeat(head.length);
  const lines: string[] = [];
  let cur = head;
  let empty = true;
  for (const c of clusters) {
    if (!empty && cur.length + 1 + c.length > width) {
      lines.push(cur);
      cur = indent + c;
    } else {
      cur += (empty ? "" : " ") + c;
    }
    empty = false;
  }
  lines.push(cur);
  return lines.join("\n") + "\n";
}

/** A `--` comment block listing clusters with counts, several to a line. */
export function countsComment(title: string, clusters: readonly ClusterCount[], width = 96): string {
  let s = `-- ${title}\n`;
  let cur = "--  ";
  for (const c of clusters) {
    const mark = c.declared === false ? "*" : "";
    // A cluster that cannot be written joined is shown with its segments apart (t+ʃ).
    const item = `${c.writable ? c.text : c.segments.join("+")}${mark} ${c.count}`;
    if (cur.length > 4 && cur.length + 3 + item.length > width) {
      s += cur + "\n";
      cur = "--  ";
    }
    cur += (cur.length > 4 ? "   " : "") + item;
  }
  if (cur.length > 4) s += cur + "\n";
  return s;
}
