// The comparison for people at a terminal: per variety one line of counts, what changed in the
// sources, the blamed rules with counts and a few examples (old → new, differing segments marked),
// failed expectations; coloured only when asked (the CLI decides: terminal and NO_COLOR).

import { createColors } from "picocolors";
import type { Comparison, VarietyComparison } from "./compare.js";
import { diffSegments } from "./segments.js";

export interface TerminalOptions {
  readonly color: boolean;
  /** Examples printed per blamed rule (and for added/removed/input changes). */
  readonly examples: number;
  /** Rules listed per variety. */
  readonly rules?: number;
}

const plural = (n: number, one: string, many = `${one}s`): string => `${n} ${n === 1 ? one : many}`;

/** The comparison as a short report. */
export function formatTerminal(c: Comparison, o: TerminalOptions): string {
  const pc = createColors(o.color);
  const out: string[] = [];
  const mark = (oldForm: string, newForm: string): string => {
    const parts = diffSegments(oldForm, newForm);
    const a = parts.filter((p) => p.kind !== "new").map((p) => (p.kind === "old" ? pc.red(pc.bold(p.text)) : p.text)).join("");
    const b = parts.filter((p) => p.kind !== "old").map((p) => (p.kind === "new" ? pc.green(pc.bold(p.text)) : p.text)).join("");
    return `${a} → ${b}`;
  };
  for (const v of c.varieties) {
    out.push(`${pc.bold(v.name)}: ${counts(v, pc)}`);
    const s = v.sources;
    const what: string[] = [];
    if (s.lexiconChanged) what.push("lexicon");
    for (const f of s.grammarFiles) what.push(`${f.path} (${f.status})`);
    if (s.inventoryChanged) what.push("inventory");
    if (s.compilerChanged) what.push("compiler version");
    if (what.length > 0) out.push(`  changed since the old build: ${what.join(", ")}`);
    if (s.stepsAdded.length > 0) out.push(`  new steps: ${s.stepsAdded.join(", ")}`);
    if (s.stepsRemoved.length > 0) out.push(`  steps removed: ${s.stepsRemoved.join(", ")}`);
    const rules = v.blame.slice(0, o.rules ?? 10);
    if (rules.length > 0) {
      const width = Math.max(4, ...rules.map((r) => r.rule.length));
      out.push(`  ${"rule".padEnd(width)}  changes  how`);
      for (const r of rules) {
        const how = Object.entries(r.how).sort((x, y) => y[1] - x[1]).map(([h, n]) => `${h} ${n}`).join(", ");
        out.push(`  ${pc.cyan(r.rule.padEnd(width))}  ${String(r.count).padStart(7)}  ${how}`);
        const shown = v.changes.filter((ch) => ch.blame?.rule === r.rule).slice(0, o.examples);
        for (const ch of shown) out.push(`      ${ch.word.padEnd(20)} ${mark(ch.old.narrow, ch.new.narrow)}${ch.expected ? "" : pc.yellow("  (unexpected)")}`);
      }
      if (v.blame.length > rules.length) out.push(`  … and ${plural(v.blame.length - rules.length, "more rule")} (see --json)`);
    }
    const input = v.changes.filter((ch) => ch.cause === "input");
    if (input.length > 0) {
      out.push(`  input rows changed: ${input.length}`);
      for (const ch of input.slice(0, o.examples)) out.push(`      ${ch.word.padEnd(20)} ${mark(ch.old.narrow, ch.new.narrow)}`);
    }
    for (const [label, list] of [["added", v.added], ["removed", v.removed]] as const) {
      if (list.length === 0) continue;
      out.push(`  ${label}: ${list.slice(0, o.examples).map((e) => `${e.word} ${e.narrow}`).join(", ")}${list.length > o.examples ? ", …" : ""}`);
    }
    const failed = v.expectations.filter((e) => !e.passed);
    if (v.expectations.length > 0) {
      const line = `  pinned expectations: ${v.expectations.length - failed.length} of ${v.expectations.length} hold`;
      out.push(failed.length > 0 ? pc.red(line) : line);
      for (const f of failed.slice(0, o.examples)) out.push(pc.red(`    pinned.csv:${f.line}: ${f.message}`));
    }
  }
  const verdict = c.unexpected === 0 && c.failedExpectations === 0
    ? pc.green("no unexpected changes, every expectation holds")
    : pc.red(`${plural(c.unexpected, "unexpected change")}, ${plural(c.failedExpectations, "failed expectation")}`);
  out.push(verdict);
  return out.join("\n") + "\n";
}

function counts(v: VarietyComparison, pc: ReturnType<typeof createColors>): string {
  const k = v.counts;
  const causes = (Object.entries(k.byCause) as [string, number][]).filter(([, n]) => n > 0).map(([c, n]) => `${c} ${n}`).join(", ");
  const changed = k.changed > 0 ? pc.yellow(`${k.changed} changed`) : "0 changed";
  return `${k.old} → ${k.new} entries: ${changed}${causes !== "" ? ` (${causes})` : ""}, ${k.added} added, ${k.removed} removed, ${k.unchanged} unchanged`;
}
