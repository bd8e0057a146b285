// The prosodic steps done directly on symbol arrays: syllabification by the Maximal Onset
// Principle within declared onsets and codas, and default stress (fixed or weight-sensitive).

import type { Bundle, FeatureValue, Inventory } from "../inventory/types.js";
import type { Cluster, JoinMode, StressStep } from "../grammar/ast.js";
import { matchAt, EMPTY_BINDINGS } from "./match.js";
import type { Pat } from "./prepare.js";
import { realiseBundle, resolveSymbol, sameSegment } from "./segments.js";
import type { Lint, Sym, Word } from "./types.js";
import { SYLLABLE_EDGE, isJoin, isSegment, isSyllableEdge, isWordEdge } from "./types.js";

/** Legal clusters read into bundles; `null` means the grammar declared none (anything is legal). */
export type ClusterList = readonly (readonly Bundle[])[] | null;

/** Read declared clusters (IPA segments) into bundles; segments the inventory cannot read are listed in `unknown`. */
export function resolveClusters(clusters: readonly Cluster[] | null, inv: Inventory, resolve?: (s: string) => Bundle | null): { list: ClusterList; unknown: { symbol: string; cluster: Cluster }[] } {
  if (clusters === null) return { list: null, unknown: [] };
  const unknown: { symbol: string; cluster: Cluster }[] = [];
  const list: Bundle[][] = [];
  for (const c of clusters) {
    const bs: Bundle[] = [];
    for (const sym of c.segments) {
      const b = resolve !== undefined ? resolve(sym) : resolveSymbol(inv, sym);
      if (b === null) unknown.push({ symbol: sym, cluster: c });
      else bs.push(b);
    }
    if (bs.length === c.segments.length) list.push(bs);
  }
  return { list, unknown };
}

function isNucleus(inv: Inventory, s: Sym): boolean {
  const i = inv.featureIndex.get("syllabic");
  return s.kind === "segment" && i !== undefined && s.bundle[i] === "+";
}

function legal(inv: Inventory, list: ClusterList, cluster: readonly Bundle[]): boolean {
  if (cluster.length === 0 || list === null) return true;
  return list.some((c) => c.length === cluster.length && c.every((b, i) => sameSegment(inv, b, cluster[i] as Bundle)));
}

function clusterText(inv: Inventory, cluster: readonly Bundle[]): string {
  return cluster.map((b) => realiseBundle(inv, b) ?? "?").join("");
}

/**
 * Syllabify every word of a phrase (the stretches between `#`): existing `.` are removed and
 * boundaries re-inserted, so the step can run again after rules that insert or delete segments.
 *
 * Method: Maximal Onset Principle within the language's legal onsets and codas, which carry the
 * Sonority Sequencing Principle (Kahn 1976; Selkirk 1984; Clements 1990). A nucleus is a
 * `[+syllabic]` segment (syllabic consonants and diphthongs written as one segment included);
 * two adjacent nuclei are two syllables. Between two nuclei, the boundary goes where the onset
 * is longest while both the onset and the coda left behind are declared legal (an empty onset or
 * coda is always legal). Morpheme joins `+` inside the cluster act as `joins` says (`through`:
 * not at all; `closed`: the boundary goes at or after the last join, so no onset crosses one;
 * `closed-before-consonant`: the same for the last join that a consonant follows), and a
 * boundary that falls where a join stands goes after the join (`s + . p`). Fallbacks, each
 * reported as a lint naming the cluster, never an error:
 * - no split leaves a legal coda: the longest legal onset is taken anyway (`interp/illegal-coda`);
 * - no consonant of the cluster can start a legal onset: the boundary goes before the last
 *   consonant (`interp/no-legal-split`), or at the join when it must not come earlier;
 * - a word-initial cluster that is not a legal onset stays the onset (`interp/illegal-onset`);
 * - a word-final cluster that is not a legal coda stays the coda (`interp/illegal-coda`);
 * - a word without a nucleus gets no boundaries (`interp/no-nucleus`).
 * `Lint.at` is the index in the returned word where the cluster starts.
 */
