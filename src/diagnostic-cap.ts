// A cap on how many diagnostics one file contributes: a file with thousands of problems shows the
// first ones and one more diagnostic counting the rest, so rendering stays small and fast.

import { diagnostic, type Diagnostic } from "./diagnostics.js";
import { grouped } from "./counts.js";

/** Default most diagnostics kept per file. */
export const MAX_DIAGNOSTICS_PER_FILE = 100;

const plural = (n: number, one: string, many: string): string => `${grouped(n)} more ${n === 1 ? one : many}`;

/**
 * Keeps the first `max` diagnostics of each file (in their order) and, for a file that had more,
 * adds one diagnostic with `code` at the first one left out, counting them. Order is kept: the
 * count takes the place of the first diagnostic it stands for.
 */
export function capPerFile(ds: readonly Diagnostic[], code: string, max = MAX_DIAGNOSTICS_PER_FILE): Diagnostic[] {
  const seen = new Map<string, number>();
  const dropped = new Map<string, { first: Diagnostic; errors: number; warnings: number; after: number }>();
  const out: Diagnostic[] = [];
  for (const d of ds) {
    const n = seen.get(d.file) ?? 0;
    seen.set(d.file, n + 1);
    if (n < max) {
      out.push(d);
      continue;
    }
    const x = dropped.get(d.file);
    if (x === undefined) dropped.set(d.file, { first: d, errors: d.severity === "error" ? 1 : 0, warnings: d.severity === "error" ? 0 : 1, after: out.length });
    else if (d.severity === "error") x.errors++;
    else x.warnings++;
  }
  if (dropped.size === 0) return out;
  const inserts = [...dropped.values()].sort((a, b) => b.after - a.after);
  for (const x of inserts) {
    const parts = [x.errors > 0 ? plural(x.errors, "error", "errors") : "", x.warnings > 0 ? plural(x.warnings, "warning", "warnings") : ""].filter((p) => p !== "");
    const summary = diagnostic(
      x.errors > 0 ? "error" : "warning",
      code,
      `${parts.join(" and ")} in this file ${x.errors + x.warnings === 1 ? "is" : "are"} not shown (only the first ${max} ${max === 1 ? "is" : "are"}).`,
      x.first,
    );
    out.splice(x.after, 0, summary);
  }
  return out;
}
