// The resolved step list of a grammar with where each step came from — written in a base file,
// replaced or adjusted by a variety, added by one — and the base steps left out; as a table or as
// JSON (`strata compile --explain-variety`). Paths are relative to the project root.

import * as path from "node:path";
import type { Grammar } from "./ast.js";
import type { Where } from "./inherit.js";
import type { VarietyOrigins } from "./load.js";

export interface VarietyExplanation {
  readonly grammar: string;
  /** The variety files, main first, down to the plain grammar at the bottom. */
  readonly chain: readonly string[];
  readonly steps: readonly {
    readonly index: number;
    readonly name: string;
    readonly kind: string;
    /** Where it was first written (the base file, or the variety that added it); a new body is at its `replaced` edit. */
    readonly defined: Where;
    /** How it came in: from the plain grammar at the bottom of the chain, or added by a variety. */
    readonly source: "base" | "added";
    readonly edits: readonly { readonly kind: "replaced" | "adjusted"; readonly file: string; readonly line: number }[];
  }[];
  readonly omitted: readonly { readonly name: string; readonly defined: Where; readonly omittedAt: Where }[];
  /** Declarations (classes, onsets, …) the varieties of the chain replaced, added, extended or reduced. */
  readonly declarations: readonly { readonly what: string; readonly how: string; readonly file: string; readonly line: number }[];
}

/** The explanation of a loaded grammar; `v` is `LoadedGrammar.variety`. */
export function explainVariety(g: Grammar, v: VarietyOrigins): VarietyExplanation {
  const rel = (f: string): string => (path.relative(v.root, f) || path.basename(f)).split(path.sep).join("/");
  const where = (w: Where): Where => ({ file: rel(w.file), line: w.line });
  return {
    grammar: rel(g.file),
    chain: v.chain.map(rel),
    steps: g.steps.map((s, i) => {
      const o = v.origins[i]!;
      return {
        index: i + 1,
        name: s.name,
        kind: s.kind === "rule" ? (s.optional ? "rule (optional)" : "rule") : s.kind,
        defined: where(o.defined),
        source: o.added ? "added" : "base",
        edits: o.edits.map((e) => ({ kind: e.kind, ...where(e.at) })),
      };
    }),
    omitted: v.omitted.map((o) => ({ name: o.name, defined: where(o.defined), omittedAt: where(o.omittedAt) })),
    declarations: v.declarations.map((d) => ({ what: d.what, how: d.how, ...where(d.at) })),
  };
}

const place = (w: Where): string => `${w.file}:${w.line}`;

/** The explanation as an aligned table, then the omitted steps and the declarations changed. */
export function varietyReport(e: VarietyExplanation, width: (s: string) => number = (s) => [...s].length): string {
  const rows: string[][] = [["#", "step", "kind", "written at", "how"]];
  for (const s of e.steps) {
    const how = [s.source === "added" ? "added" : "from the base", ...s.edits.map((x) => `${x.kind} at ${place(x)}`)].join("; ");
    rows.push([String(s.index), s.name, s.kind, place(s.defined), how]);
  }
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => width(r[c]!))));
  const line = (r: readonly string[]): string => r.map((cell, c) => (c === 0 ? " ".repeat(widths[c]! - width(cell)) + cell : cell + " ".repeat(widths[c]! - width(cell)))).join("  ").trimEnd();
  const out = [`grammar: ${e.grammar}`, `chain: ${e.chain.join(" → ")}`, "", ...rows.map(line)];
  if (e.omitted.length > 0) {
    out.push("", "omitted:");
    for (const o of e.omitted) out.push(`  ${o.name} (written at ${place(o.defined)}), omitted at ${place(o.omittedAt)}`);
  }
  if (e.declarations.length > 0) {
    out.push("", "declarations:");
    for (const d of e.declarations) out.push(`  ${d.what} ${d.how} at ${d.file}:${d.line}`);
  }
  return out.join("\n") + "\n";
}