export function syllabify(word: Word, onsets: ClusterList, codas: ClusterList, inv: Inventory, joins: JoinMode = "through"): { word: Sym[]; problems: Lint[] } {
  const out: Sym[] = [];
  const problems: Lint[] = [];
  let region: Sym[] = [];
  const flush = (): void => {
    syllabifyRegion(region, onsets, codas, inv, joins, out, problems);
    region = [];
  };
  for (const s of word) {
    if (isSyllableEdge(s)) continue;
    if (isWordEdge(s)) {
      flush();
      out.push(s);
    } else region.push(s);
  }
  flush();
  return { word: out, problems };
}

/**
 * The cut of an inter-nucleus cluster `c` (consonants only): the number of consonants left in the
 * coda, never below `lo` (the position no onset may reach back past), and whether the fallback was
 * taken ("coda": the coda left is not declared; "split": no consonant starts a declared onset).
 * With lo = 0 this is exactly the procedure without joins. The compiler's syllabifier calls it too.
 */
export function cutCluster<T>(c: readonly T[], lo: number, legalOnset: (xs: readonly T[]) => boolean, legalCoda: (xs: readonly T[]) => boolean): { cut: number; fallback?: "coda" | "split" } {
  for (let j = lo; j <= c.length; j++) if (legalOnset(c.slice(j)) && legalCoda(c.slice(0, j))) return { cut: j };
  for (let j = lo; j < c.length; j++) if (legalOnset(c.slice(j))) return { cut: j, fallback: "coda" };
  if (lo >= c.length) return { cut: c.length, fallback: "coda" };
  return { cut: c.length - 1, fallback: "split" };
}

/**
 * The lowest cut the joins allow in a cluster of `length` consonants, given the positions of its
 * joins (a join at k stands before consonant k; k = length: right before the next nucleus).
 */
export function lowestCut(joinsAt: readonly number[], length: number, mode: JoinMode): number {
  let lo = 0;
  for (const k of joinsAt) {
    if (mode === "closed" || (mode === "closed-before-consonant" && k < length)) lo = Math.max(lo, k);
  }
  return lo;
}

function syllabifyRegion(seg: readonly Sym[], onsets: ClusterList, codas: ClusterList, inv: Inventory, joins: JoinMode, out: Sym[], problems: Lint[]): void {
  const base = out.length;
  // The region without its joins (`segs`, indices into `seg`), and where each join stands.
  const segs: number[] = [];
  const joinBefore: number[] = []; // per segment index: joins right before it
  seg.forEach((s, i) => {
    if (isSegment(s)) segs.push(i);
  });
  let k = 0;
  for (let i = 0; i < seg.length; i++) {
    if (isSegment(seg[i] as Sym)) k++;
    else if (isJoin(seg[i] as Sym)) joinBefore.push(k);
  }
  const bundles = segs.map((i) => (seg[i] as { bundle: Bundle }).bundle);
  const nuclei: number[] = [];
  segs.forEach((i, n) => {
    if (isNucleus(inv, seg[i] as Sym)) nuclei.push(n);
  });
  const lint = (code: string, what: string, at: number, cluster: readonly Bundle[]): void => {
    problems.push({ code, message: `${what} '${clusterText(inv, cluster)}'`, at, cluster });
  };
  if (nuclei.length === 0) {
    if (seg.length > 0) lint("interp/no-nucleus", "no syllable nucleus in", base, bundles);
    out.push(...seg);
    return;
  }
  /** Boundary positions in segment indices (a boundary stands before segment b, after any join there). */
  const cuts = new Set<number>();
  /** Where each reported cluster starts, in segment indices, to turn into output indices later. */
  const pending: { code: string; what: string; start: number; cluster: readonly Bundle[] }[] = [];
  const first = nuclei[0] as number;
  const initial = bundles.slice(0, first);
  if (!legal(inv, onsets, initial)) pending.push({ code: "interp/illegal-onset", what: "word-initial cluster is not a declared onset:", start: 0, cluster: initial });
  for (let n = 0; n + 1 < nuclei.length; n++) {
    const from = (nuclei[n] as number) + 1;
    const to = nuclei[n + 1] as number;
    const c = bundles.slice(from, to);
    const inCluster = joinBefore.filter((j) => j >= from && j <= to).map((j) => j - from);
    const lo = lowestCut(inCluster, c.length, joins);
    const r = cutCluster(c, lo, (xs) => legal(inv, onsets, xs), (xs) => legal(inv, codas, xs));
    if (r.fallback === "coda") pending.push({ code: "interp/illegal-coda", what: "no legal split: the coda left by the longest legal onset is not declared:", start: from, cluster: c.slice(0, r.cut) });
    else if (r.fallback === "split") pending.push({ code: "interp/no-legal-split", what: "no consonant of the cluster starts a declared onset; boundary put before its last consonant:", start: from, cluster: c });
    cuts.add(from + r.cut);
  }
  const last = nuclei[nuclei.length - 1] as number;
  const final = bundles.slice(last + 1);
  if (!legal(inv, codas, final)) pending.push({ code: "interp/illegal-coda", what: "word-final cluster is not a declared coda:", start: last + 1, cluster: final });
  // Write the region: a boundary before segment b goes after every join standing before b.
  const outIndexOf: number[] = [];
  let n = 0;
  for (const s of seg) {
    if (isSegment(s)) {
      if (cuts.has(n)) out.push(SYLLABLE_EDGE);
      outIndexOf.push(out.length);
      n++;
    }
    out.push(s);
  }
  for (const p of pending) lint(p.code, p.what, outIndexOf[p.start] ?? out.length, p.cluster);
}

