// Stress hygiene of one entry as written: the checks `strata lint` makes and every build and
// transcribe run repeats (one implementation). Read from the reader's symbols (stress already on the
// nuclei), so an entry without a problem costs one pass over its symbols; only an entry with a
// problem is tokenised again, to position the finding at the mark or pronunciation at fault.

import { diagnostic, type Severity } from "../diagnostics.js";
import { tokenise } from "../inventory/index.js";
import type { Bundle, Inventory, PronToken } from "../inventory/types.js";
import type { Diagnostic } from "../diagnostics.js";
import type { LexiconRow } from "./read.js";
import { isCompound } from "./compound.js";

/*
 * The stress problems, by code (DEVELOPERS.md, "Stress hygiene"). Severity as `strata lint` reports
 * them; a build or transcribe run counts every one, and fails on any under --strict.
 *
 *   lint/many-primary      error    more than one primary stress in one word of a phrase, or in a compound
 *   lint/unstressed-entry  error    no stress mark, and the grammar has no `stress` step to assign one
 *   lint/no-primary        warning  stress marks, but only secondary ones
 *   lint/final-secondary   warning  secondary stress on a word's last syllable where it looks weak:
 *                                   the syllable is open, the one before it unstressed, and its vowel
 *                                   reduced or high front (i, ɪ), as in CMU's ability AH0 B IH1 L AH0 T IY2
 *   lint/reduced-default   warning  no stress mark, not tagged weak, and every vowel of a word reduced:
 *                                   the grammar's default stress will stress a reduced vowel (CMU's
 *                                   all-zero function words: the DH AH0, a AH0)
 *
 * "Reduced" is [+syllabic -consonantal -front -back -low -tense] (ə ɚ in lexicons/en-us, not ʌ or ɝ);
 * "high front" is [+syllabic +high +front]. Common practice, no source: in English a weak final
 * syllable carries i, ɪ or a reduced vowel, and function words have weak forms with ə. An inventory
 * without one of these features has no such vowels, and those two checks never fire.
 */
export const STRESS_CODES = ["lint/many-primary", "lint/unstressed-entry", "lint/no-primary", "lint/final-secondary", "lint/reduced-default"] as const;
export type StressCode = (typeof STRESS_CODES)[number];

const SEVERITY: Readonly<Record<StressCode, Severity>> = {
  "lint/many-primary": "error",
  "lint/unstressed-entry": "error",
  "lint/no-primary": "warning",
  "lint/final-secondary": "warning",
  "lint/reduced-default": "warning",
};

/** What the stress checks need from a variety, prepared once. */
export interface StressContext {
  readonly inventory: Inventory;
  /** Whether the grammar has a `stress` step (so unmarked entries get default stress). */
  readonly assignsStress: boolean;
}

/** A stress finding: a positioned diagnostic plus the entry's spelling. */
export interface StressFinding extends Diagnostic {
  readonly code: StressCode;
  readonly word: string;
}

/** Feature indices and the vowel classes the checks test, per inventory. */
interface Features {
  readonly syllabic: number;
  readonly stress: number;
  readonly primary: number;
  readonly reduced: (b: Bundle) => boolean;
  readonly highFront: (b: Bundle) => boolean;
}

const featureCache = new WeakMap<Inventory, Features | null>();

function featuresOf(inv: Inventory): Features | null {
  const hit = featureCache.get(inv);
  if (hit !== undefined) return hit;
  const f = (name: string): number => inv.featureIndex.get(name) ?? -1;
  const syllabic = f("syllabic");
  const stress = f("stress");
  const primary = f("primary");
  const has = (spec: readonly [string, "+" | "-"][]): ((b: Bundle) => boolean) => {
    const at = spec.map(([n]) => f(n));
    const want = spec.map(([, v]) => v);
    if (at.some((i) => i < 0)) return () => false;
    // A plain loop: this runs on every nucleus of every entry.
    return (b) => {
      for (let k = 0; k < at.length; k++) if (b[at[k]!] !== want[k]) return false;
      return true;
    };
  };
  const made = syllabic < 0 || stress < 0 || primary < 0 ? null : {
    syllabic, stress, primary,
    reduced: has([["syllabic", "+"], ["consonantal", "-"], ["front", "-"], ["back", "-"], ["low", "-"], ["tense", "-"]]),
    highFront: has([["syllabic", "+"], ["high", "+"], ["front", "+"]]),
  };
  featureCache.set(inv, made);
  return made;
}

