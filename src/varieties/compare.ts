// `strata varieties`: how the varieties of one build differ — per pair, the entries whose narrow form
// differs with the rules responsible and counts per rule, the mergers and splits, and the entries
// only one variety has. Reads the build folder only (build.json, lexicon.jsonl); never recompiles.

import { join } from "node:path";
import { BuildFolderError, openBuild, type BuildFolder } from "../regress/folder.js";
import { BUILD_RECORD } from "../regress/record.js";
import type { Diagnostic } from "../diagnostics.js";
import { diagnostic } from "../diagnostics.js";
import { derivationOf, loadVariety, type VarietyEntries, type VarietyEntry } from "./load.js";
import { homophonesHereOnly, type HomophoneSet } from "./homophones.js";
import { stepDifference, type StepDifference } from "./steps.js";

/** Why two varieties' narrow forms of one entry differ. */
export type DifferenceCause =
  /** The input rows differ (an override row in one variety): the grammars are not to blame alone. */
  | "input"
  /** Same input row; the grammars differ. */
  | "grammar";

export interface EntrySide {
  readonly narrow: string;
  readonly broad: string;
  readonly pron: string;
  readonly file: string;
  readonly derivation: readonly { readonly step: string; readonly form: string }[];
}

export interface EntryDifference {
  readonly key: string;
  readonly word: string;
  readonly cause: DifferenceCause;
  /**
   * The rules responsible: the steps that differ between the two grammars (steps.ts) and that
   * changed the entry in its variety's derivation, first those of `a` then those of `b` (a name
   * once). Empty when none did (the difference then comes from the inventories or the input).
   */
  readonly rules: readonly string[];
  readonly a: EntrySide;
  readonly b: EntrySide;
}

/** One rule's share of a pair's differences. */
export interface RuleCount {
  readonly rule: string;
  /** Entries it is responsible for (an entry may count for several rules). */
  readonly entries: number;
  /** Where the step stands: in the first variety's grammar only, the second's, or both (edited or moved in each). */
  readonly where: "a" | "b" | "both";
  /** How it differs on each side it stands (steps.ts). */
  readonly change: string;
  readonly examples: readonly string[];
}

export interface OnlyEntry {
  readonly key: string;
  readonly word: string;
  readonly narrow: string;
}

export interface PairComparison {
  readonly a: string;
  readonly b: string;
  readonly counts: {
    readonly a: number;
    readonly b: number;
    readonly common: number;
    readonly same: number;
    readonly differ: number;
    readonly byCause: Readonly<Record<DifferenceCause, number>>;
    readonly onlyA: number;
    readonly onlyB: number;
    readonly mergers: number;
    readonly splits: number;
  };
  readonly steps: StepDifference;
  readonly rules: readonly RuleCount[];
  readonly differences: readonly EntryDifference[];
  /** Homophonous in `a`, told apart in `b` (`a` merges what `b` keeps apart). */
  readonly mergers: readonly (HomophoneSet & { readonly rules: readonly string[] })[];
  /** Told apart in `a`, homophonous in `b` (`a` splits what `b` merges). */
  readonly splits: readonly (HomophoneSet & { readonly rules: readonly string[] })[];
  readonly onlyA: readonly OnlyEntry[];
  readonly onlyB: readonly OnlyEntry[];
}

export interface VarietiesComparison {
  readonly lexicon: string;
  /** The build folder as given. */
  readonly build: string;
  readonly varieties: readonly string[];
  readonly pairs: readonly PairComparison[];
}

export interface CompareVarietiesOptions {
  /** Varieties to compare (by name): none, every pair of the build's; one, it against each other; several, every pair of them. */
  readonly varieties?: readonly string[];
  /** Examples kept per rule. */
  readonly examples?: number;
}

const side = (e: VarietyEntry): EntrySide => ({ narrow: e.narrow, broad: e.broad, pron: e.pron, file: e.file, derivation: derivationOf(e) });

/** The pairs to compare: in the order the varieties were named, else in the build's order. */
function pairsOf(all: readonly string[], chosen: readonly string[] | undefined): [string, string][] {
  const pairs: [string, string][] = [];
  if (chosen === undefined || chosen.length === 0 || chosen.length >= 2) {
    const names = chosen === undefined || chosen.length === 0 ? all : chosen.filter((n, i) => chosen.indexOf(n) === i);
    for (let i = 0; i < names.length; i++) for (let j = i + 1; j < names.length; j++) pairs.push([names[i]!, names[j]!]);
  } else {
    for (const n of all) if (n !== chosen[0]) pairs.push([chosen[0]!, n]);
  }
  return pairs;
}

