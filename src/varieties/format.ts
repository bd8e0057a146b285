// The comparison of varieties as text: a terminal summary per pair (counts, differing steps, rules
// with counts and examples, mergers and splits), one TSV table of every finding, and JSON.

import stringWidth from "string-width";
import pc from "picocolors";
import type { PairComparison, VarietiesComparison } from "./compare.js";
import type { HomophoneSet } from "./homophones.js";

/** The whole comparison as JSON (what --json prints and comparison.json holds). */
export const varietiesJson = (c: VarietiesComparison): string => JSON.stringify(c, null, 1) + "\n";

const plural = (n: number, one: string, many = `${one}s`): string => `${n.toLocaleString("en-US")} ${n === 1 ? one : many}`;
const pad = (s: string, w: number): string => s + " ".repeat(Math.max(0, w - stringWidth(s)));

/** The TSV table's columns: one row per entry found (a difference, a member of a merger or split set, an entry one variety lacks). */
export const TSV_COLUMNS = ["a", "b", "finding", "set", "key", "word", "broad_a", "narrow_a", "broad_b", "narrow_b", "rules"] as const;

/** Tabs and line ends cannot appear in a TSV field: written as spaces (IPA and words never hold them). */
const field = (s: string): string => s.replace(/[\t\r\n]/g, " ");

/**
 * Every finding of every pair as one TSV table (header first). `finding` is `differs`,
 * `merger` (homophonous in a, told apart in b), `split` (told apart in a, homophonous in b),
 * `only-a` or `only-b`; `set` numbers the merger and split sets of a pair (1, 2, …) so a set's
 * rows can be grouped; `rules` lists the responsible steps, comma-separated.
 */
export function formatTsv(c: VarietiesComparison): string {
  const rows: string[][] = [[...TSV_COLUMNS]];
  for (const p of c.pairs) {
    for (const d of p.differences) rows.push([p.a, p.b, "differs", "", d.key, d.word, d.a.broad, d.a.narrow, d.b.broad, d.b.narrow, d.cause === "input" && d.rules.length === 0 ? "(input)" : d.rules.join(",")]);
    const sets = (kind: "merger" | "split", list: readonly (HomophoneSet & { rules: readonly string[] })[]): void => {
      list.forEach((s, i) => {
        for (const g of s.groups) for (const e of g.entries) {
          const [ba, na, nb] = kind === "merger" ? [e.broad, e.merged, e.distinct] : [e.broad, e.distinct, e.merged];
          rows.push([p.a, p.b, kind, String(i + 1), e.key, e.word, ba, na, ba, nb, s.rules.join(",")]);
        }
      });
    };
    sets("merger", p.mergers);
    sets("split", p.splits);
    for (const e of p.onlyA) rows.push([p.a, p.b, "only-a", "", e.key, e.word, "", e.narrow, "", "", ""]);
    for (const e of p.onlyB) rows.push([p.a, p.b, "only-b", "", e.key, e.word, "", "", "", e.narrow, ""]);
  }
  return rows.map((r) => r.map(field).join("\t") + "\n").join("");
}

/** A homophone set on one line: the shared form, then each group as `word narrow` in the other variety. */
function setLine(s: HomophoneSet & { rules: readonly string[] }, c: ReturnType<typeof pc.createColors>): string {
  const groups = s.groups.map((g) => g.entries.map((e) => e.word).join(", ") + " " + c.dim(g.entries[0]!.distinct)).join(" | ");
  return `    ${pad(s.form, 14)} ${groups}${s.rules.length > 0 ? c.dim(`  [${s.rules.join(", ")}]`) : ""}`;
}

function pairText(p: PairComparison, o: { color: boolean; examples: number }): string {
  const c = pc.createColors(o.color);
  const out: string[] = [];
  const w = (l: string) => out.push(l);
  w(c.bold(`${p.a} ↔ ${p.b}`) + `: ${plural(p.counts.common, "entry", "entries")} in both, ${p.counts.differ} differ (grammar ${p.counts.byCause.grammar}, input ${p.counts.byCause.input}), ${p.counts.onlyA} only in ${p.a}, ${p.counts.onlyB} only in ${p.b}`);
  const steps = (name: string, list: PairComparison["steps"]["a"]): string => `${name}: ${list.length === 0 ? "none" : list.map((s) => `${s.step} (${s.change.replace("-", " ")})`).join(", ")}`;
  w(`  steps that differ: ${steps(p.a, p.steps.a)}; ${steps(p.b, p.steps.b)}${p.steps.fingerprints ? "" : " (compared by name: the build records no step fingerprints)"}`);
  if (p.steps.inventoryDiffers) w(c.yellow("  the two inventories differ: any step may behave differently"));
  if (p.rules.length > 0) {
    const width = Math.max(...p.rules.map((r) => stringWidth(r.rule)), 4);
    w(`  ${pad("rule", width)}  entries  in         how differs       examples`);
    for (const r of p.rules) {
      const where = r.where === "a" ? p.a : r.where === "b" ? p.b : "both";
      w(`  ${pad(r.rule, width)}  ${String(r.entries).padStart(7)}  ${pad(where, 9)}  ${pad(r.change.replace("only-here", "only here"), 16)}  ${r.examples.slice(0, o.examples).join(", ")}`);
    }
  }
  const sets = (title: string, list: PairComparison["mergers"]): void => {
    w(`  ${title}: ${list.length}`);
    for (const s of list.slice(0, o.examples)) w(setLine(s, c));
    if (list.length > o.examples) w(c.dim(`    … ${list.length - o.examples} more (--json, or -o for every set)`));
  };
  sets(`mergers (homophonous in ${p.a}, told apart in ${p.b})`, p.mergers);
  sets(`splits (told apart in ${p.a}, homophonous in ${p.b})`, p.splits);
  return out.join("\n") + "\n";
}

/** The terminal summary of every pair. */
export function formatTerminal(c: VarietiesComparison, o: { color: boolean; examples: number }): string {
  return `${c.lexicon}: ${c.varieties.join(", ")} (${plural(c.pairs.length, "pair")})\n` + c.pairs.map((p) => pairText(p, o)).join("");
}