/** One problem found on the symbols, before it is positioned. */
interface Problem {
  readonly code: StressCode;
  readonly message: string;
  /** Where: the whole pronunciation, or the n-th primary / the secondary before the last nucleus of word `word`. */
  readonly at: { readonly kind: "whole" } | { readonly kind: "primary"; readonly word: number | "all"; readonly nth: number } | { readonly kind: "last-nucleus"; readonly word: number };
}

const WEAK_TAG = "weak";

/** The problems of one row, read from its symbols (no tokenising). */
function problemsOf(row: LexiconRow, ctx: StressContext, fs: Features): Problem[] {
  const out: Problem[] = [];
  const weak = row.tags.includes(WEAK_TAG);
  // A compound (lexicon/compound.ts) is one stress domain: at most one primary in all its parts.
  const compound = isCompound(row);
  let compoundPrimaries = 0;
  let anyNucleus = false;
  let anyStress = false;
  let anyPrimary = false;
  let anyUnassigned = false;
  let reducedWordFound = false;
  // Per word: nuclei seen, primaries, whether every nucleus is reduced, the last two nuclei and what follows the last.
  let word = 0;
  let nuclei = 0;
  let primaries = 0;
  let allReduced = true;
  let last: Bundle | undefined;
  let beforeLast: Bundle | undefined;
  let consonantAfterLast = false;
  // One pass and one step past the end, which ends the last word as a word boundary ends the others.
  // The word's end is written out here, not as a closure over the loop's variables (V8 keeps the
  // variables a closure captures in a heap context, from memory; the gain was not measured alone).
  const symbols = row.symbols;
  for (let i = 0; i <= symbols.length; i++) {
    const s = i < symbols.length ? symbols[i]! : undefined;
    if (s !== undefined && s.kind !== "segment" && s.which !== "word") continue;
    if (s === undefined || s.kind !== "segment") {
      if (primaries > 1 && !compound) out.push({ code: "lint/many-primary", message: `${primaries} primary stress marks in one word.`, at: { kind: "primary", word, nth: 1 } });
      compoundPrimaries += primaries;
      if (nuclei > 0 && allReduced && !reducedWordFound && !weak && last![fs.stress] === "0" && ctx.assignsStress) reducedWordFound = true;
      if (nuclei > 1 && last![fs.stress] === "+" && last![fs.primary] === "-" && beforeLast![fs.stress] === "-" && !consonantAfterLast && (fs.reduced(last!) || fs.highFront(last!))) {
        out.push({ code: "lint/final-secondary", message: "secondary stress on the last syllable, which looks weak (open, after an unstressed syllable, with a reduced or high front vowel).", at: { kind: "last-nucleus", word } });
      }
      word++;
      nuclei = 0;
      primaries = 0;
      allReduced = true;
      last = undefined;
      beforeLast = undefined;
      consonantAfterLast = false;
      continue;
    }
    const b = s.bundle;
    if (b[fs.syllabic] !== "+") {
      if (last !== undefined) consonantAfterLast = true;
      continue;
    }
    anyNucleus = true;
    nuclei++;
    beforeLast = last;
    last = b;
    consonantAfterLast = false;
    if (!fs.reduced(b)) allReduced = false;
    const st = b[fs.stress];
    if (st === "+") {
      anyStress = true;
      if (b[fs.primary] === "+") {
        anyPrimary = true;
        primaries++;
      }
    } else if (st === "0") anyUnassigned = true;
  }
  if (compound && compoundPrimaries > 1) out.unshift({ code: "lint/many-primary", message: `${compoundPrimaries} primary stress marks in one compound.`, at: { kind: "primary", word: "all", nth: 1 } });
  if (anyStress && !anyPrimary) out.push({ code: "lint/no-primary", message: "the entry has stress marks but no primary stress (ˈ).", at: { kind: "whole" } });
  if (anyNucleus && anyUnassigned && !ctx.assignsStress) {
    out.push({ code: "lint/unstressed-entry", message: "the entry has no stress mark and the grammar has no 'stress' step to assign one.", at: { kind: "whole" } });
  }
  if (reducedWordFound) {
    out.push({ code: "lint/reduced-default", message: "no stress mark and every vowel of a word is reduced: default stress will stress a reduced vowel (tag the entry weak, or mark its stress).", at: { kind: "whole" } });
  }
  return out;
}