/** Compares two loaded varieties. */
export function comparePair(a: VarietyEntries, b: VarietyEntries, examples = 5): PairComparison {
  const steps = stepDifference(a.record, b.record);
  const diffA = new Map(steps.a.map((s) => [s.step, s.change]));
  const diffB = new Map(steps.b.map((s) => [s.step, s.change]));
  const common: string[] = [];
  const onlyA: OnlyEntry[] = [];
  for (const [k, e] of a.entries) {
    if (b.entries.has(k)) common.push(k);
    else onlyA.push({ key: k, word: e.word, narrow: e.narrow });
  }
  const onlyB: OnlyEntry[] = [];
  for (const [k, e] of b.entries) if (!a.entries.has(k)) onlyB.push({ key: k, word: e.word, narrow: e.narrow });

  /** The differing steps that changed an entry, `a`'s then `b`'s, each name once. */
  const responsible = (ea: VarietyEntry, eb: VarietyEntry): string[] => {
    const out: string[] = [];
    for (const step of ea.steps) if (diffA.has(step) && !out.includes(step)) out.push(step);
    for (const step of eb.steps) if (diffB.has(step) && !out.includes(step)) out.push(step);
    return out;
  };
  const differences: EntryDifference[] = [];
  const perRule = new Map<string, { entries: number; examples: string[] }>();
  const byCause: Record<DifferenceCause, number> = { input: 0, grammar: 0 };
  for (const k of common) {
    const ea = a.entries.get(k)!, eb = b.entries.get(k)!;
    if (ea.narrow === eb.narrow) continue;
    const cause: DifferenceCause = ea.pron !== eb.pron || ea.word !== eb.word ? "input" : "grammar";
    const rules = responsible(ea, eb);
    byCause[cause]++;
    differences.push({ key: k, word: ea.word, cause, rules, a: side(ea), b: side(eb) });
    for (const r of rules.length > 0 ? rules : [cause === "input" ? "(input)" : "(unattributed)"]) {
      const c = perRule.get(r) ?? { entries: 0, examples: [] };
      c.entries++;
      if (c.examples.length < examples) c.examples.push(ea.word);
      perRule.set(r, c);
    }
  }
  const rules: RuleCount[] = [...perRule]
    .map(([rule, c]) => {
      const inA = diffA.get(rule), inB = diffB.get(rule);
      const where = inA !== undefined && inB !== undefined ? "both" : inA !== undefined ? "a" : inB !== undefined ? "b" : "both";
      const change = inA !== undefined && inB !== undefined ? (inA === inB ? inA : `${inA} / ${inB}`) : inA ?? inB ?? (rule === "(input)" ? "override rows" : "no differing step changed these entries");
      return { rule, entries: c.entries, where, change, examples: c.examples } as RuleCount;
    })
    .sort((x, y) => y.entries - x.entries || (x.rule < y.rule ? -1 : x.rule > y.rule ? 1 : 0));

  /** The differing steps that changed any entry of a set, in either variety. */
  const setRules = (s: HomophoneSet): string[] => {
    const out: string[] = [];
    for (const g of s.groups) for (const e of g.entries) for (const r of responsible(a.entries.get(e.key)!, b.entries.get(e.key)!)) if (!out.includes(r)) out.push(r);
    return out;
  };
  const mergers = homophonesHereOnly(common, a.entries, b.entries).map((s) => ({ ...s, rules: setRules(s) }));
  const splits = homophonesHereOnly(common, b.entries, a.entries).map((s) => ({ ...s, rules: setRules(s) }));
  return {
    a: a.record.name,
    b: b.record.name,
    counts: {
      a: a.entries.size, b: b.entries.size, common: common.length, same: common.length - differences.length, differ: differences.length, byCause,
      onlyA: onlyA.length, onlyB: onlyB.length, mergers: mergers.length, splits: splits.length,
    },
    steps,
    rules,
    differences,
    mergers,
    splits,
    onlyA,
    onlyB,
  };
}

/**
 * Opens a build folder and compares its varieties pairwise. Each variety is read once, whatever the
 * number of pairs it is in. Bad input (not a build, an unknown variety, fewer than two varieties, a
 * truncated file) comes back as diagnostics.
 */
export async function compareVarieties(dir: string, o: CompareVarietiesOptions = {}): Promise<{ comparison?: VarietiesComparison; diagnostics: Diagnostic[]; unknown?: string[] }> {
  let build: BuildFolder;
  try {
    build = openBuild(dir);
    const all = build.record.varieties.map((v) => v.name);
    const chosen = o.varieties ?? [];
    const unknown = chosen.filter((n) => !all.includes(n));
    if (unknown.length > 0) {
      return { unknown, diagnostics: unknown.map((n) => diagnostic("error", "varieties/unknown-variety", `The build has no variety '${n}'; its varieties are ${all.join(", ")}.`, { file: join(dir, BUILD_RECORD), line: 1, column: 1 })) };
    }
    const pairs = pairsOf(all, chosen);
    if (pairs.length === 0) {
      return { diagnostics: [diagnostic("error", "varieties/one-variety", `The build holds ${all.length === 1 ? `one variety (${all[0]})` : "no other variety"}: a comparison needs two.`, { file: join(build.dir, BUILD_RECORD), line: 1, column: 1 })] };
    }
    const names = [...new Set(pairs.flat())];
    const loaded = new Map<string, VarietyEntries>();
    for (const n of names) loaded.set(n, await loadVariety(build, build.record.varieties.find((v) => v.name === n)!));
    return {
      comparison: {
        lexicon: build.record.lexicon.name,
        build: dir,
        varieties: names,
        pairs: pairs.map(([x, y]) => comparePair(loaded.get(x)!, loaded.get(y)!, o.examples ?? 5)),
      },
      diagnostics: [],
    };
  } catch (e) {
    if (e instanceof BuildFolderError) return { diagnostics: [e.diagnostic] };
    throw e;
  }
}
