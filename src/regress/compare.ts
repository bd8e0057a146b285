// Comparing two builds, variety by variety: entries matched by key while both JSON Lines files
// stream (they come in the same order when the lexicon is the same; keys out of step wait in a
// small pending map), each change classified by cause and blamed on a step, counts aggregated.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { blameDerivations, blameVariants, StepOrder, type Blame } from "./blame.js";
import { BuildFolderError, entriesFile, openBuild, readEntries, summaryCount, varietyOf, type BuildEntry, type BuildFolder } from "./folder.js";
import { readPinResults, type PinResult } from "./pinned.js";
import { BUILD_RECORD, type VarietyRecord } from "./record.js";
import { join } from "node:path";

/** Why an entry's output changed. */
export type Cause = "input" | "grammar" | "variants";

export interface Side {
  readonly narrow: string;
  readonly variants: readonly string[];
  readonly derivation: BuildEntry["derivation"];
  readonly variantSteps: BuildEntry["variantSteps"];
}

export interface EntryChange {
  readonly key: string;
  readonly word: string;
  readonly cause: Cause;
  readonly old: Side;
  readonly new: Side;
  /** The step blamed (grammar- and variant-caused changes). */
  readonly blame?: Blame;
  /** The change class this change counts in (see `changeClass`). */
  readonly class: string;
  readonly expected: boolean;
}

export interface AddedOrRemoved {
  readonly key: string;
  readonly word: string;
  readonly narrow: string;
}

/** One blamed step: how many changes, how they split by kind, a few example words. */
export interface RuleBlame {
  readonly rule: string;
  readonly count: number;
  readonly how: Readonly<Record<string, number>>;
  readonly examples: readonly string[];
}

/** A change class (what one JUnit test case stands for): added, removed, input, grammar:RULE, variants:RULE. */
export interface ChangeClass {
  readonly class: string;
  readonly count: number;
  readonly expected: boolean;
  readonly examples: readonly string[];
}

export interface SourceDiff {
  readonly lexiconChanged: boolean;
  readonly grammarFiles: readonly { readonly path: string; readonly status: "changed" | "added" | "removed" }[];
  readonly inventoryChanged: boolean;
  readonly compilerChanged: boolean;
  readonly stepsAdded: readonly string[];
  readonly stepsRemoved: readonly string[];
}

export interface VarietyComparison {
  readonly name: string;
  readonly counts: {
    readonly old: number; readonly new: number;
    readonly added: number; readonly removed: number; readonly unchanged: number; readonly changed: number;
    readonly byCause: Readonly<Record<Cause, number>>;
  };
  readonly sources: SourceDiff;
  /** Blamed steps, most changes first (then by name). */
  readonly blame: readonly RuleBlame[];
  readonly classes: readonly ChangeClass[];
  /** Every changed entry, in the new build's order. */
  readonly changes: readonly EntryChange[];
  readonly added: readonly AddedOrRemoved[];
  readonly removed: readonly AddedOrRemoved[];
  /** The new build's pinned expectations for this variety (empty when it checked none). */
  readonly expectations: readonly PinResult[];
  /** Changes not declared expected. */
  readonly unexpected: number;
  readonly failedExpectations: number;
}

export interface Comparison {
  readonly format: 1;
  readonly old: string;
  readonly new: string;
  readonly lexicon: string;
  readonly varieties: readonly VarietyComparison[];
  readonly unexpected: number;
  readonly failedExpectations: number;
}

export interface CompareOptions {
  /** Only this variety (it must be in both builds). */
  readonly variety?: string;
  /**
   * Change classes declared intended: rule names (grammar and variant changes blamed on them) and
   * `input` (changes from edited rows, and added or removed entries). Everything else is unexpected.
   */
  readonly expect?: readonly string[];
  /** Example words kept per blamed rule and per change class (default 5). */
  readonly examples?: number;
}

const sameList = (a: readonly string[], b: readonly string[]): boolean => a.length === b.length && a.every((x, i) => x === b[i]);
const sameSet = (a: readonly string[], b: readonly string[]): boolean => sameList([...a].sort(), [...b].sort());

function sameInput(a: BuildEntry, b: BuildEntry): boolean {
  if (a.word !== b.word) return false;
  if (a.input === undefined || b.input === undefined) return a.broad === b.broad;
  return a.input.pron === b.input.pron && a.input.pos === b.input.pos && sameList(a.input.tags, b.input.tags);
}

const side = (e: BuildEntry): Side => ({ narrow: e.narrow, variants: e.variants, derivation: e.derivation, variantSteps: e.variantSteps });