const cpLength = (s: string): number => Array.from(s).length;

/**
 * The stress findings of one row, in column order. `tokens` (the row's pronunciation tokenised with
 * its columns) is used when given; otherwise the pronunciation is tokenised again, only when there is
 * a finding to position.
 */
export function stressFindings(row: LexiconRow, ctx: StressContext, tokens?: readonly PronToken[]): StressFinding[] {
  const fs = featuresOf(ctx.inventory);
  if (fs === null) return [];
  const problems = problemsOf(row, ctx, fs);
  if (problems.length === 0) return [];
  let toks = tokens;
  if (toks === undefined) {
    const t = tokenise(ctx.inventory, row.pron, { file: row.file, line: row.line, column: row.pronColumn });
    toks = t.ok ? t.tokens : [];
  }
  const whole = { column: row.pronColumn, length: cpLength(row.pron) };
  const out = problems.map((p): StressFinding => {
    const where = p.at.kind === "whole" ? whole : markColumn(toks, p.at, fs) ?? whole;
    const extra = p.code === "lint/many-primary" ? firstPrimaryNote(toks, p.at, fs) : "";
    const d = diagnostic(SEVERITY[p.code], p.code, `'${row.word}': ${p.message.replace(/\.$/, extra + ".")}`, { file: row.file, line: row.line, column: where.column, length: where.length });
    return { ...d, code: p.code, word: row.word };
  });
  return out.sort((a, b) => a.column - b.column);
}

/**
 * Adds the stress findings of one row to `counts` (by code) without positioning them, and returns how
 * many there were: `stressFindings(row, ctx).length`, its codes counted alike.
 */
export function countStressProblems(row: LexiconRow, ctx: StressContext, counts: Record<StressCode, number>): number {
  const fs = featuresOf(ctx.inventory);
  if (fs === null) return 0;
  const problems = problemsOf(row, ctx, fs);
  for (const p of problems) counts[p.code]++;
  return problems.length;
}

/** The column of the mark a problem points at: the n-th (0-based) primary mark of a word, or the mark before a word's last nucleus. */
function markColumn(tokens: readonly PronToken[], at: Problem["at"], fs: Features): { column: number; length: number } | undefined {
  if (at.kind === "whole") return undefined;
  let word = 0;
  let nth = 0;
  let mark: PronToken | undefined;
  let lastMark: PronToken | undefined;
  for (const t of tokens) {
    if (t.kind === "word") {
      if (word === at.word) break;
      word++;
      continue;
    }
    if (at.word !== "all" && word !== at.word) continue;
    if (t.kind === "stress") {
      mark = t;
      if (at.kind === "primary" && t.level === "primary" && nth++ === at.nth) return { column: t.column, length: 1 };
    } else if (t.kind === "segment" && t.bundle[fs.syllabic] === "+") {
      lastMark = mark;
      mark = undefined;
    }
  }
  return at.kind === "last-nucleus" && lastMark !== undefined ? { column: lastMark.column, length: 1 } : undefined;
}

/** " (the first at column N)" for a many-primary finding, as `strata lint` has always said it. */
function firstPrimaryNote(tokens: readonly PronToken[], at: Problem["at"], fs: Features): string {
  if (at.kind !== "primary") return "";
  const first = markColumn(tokens, { ...at, nth: 0 }, fs);
  return first === undefined ? "" : ` (the first at column ${first.column})`;
}

/** Counts per stress code, every code present (0 included), in STRESS_CODES order. */
export function emptyStressCounts(): Record<StressCode, number> {
  const c = {} as Record<StressCode, number>;
  for (const k of STRESS_CODES) c[k] = 0;
  return c;
}
