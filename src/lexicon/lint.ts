// Lexicon lint: per-row findings about entries as written (syllabification under the grammar's
// onsets and codas, stress marks, reader rejects), positioned at the cluster or mark at fault.

import { diagnostic } from "../diagnostics.js";
import type { Diagnostic, Severity } from "../diagnostics.js";
import type { Grammar, JoinMode } from "../grammar/ast.js";
import { isCompound } from "./compound.js";
import { joinHints } from "./lint-joins.js";
import { tokenise } from "../inventory/index.js";
import type { Inventory, PronToken } from "../inventory/types.js";
import { realiseBundle, resolveClusters, syllabify } from "../interp/index.js";
import type { ClusterList, Sym } from "../interp/index.js";
import { readLexicon, rejectDiagnostic } from "./read.js";
import type { LexiconRow, RejectedRow } from "./read.js";
import { stressFindings, type StressContext } from "./lint-stress.js";

/*
 * Codes and severities. An error means the entry cannot come out right (it is dropped, or its
 * stress is contradictory or missing altogether); a warning means the pipeline applies a documented
 * fallback (DEVELOPERS.md, "Syllabification and its fallback") and the entry deserves a look.
 *
 *   (reader reject codes)   error    the reader could not read the row (lexicon/…, ipa/…)
 *   lint/no-nucleus         error    a word (of a phrase) has no [+syllabic] segment
 *   lint/many-primary, lint/unstressed-entry, lint/no-primary, lint/final-secondary,
 *   lint/reduced-default    the stress checks (lint-stress.ts, shared with build and transcribe)
 *   interp/illegal-onset    warning  word-initial cluster not a declared onset     (the syllabify step's own codes)
 *   interp/illegal-coda     warning  final cluster, or the coda every split leaves, not a declared coda
 *   interp/no-legal-split   warning  no consonant of a medial cluster starts a declared onset
 *   lint/unmarked-join      hint     a word-internal cluster no split makes legal, where a join ('#' or '+') likely belongs (lint-joins.ts)
 *
 * The syllabify step's `interp/no-nucleus` is reported as `lint/no-nucleus` (one code per fact).
 */

/** One finding: a positioned diagnostic plus the entry's spelling and, for clusters, the cluster in IPA. */
export interface LintFinding extends Diagnostic {
  /** The row's word (absent for rejects, whose word may be unreadable, and file-level findings). */
  readonly word?: string;
  /** The consonant cluster at fault, in IPA, for syllabification findings. */
  readonly cluster?: string;
}

/** What linting needs from a grammar, prepared once. */
export interface LintContext extends StressContext {
  readonly onsets: ClusterList;
  readonly codas: ClusterList;
  /** How syllabification treats a morpheme join (the grammar's `joins`; absent: through). */
  readonly joins?: JoinMode;
  /** Whether the grammar has a `stress` step (so unmarked entries get default stress). */
  readonly assignsStress: boolean;
}

/** Prepares a grammar's onsets and codas for linting (declared symbols the inventory cannot read are left out; the grammar checker reports them). */
export function lintContext(grammar: Grammar, inventory: Inventory): LintContext {
  return {
    inventory,
    onsets: resolveClusters(grammar.onsets, inventory).list,
    codas: resolveClusters(grammar.codas, inventory).list,
    ...(grammar.joins !== undefined ? { joins: grammar.joins } : {}),
    assignsStress: grammar.steps.some((s) => s.kind === "stress"),
  };
}

const SYLLABIFY_SEVERITY: Readonly<Record<string, Severity>> = {
  "interp/illegal-onset": "warning",
  "interp/illegal-coda": "warning",
  "interp/no-legal-split": "warning",
};

const cpLength = (s: string): number => Array.from(s).length;

/**
 * Findings for one row read by the reader. Positions: the row's line; the column of the pronunciation
 * field plus the offset of the segment or mark at fault (exact for unquoted fields and for quoted
 * fields without `""`, which no readable pronunciation contains), and a length spanning the cluster.
 */
