// Stress hygiene in every run: each entry written is checked by the shared stress checks
// (lint-stress.ts) and counted; the problems go to a report file beside the outputs (stress.csv),
// the counts to summary.json and one line on stderr, and every policy that set an entry's stress
// is named with its count, so stress is never changed silently.

import { csvLine } from "../emit/csv.js";
import { plural } from "../counts.js";
import { countStressProblems, emptyStressCounts, STRESS_CODES, stressFindings, type StressCode, type StressContext } from "./lint-stress.js";
import type { LexiconRow } from "./read.js";

/** The report file's name in a variety's folder, and its columns. */
export const STRESS_REPORT = "stress.csv";
export const STRESS_REPORT_COLUMNS = ["file", "line", "column", "key", "word", "severity", "code", "message"] as const;

/**
 * The policies that set stress, each counted per entry (DEVELOPERS.md, "Stress hygiene"):
 * - `default-stress`: an entry without stress marks, stressed by the grammar's `stress` step;
 * - `weak`: tagged `weak` (a weak form: every vowel unstressed, no default stress);
 * - `weak-forms`, `demote-second-primary`: tagged by `strata import --stress-policy` with the
 *   policy's name, on every entry that policy changed.
 */
export const STRESS_POLICY_NAMES = ["default-stress", "weak", "weak-forms", "demote-second-primary"] as const;
export type StressPolicyName = (typeof STRESS_POLICY_NAMES)[number];

/** What summary.json holds about stress: counts only. */
export interface StressSummary {
  /** Findings per problem code (every code, 0 included). */
  readonly problems: Readonly<Record<StressCode, number>>;
  /** Entries whose stress each policy set (every policy, 0 included). */
  readonly policies: Readonly<Record<StressPolicyName, number>>;
}

/** Stress counts and report lines of a run, in file order: what summary.json and the report hold. */
export class StressCounts {
  protected readonly problems = emptyStressCounts();
  protected readonly policies: Record<StressPolicyName, number> = { "default-stress": 0, weak: 0, "weak-forms": 0, "demote-second-primary": 0 };
  /** The report's records (CSV lines), in file order. */
  protected readonly lines: string[] = [];

  /** Adds the counts and lines of a part of the run checked apart (a chunk), after those already here. */
  absorb(s: StressSummary, lines: readonly string[]): void {
    for (const c of STRESS_CODES) this.problems[c] += s.problems[c];
    for (const p of STRESS_POLICY_NAMES) this.policies[p] += s.policies[p];
    for (const l of lines) this.lines.push(l);
  }

  /** Findings counted without a report line (`StressHygiene` with `report: false`). */
  protected unreported = 0;

  /** Findings in all. */
  get total(): number {
    return this.lines.length + this.unreported;
  }

  summary(): StressSummary {
    return { problems: { ...this.problems }, policies: { ...this.policies } };
  }

  /** The report file's text: header, then one record per finding in file order. */
  *report(): Generator<string> {
    yield csvLine([...STRESS_REPORT_COLUMNS]);
    yield* this.lines;
  }
}

export class StressHygiene extends StressCounts {
  private syllabic: number;
  private stress: number;

  /** `keepLines`: whether the report's lines are kept (default true); without them the findings are only counted. */
  constructor(private readonly ctx: StressContext, private readonly relFile: (file: string) => string = (f) => f, private readonly keepLines = true) {
    super();
    this.syllabic = ctx.inventory.featureIndex.get("syllabic") ?? -1;
    this.stress = ctx.inventory.featureIndex.get("stress") ?? -1;
  }

  /** Checks and counts one entry that is written (its row as read, and its key, or what gives it when a finding needs it). */
  observe(row: LexiconRow, key: string | (() => string)): void {
    if (!this.keepLines) this.unreported += countStressProblems(row, this.ctx, this.problems);
    else for (const f of stressFindings(row, this.ctx)) {
      this.problems[f.code]++;
      this.lines.push(csvLine([this.relFile(f.file), String(f.line), String(f.column), typeof key === "string" ? key : key(), f.word, f.severity, f.code, f.message]));
    }
    const tags = row.tags;
    if (tags.length > 0) {
      if (tags.includes("weak")) this.policies.weak++;
      if (tags.includes("weak-forms")) this.policies["weak-forms"]++;
      if (tags.includes("demote-second-primary")) this.policies["demote-second-primary"]++;
    }
    if (this.ctx.assignsStress && !row.stressMarked && this.syllabic >= 0) {
      for (const s of row.symbols) {
        if (s.kind === "segment" && s.bundle[this.syllabic] === "+" && s.bundle[this.stress] === "0") {
          this.policies["default-stress"]++;
          break;
        }
      }
    }
  }
}


/** The one-line account of a run's stress: problems by code, and the policies that set stress. */
export function stressLine(s: StressSummary, reportName?: string): string {
  const found = STRESS_CODES.filter((c) => s.problems[c] > 0).map((c) => `${c.replace(/^lint\//, "")} ${s.problems[c]}`);
  const total = STRESS_CODES.reduce((k, c) => k + s.problems[c], 0);
  const problems = total === 0 ? "no stress problems" : `${plural(total, "stress problem")} (${found.join(", ")})${reportName !== undefined ? `, see ${reportName}` : ""}`;
  const policies = STRESS_POLICY_NAMES.filter((p) => s.policies[p] > 0).map((p) => `${p} ${s.policies[p]}`);
  return `${problems}; stress set by ${policies.length === 0 ? "the marks alone" : policies.join(", ")}`;
}

/** Total findings of a summary. */
export const stressTotal = (s: StressSummary): number => STRESS_CODES.reduce((k, c) => k + s.problems[c], 0);