/** Classifies one entry present in both builds: undefined when unchanged. */
export function classify(o: BuildEntry, n: BuildEntry, order: StepOrder): { cause: Cause; blame?: Blame } | undefined {
  if (o.narrow === n.narrow && sameSet(o.variants, n.variants)) return undefined;
  if (!sameInput(o, n)) return { cause: "input" };
  const swapped = o.narrow !== n.narrow && n.variants.includes(o.narrow) && o.variants.includes(n.narrow);
  if (o.narrow === n.narrow || swapped) {
    const b = swapped ? blameDerivations(o.derivation, n.derivation, order) : blameVariants(o, n, order);
    return { cause: "variants", ...(b !== undefined ? { blame: b } : {}) };
  }
  const b = blameDerivations(o.derivation, n.derivation, order);
  return { cause: "grammar", ...(b !== undefined ? { blame: b } : {}) };
}

export const changeClass = (cause: Cause | "added" | "removed", blame?: Blame): string =>
  cause === "grammar" || cause === "variants" ? `${cause}:${blame?.rule ?? "unknown"}` : cause;

function sourceDiff(o: VarietyRecord, n: VarietyRecord, oldB: BuildFolder, newB: BuildFolder): SourceDiff {
  const oldFiles = new Map(o.grammar.files.map((f) => [f.path, f.sha256]));
  const newFiles = new Map(n.grammar.files.map((f) => [f.path, f.sha256]));
  const grammarFiles: SourceDiff["grammarFiles"][number][] = [];
  for (const [p, h] of newFiles) {
    const before = oldFiles.get(p);
    if (before === undefined) grammarFiles.push({ path: p, status: "added" });
    else if (before !== h) grammarFiles.push({ path: p, status: "changed" });
  }
  for (const p of oldFiles.keys()) if (!newFiles.has(p)) grammarFiles.push({ path: p, status: "removed" });
  return {
    lexiconChanged: oldB.record.lexicon.sha256 !== newB.record.lexicon.sha256,
    grammarFiles,
    inventoryChanged: o.inventory.sha256 !== n.inventory.sha256,
    compilerChanged: oldB.record.compiler !== newB.record.compiler,
    stepsAdded: n.steps.filter((s) => !o.steps.includes(s)),
    stepsRemoved: o.steps.filter((s) => !n.steps.includes(s)),
  };
}

/** Counts records while passing them on, and checks the count against summary.json at the end. */
async function* counted(b: BuildFolder, variety: string, tally: { n: number }): AsyncGenerator<BuildEntry> {
  for await (const e of readEntries(b, variety)) {
    tally.n++;
    yield e;
  }
  const stated = summaryCount(b, variety);
  if (stated !== undefined && stated !== tally.n) {
    throw new BuildFolderError(diagnostic("error", "regress/truncated", `The build's summary.json states ${stated} entries but this file holds ${tally.n}: it is truncated or from another build; rebuild it.`, { file: entriesFile(b, variety), line: tally.n + 1, column: 1 }));
  }
}