export function lintRow(row: LexiconRow, ctx: LintContext): LintFinding[] {
  const inv = ctx.inventory;
  const out: LintFinding[] = [];
  const at = (severity: Severity, code: string, message: string, column: number, length: number, cluster?: string): void => {
    const d = diagnostic(severity, code, `'${row.word}': ${message}`, { file: row.file, line: row.line, column, length: Math.max(1, length) });
    out.push(cluster === undefined ? { ...d, word: row.word } : { ...d, word: row.word, cluster });
  };
  // The reader tokenised this pronunciation already; tokenising again gives every token's column.
  const t = tokenise(inv, row.pron, { file: row.file, line: row.line, column: row.pronColumn });
  const tokens: readonly PronToken[] = t.ok ? t.tokens : [];
  const segTokens = tokens.filter((x): x is Extract<PronToken, { kind: "segment" }> => x.kind === "segment");
  const wholePron = { column: row.pronColumn, length: cpLength(row.pron) };

  // Stress (lint-stress.ts: the same checks every build and transcribe run makes).
  out.push(...stressFindings(row, ctx, tokens));

  // Syllabification under the declared onsets and codas, on the entry as written.
  const syl = syllabify(row.symbols, ctx.onsets, ctx.codas, inv, ctx.joins);
  for (const p of syl.problems) {
    // `p.at` indexes the syllabified word; the segments before it say which token starts the cluster.
    const ordinal = countSegments(syl.word, p.at);
    const first = segTokens[ordinal];
    const last = segTokens[ordinal + Math.max(0, p.cluster.length - 1)];
    const column = first?.column ?? wholePron.column;
    const length = first !== undefined && last !== undefined ? last.column + cpLength(last.text) - first.column : wholePron.length;
    const cluster = p.cluster.map((b) => realiseBundle(inv, b) ?? "?").join("");
    if (p.code === "interp/no-nucleus") {
      at("error", "lint/no-nucleus", `no syllable nucleus (vowel or syllabic consonant) in '${cluster}'.`, column, length, cluster);
    } else {
      at(SYLLABIFY_SEVERITY[p.code] ?? "warning", p.code, `${p.message}.`, column, length, cluster);
    }
  }
  for (const h of joinHints(row.symbols, inv, ctx.onsets, ctx.codas)) {
    const first = segTokens[h.segment];
    const last = segTokens[h.segment + h.length - 1];
    const column = first?.column ?? wholePron.column;
    const length = first !== undefined && last !== undefined ? last.column + cpLength(last.text) - first.column : wholePron.length;
    at("hint", "lint/unmarked-join", `no legal split of '${h.cluster}' inside one word: if the word is a compound or has a prefix, mark the join ('${h.before}#${h.after}' or '${h.before}+${h.after}').`, column, length, h.cluster);
  }
  return out.sort((a, b) => a.column - b.column);
}

function countSegments(word: readonly Sym[], upTo: number): number {
  let n = 0;
  for (let i = 0; i < upTo && i < word.length; i++) if (word[i]!.kind === "segment") n++;
  return n;
}

/** A reader reject as a finding. */
export const rejectFinding = (r: RejectedRow): LintFinding => rejectDiagnostic(r);

/** The result of linting a whole lexicon. */
export interface LintReport {
  readonly file: string;
  /** Every finding, in line then column order (file-level ones first). */
  readonly findings: readonly LintFinding[];
  /** Findings per code, sorted by code. */
  readonly counts: Readonly<Record<string, number>>;
  /** Data rows read (readable rows + rejects). */
  readonly rows: number;
  readonly rejects: number;
  /** Rows (readable or not) with at least one finding. */
  readonly rowsWithFindings: number;
  readonly errors: number;
  readonly warnings: number;
  /** Suggestions (lint/unmarked-join); they never fail a run. */
  readonly hints: number;
  /** Set when the file could not be read at all (unreadable, no header, missing column): nothing was linted. */
  readonly fatal: boolean;
}

/**
 * Lints a lexicon CSV (path or stream) row by row against a grammar's syllable constraints.
 * Streams: memory grows with the number of findings, not of rows.
 */
export async function lintLexicon(source: string | NodeJS.ReadableStream, ctx: LintContext, opts: { readonly file?: string } = {}): Promise<LintReport> {
  const reader = readLexicon(source, { inventory: ctx.inventory, ...(opts.file !== undefined ? { file: opts.file } : {}) });
  const findings: LintFinding[] = [];
  let rowsWithFindings = 0;
  for await (const item of reader) {
    const fs = item.kind === "row" ? lintRow(item, ctx) : [rejectFinding(item)];
    if (fs.length > 0) rowsWithFindings++;
    findings.push(...fs);
  }
  const fileLevel: LintFinding[] = [...reader.diagnostics];
  const all = [...fileLevel, ...findings];
  const counts: Record<string, number> = {};
  for (const f of all) counts[f.code] = (counts[f.code] ?? 0) + 1;
  const sortedCounts: Record<string, number> = {};
  for (const k of Object.keys(counts).sort()) sortedCounts[k] = counts[k]!;
  return {
    file: typeof source === "string" ? source : (opts.file ?? "<stdin>"),
    findings: all,
    counts: sortedCounts,
    rows: reader.stats.rows + reader.stats.rejects,
    rejects: reader.stats.rejects,
    rowsWithFindings,
    errors: all.filter((f) => f.severity === "error").length,
    warnings: all.filter((f) => f.severity === "warning").length,
    hints: all.filter((f) => f.severity === "hint").length,
    fatal: reader.diagnostics.some((d) => d.severity === "error"),
  };
}