/**
 * Default stress (the grammar's `stress from left|right N [if heavy else M]` step), per word of a
 * phrase. It acts only on words whose nuclei all carry [0stress 0primary]: the chosen nucleus
 * becomes [+stress +primary] and every other nucleus [-stress -primary].
 *
 * Syllables are counted by nuclei. Position N counts from the named edge (1 = the edge syllable);
 * a word with fewer syllables takes the existing syllable nearest to position N (the one at the
 * far edge). Weight-sensitive: syllable N (so clamped) is stressed if heavy, else syllable M
 * (also clamped). A syllable is heavy when one of the `heavy` patterns matches a prefix of its
 * rhyme: the nucleus and what follows it up to the next `.`, `#` or nucleus (so stress should
 * follow `syllabify`; without boundaries every following consonant counts as coda).
 */
export function assignStress(word: Word, step: Pick<StressStep, "edge" | "position" | "otherwise">, heavy: readonly Pat[], inv: Inventory): Sym[] {
  const si = inv.featureIndex.get("stress");
  const pi = inv.featureIndex.get("primary");
  if (si === undefined || pi === undefined) return [...word];
  const out = [...word];
  let start = 0;
  for (let i = 0; i <= word.length; i++) {
    if (i === word.length || isWordEdge(word[i] as Sym)) {
      stressRegion(out, start, i, step, heavy, inv, si, pi);
      start = i + 1;
    }
  }
  return out;
}

function stressRegion(out: Sym[], from: number, to: number, step: Pick<StressStep, "edge" | "position" | "otherwise">, heavy: readonly Pat[], inv: Inventory, si: number, pi: number): void {
  const nuclei: number[] = [];
  for (let i = from; i < to; i++) if (isNucleus(inv, out[i] as Sym)) nuclei.push(i);
  if (nuclei.length === 0) return;
  const unassigned = nuclei.every((i) => {
    const b = (out[i] as { bundle: Bundle }).bundle;
    return b[si] === "0" && b[pi] === "0";
  });
  if (!unassigned) return;
  const count = nuclei.length;
  const index = (pos: number): number => {
    const p = Math.min(Math.max(pos, 1), count);
    return step.edge === "left" ? p - 1 : count - p;
  };
  const isHeavy = (n: number): boolean => {
    const at = nuclei[n] as number;
    let end = at + 1;
    while (end < to && !isSyllableEdge(out[end] as Sym) && !isNucleus(inv, out[end] as Sym)) end++;
    // Joins are not part of a rhyme's shape: `heavy` patterns read the rhyme without them.
    const rhyme = out.slice(at, end).filter((s) => !isJoin(s));
    return heavy.some((h) => !matchAt(inv, h, rhyme, 0, EMPTY_BINDINGS).next().done);
  };
  let chosen = index(step.position);
  if (step.otherwise !== null && !isHeavy(chosen)) chosen = index(step.otherwise);
  nuclei.forEach((at, n) => {
    const b = [...(out[at] as { bundle: Bundle }).bundle] as FeatureValue[];
    const v: FeatureValue = n === chosen ? "+" : "-";
    b[si] = v;
    b[pi] = v;
    out[at] = { kind: "segment", bundle: b };
  });
}