async function compareVariety(oldB: BuildFolder, newB: BuildFolder, name: string, opts: CompareOptions): Promise<VarietyComparison> {
  const o = varietyOf(oldB, name)!;
  const n = varietyOf(newB, name)!;
  const order = new StepOrder(o.steps, n.steps);
  const expect = new Set(opts.expect ?? []);
  const few = opts.examples ?? 5;
  const changes: EntryChange[] = [];
  const added: AddedOrRemoved[] = [];
  const removed: AddedOrRemoved[] = [];
  let unchanged = 0;
  const oldPending = new Map<string, BuildEntry>();
  const newPending = new Map<string, BuildEntry>();
  const pair = (a: BuildEntry, b: BuildEntry): void => {
    const c = classify(a, b, order);
    if (c === undefined) {
      unchanged++;
      return;
    }
    const cls = changeClass(c.cause, c.blame);
    const expected = c.cause === "input" ? expect.has("input") : c.blame !== undefined && expect.has(c.blame.rule);
    changes.push({ key: b.key, word: b.word, cause: c.cause, old: side(a), new: side(b), ...(c.blame !== undefined ? { blame: c.blame } : {}), class: cls, expected });
  };
  const oldTally = { n: 0 };
  const newTally = { n: 0 };
  const oi = counted(oldB, name, oldTally)[Symbol.asyncIterator]();
  const ni = counted(newB, name, newTally)[Symbol.asyncIterator]();
  for (;;) {
    const [a, b] = await Promise.all([oi.next(), ni.next()]);
    if (a.done && b.done) break;
    const ea = a.done ? undefined : a.value;
    const eb = b.done ? undefined : b.value;
    if (ea !== undefined && eb !== undefined && ea.key === eb.key) {
      pair(ea, eb);
      continue;
    }
    if (ea !== undefined) {
      const match = newPending.get(ea.key);
      if (match !== undefined) {
        newPending.delete(ea.key);
        pair(ea, match);
      } else oldPending.set(ea.key, ea);
    }
    if (eb !== undefined) {
      const match = oldPending.get(eb.key);
      if (match !== undefined) {
        oldPending.delete(eb.key);
        pair(match, eb);
      } else newPending.set(eb.key, eb);
    }
  }
  for (const e of oldPending.values()) removed.push({ key: e.key, word: e.word, narrow: e.narrow });
  for (const e of newPending.values()) added.push({ key: e.key, word: e.word, narrow: e.narrow });

  const byCause: Record<Cause, number> = { input: 0, grammar: 0, variants: 0 };
  const rules = new Map<string, { count: number; how: Record<string, number>; examples: string[] }>();
  const classes = new Map<string, { count: number; expected: boolean; examples: string[] }>();
  const addClass = (cls: string, expected: boolean, word: string): void => {
    const c = classes.get(cls) ?? { count: 0, expected, examples: [] };
    c.count++;
    if (c.examples.length < few) c.examples.push(word);
    classes.set(cls, c);
  };
  for (const c of changes) {
    byCause[c.cause]++;
    addClass(c.class, c.expected, c.word);
    if (c.blame === undefined) continue;
    const r = rules.get(c.blame.rule) ?? { count: 0, how: {}, examples: [] };
    r.count++;
    r.how[c.blame.how] = (r.how[c.blame.how] ?? 0) + 1;
    if (r.examples.length < few) r.examples.push(c.word);
    rules.set(c.blame.rule, r);
  }
  for (const e of added) addClass("added", expect.has("input"), e.word);
  for (const e of removed) addClass("removed", expect.has("input"), e.word);
  const blame = [...rules].map(([rule, r]) => ({ rule, ...r })).sort((x, y) => y.count - x.count || (x.rule < y.rule ? -1 : 1));
  const classList = [...classes].map(([cls, c]) => ({ class: cls, ...c })).sort((x, y) => (x.class < y.class ? -1 : 1));
  const expectations = readPinResults(join(newB.dir, name));
  return {
    name,
    counts: { old: oldTally.n, new: newTally.n, added: added.length, removed: removed.length, unchanged, changed: changes.length, byCause },
    sources: sourceDiff(o, n, oldB, newB),
    blame,
    classes: classList,
    changes,
    added,
    removed,
    expectations,
    unexpected: classList.filter((c) => !c.expected).reduce((k, c) => k + c.count, 0),
    failedExpectations: expectations.filter((e) => !e.passed).length,
  };
}

/**
 * Compares the build in `oldDir` with the one in `newDir`. Problems with either folder (not a
 * build, an older format, another lexicon, other varieties, a missing or truncated file) come back
 * as diagnostics naming the file; nothing is written here.
 */
export async function compareBuilds(oldDir: string, newDir: string, opts: CompareOptions = {}): Promise<{ comparison?: Comparison; diagnostics: Diagnostic[] }> {
  try {
    const oldB = openBuild(oldDir);
    const newB = openBuild(newDir);
    const newFile = join(newB.dir, BUILD_RECORD);
    if (oldB.record.lexicon.name !== newB.record.lexicon.name) {
      return { diagnostics: [diagnostic("error", "regress/other-lexicon", `The two builds are of different lexicon folders ('${oldB.record.lexicon.name}' in ${join(oldB.dir, BUILD_RECORD)}, '${newB.record.lexicon.name}' here); compare builds of one lexicon.`, { file: newFile, line: 1, column: 1 })] };
    }
    const oldNames = oldB.record.varieties.map((v) => v.name);
    const newNames = newB.record.varieties.map((v) => v.name);
    let names: string[];
    if (opts.variety !== undefined) {
      for (const [b, list] of [[oldB, oldNames], [newB, newNames]] as const) {
        if (!list.includes(opts.variety)) {
          return { diagnostics: [diagnostic("error", "regress/no-variety", `The build has no variety '${opts.variety}' (it has ${list.join(", ")}).`, { file: join(b.dir, BUILD_RECORD), line: 1, column: 1 })] };
        }
      }
      names = [opts.variety];
    } else {
      if (!sameList(oldNames, newNames)) {
        return { diagnostics: [diagnostic("error", "regress/other-varieties", `The two builds have different variety lists (${oldNames.join(", ")} in ${join(oldB.dir, BUILD_RECORD)}; ${newNames.join(", ")} here); choose one variety with --variety.`, { file: newFile, line: 1, column: 1 })] };
      }
      names = newNames;
    }
    const varieties: VarietyComparison[] = [];
    for (const name of names) varieties.push(await compareVariety(oldB, newB, name, opts));
    return {
      comparison: {
        format: 1,
        old: oldDir,
        new: newDir,
        lexicon: newB.record.lexicon.name,
        varieties,
        unexpected: varieties.reduce((k, v) => k + v.unexpected, 0),
        failedExpectations: varieties.reduce((k, v) => k + v.failedExpectations, 0),
      },
      diagnostics: [],
    };
  } catch (e) {
    if (e instanceof BuildFolderError) return { diagnostics: [e.diagnostic] };
    throw e;
  }
}
