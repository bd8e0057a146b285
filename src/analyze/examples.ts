// Real entries that show the analyses: each lexicon entry's preferred form before every step, run
// through the compiled steps one at a time, tested against the change domains — which steps
// apply to some entry (empirical dead steps) and up to N entries per relation found.

import type { LexiconRow } from "../lexicon/read.js";
import { accepts, type Dfa } from "./dfa.js";
import type { Deriver } from "./explain.js";
import type { InteractionReport, RelationKind } from "./interactions.js";

export interface EntryRef {
  readonly word: string;
  readonly pron: string;
  readonly file: string;
  readonly line: number;
}

export interface LexiconEvidence {
  readonly entries: number;
  /** Entries each step changes (preferred derivation), by step index. */
  readonly applied: readonly number[];
  /** Up to `max` entries per pair and relation, keyed "a,b,kind". */
  readonly examples: ReadonlyMap<string, readonly EntryRef[]>;
  /** Entries the compiled grammar could not take (a segment outside its alphabet). */
  readonly skipped: number;
}

export const exampleKey = (a: number, b: number, kind: RelationKind): string => `${a},${b},${kind}`;

/**
 * For each entry: s_k = its preferred form reaching step k. A feeds B on an entry when s_A ∉ D_B
 * and s_{A+1} ∈ D_B; bleeds when s_A ∈ D_B and s_{A+1} ∉ D_B; counterfeeds when s_A ∉ D_A and
 * B(s_A) ∈ D_A; counterbleeds when s_A ∈ D_A and B(s_A) ∉ D_A (B's preferred output). Only the
 * relations the exact analysis found are looked for.
 */
export function lexiconEvidence(report: InteractionReport, deriver: Deriver, rows: readonly LexiconRow[], max: number): LexiconEvidence {
  const n = report.steps.length;
  const domains: readonly (Dfa | null)[] = report.domainDfas;
  const applied = new Array<number>(n).fill(0);
  const examples = new Map<string, EntryRef[]>();
  const wanted: { a: number; b: number; kind: RelationKind }[] = [];
  for (const p of report.pairs) {
    for (const [kind, r] of Object.entries(p.relations) as [RelationKind, (typeof p.relations)[RelationKind]][]) {
      if (r.decided && r.value !== null) wanted.push({ a: p.a, b: p.b, kind });
    }
  }
  let skipped = 0;
  for (const row of rows) {
    const ids = deriver.encode(row.symbols);
    const forms = ids === null ? null : deriver.preferredForms(ids);
    if (forms === null) { skipped++; continue; }
    const inD = (k: number, m: number): boolean => { const d = domains[m]; return d !== null && d !== undefined && accepts(d, forms[k]!); };
    for (let k = 0; k < n; k++) if (inD(k, k)) applied[k]!++;
    const ref: EntryRef = { word: row.word, pron: row.pron, file: row.file, line: row.line };
    for (const w of wanted) {
      const key = exampleKey(w.a, w.b, w.kind);
      const list = examples.get(key) ?? [];
      if (list.length >= max) continue;
      let shows = false;
      if (w.kind === "feeds") shows = !inD(w.a, w.b) && inD(w.a + 1, w.b);
      else if (w.kind === "bleeds") shows = inD(w.a, w.b) && !inD(w.a + 1, w.b);
      else {
        const d = domains[w.a];
        const y = deriver.runPreferred(w.b, forms[w.a]!);
        if (d !== null && d !== undefined && y !== null) {
          const before = accepts(d, forms[w.a]!), after = accepts(d, y);
          shows = w.kind === "counterfeeds" ? !before && after : before && !after;
        }
      }
      if (shows) { list.push(ref); examples.set(key, list); }
    }
  }
  return { entries: rows.length - skipped, applied, examples, skipped };
}
