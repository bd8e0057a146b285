// Sample entries for a build's report: the entries whose narrow forms differ across the varieties
// built, so the few lines `strata build` prints show what tells the varieties apart.

/** One variety's narrow forms by entry key (the TSV's key column), in lexicon order. */
export interface VarietyTable {
  readonly variety: string;
  readonly entries: ReadonlyMap<string, { readonly word: string; readonly narrow: string }>;
}

export interface DifferingSample {
  readonly key: string;
  readonly word: string;
  /** Narrow form per variety, in the order of the tables given (absent: the entry was rejected there). */
  readonly narrow: readonly (string | undefined)[];
}

export interface DifferingSamples {
  /** Entries whose narrow forms are not all equal (over the entries every variety wrote). */
  readonly differing: number;
  /** Entries every variety wrote. */
  readonly compared: number;
  readonly samples: readonly DifferingSample[];
}

/**
 * Up to `n` entries whose narrow forms differ across the tables, covering every kind of difference:
 * entries are grouped by which varieties agree with which (the pattern: for each variety, the first
 * variety with the same form), the groups taken in turn (more distinct forms first, then larger
 * groups), and within a group the entries spread evenly over the lexicon's order. Deterministic.
 */
export function differingSamples(tables: readonly VarietyTable[], n: number): DifferingSamples {
  const first = tables[0];
  if (first === undefined || tables.length < 2) return { differing: 0, compared: 0, samples: [] };
  const groups = new Map<string, { distinct: number; entries: DifferingSample[] }>();
  let compared = 0;
  let differing = 0;
  for (const [key, e] of first.entries) {
    const narrow = tables.map((t) => t.entries.get(key)?.narrow);
    if (narrow.some((x) => x === undefined)) continue;
    compared++;
    const distinct = new Set(narrow).size;
    if (distinct < 2) continue;
    differing++;
    const pattern = narrow.map((x) => narrow.indexOf(x)).join(",");
    const g = groups.get(pattern) ?? { distinct, entries: [] };
    g.entries.push({ key, word: e.word, narrow });
    groups.set(pattern, g);
  }
  const order = [...groups.entries()].sort(([pa, a], [pb, b]) => b.distinct - a.distinct || b.entries.length - a.entries.length || (pa < pb ? -1 : 1)).map(([, g]) => g.entries);
  // How many each group gives: one each in turn until n are taken or the groups run out.
  const take = order.map(() => 0);
  for (let left = Math.min(n, differing), i = 0; left > 0; i = (i + 1) % order.length) {
    if (take[i]! < order[i]!.length) {
      take[i]!++;
      left--;
    }
  }
  const samples = order.flatMap((list, g) => Array.from({ length: take[g]! }, (_, i) => list[Math.floor((i * list.length) / take[g]!)]!));
  return { differing, compared, samples };
}

/** Reads a variety's written lexicon.tsv (header, then key, word, narrow, … by the header's names). */
export function narrowTable(variety: string, tsv: string): VarietyTable {
  const lines = tsv.split("\n");
  const header = lines[0]!.split("\t");
  const col = (name: string, fallback: number): number => (header.indexOf(name) >= 0 ? header.indexOf(name) : fallback);
  const [ik, iw, inarrow] = [col("key", 0), col("word", 1), col("narrow", 2)];
  const entries = new Map<string, { word: string; narrow: string }>();
  for (const line of lines.slice(1)) {
    if (line === "") continue;
    const f = line.split("\t");
    entries.set(f[ik] ?? "", { word: f[iw] ?? "", narrow: f[inarrow] ?? "" });
  }
  return { variety, entries };
}
