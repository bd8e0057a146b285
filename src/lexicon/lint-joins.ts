// The lint hint for likely unmarked joins: a word-internal consonant cluster that the grammar's
// onsets and codas cannot split (the syllabifier's fallback), where a join would let the first part
// end in a declared coda. Compounds and prefixed words written without their join are the usual
// cause (DEVELOPERS.md, "Syllabification and its fallback").

import type { Bundle, Inventory } from "../inventory/types.js";
import { cutCluster, realiseBundle, sameSegment, type ClusterList, type Sym } from "../interp/index.js";

export interface JoinHint {
  /** Ordinal (0-based, among the entry's segments) of the cluster's first segment. */
  readonly segment: number;
  /** Consonants in the cluster. */
  readonly length: number;
  /** The cluster in IPA. */
  readonly cluster: string;
  /** Where a join would go, as the IPA before and after it. */
  readonly before: string;
  readonly after: string;
}

function legal(inv: Inventory, list: ClusterList, cluster: readonly Bundle[]): boolean {
  if (cluster.length === 0 || list === null) return true;
  return list.some((c) => c.length === cluster.length && c.every((b, i) => sameSegment(inv, b, cluster[i]!)));
}

/**
 * Hints for one entry's symbols (as the reader gives them: segments, `.`, `+`, `#`). A cluster
 * between two nuclei of one word with no join inside it gets a hint when no split of it leaves a
 * declared coda and a declared onset (the syllabifier falls back), and some position inside it
 * leaves a declared coda before it: the hint names the position after the longest such coda (where a
 * compound's `#` or a prefix's `+` most likely belongs). Method: common practice, no source (a phonotactic
 * misfit inside a word is the usual sign of a morpheme boundary the transcription does not mark).
 */
export function joinHints(symbols: readonly Sym[], inv: Inventory, onsets: ClusterList, codas: ClusterList): JoinHint[] {
  const syl = inv.featureIndex.get("syllabic");
  if (syl === undefined || onsets === null) return [];
  const out: JoinHint[] = [];
  let ordinal = 0; // segments seen so far
  let cluster: Bundle[] = [];
  let clusterStart = 0;
  let afterNucleus = false;
  let joined = false;
  const text = (bs: readonly Bundle[]): string => bs.map((b) => realiseBundle(inv, b) ?? "?").join("");
  for (const s of symbols) {
    if (s.kind === "boundary") {
      if (s.which === "word") { afterNucleus = false; cluster = []; }
      if (s.which === "join") joined = true;
      continue;
    }
    const nucleus = s.bundle[syl] === "+";
    if (!nucleus) {
      if (cluster.length === 0) clusterStart = ordinal;
      cluster.push(s.bundle);
    } else {
      if (afterNucleus && !joined && cluster.length > 1) {
        const r = cutCluster(cluster, 0, (xs) => legal(inv, onsets, xs), (xs) => legal(inv, codas, xs));
        if (r.fallback !== undefined) {
          let k = -1;
          for (let j = cluster.length - 1; j >= 1 && k < 0; j--) if (legal(inv, codas, cluster.slice(0, j))) k = j;
          if (k > 0) out.push({ segment: clusterStart, length: cluster.length, cluster: text(cluster), before: text(cluster.slice(0, k)), after: text(cluster.slice(k)) });
        }
      }
      afterNucleus = true;
      joined = false;
      cluster = [];
    }
    ordinal++;
  }
  return out;
}
