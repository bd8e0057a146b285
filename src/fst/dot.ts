// Graphviz DOT export of a machine, with label names supplied by the caller.

import { EPSILON, type Fst, type Label } from "./fst.js";

export interface FstDotOptions {
  /** Name of a label (ε is passed as 0); default: the number. */
  readonly labelName?: (l: Label) => string;
  /** Graph title, shown as its label. */
  readonly title?: string;
  /** Merge parallel arcs between two states into one edge listing up to this many labels (default 8). */
  readonly mergeLimit?: number;
}

/** A double-quoted DOT string (Graphviz "ID" syntax: backslash and quote escaped). */
const quote = (s: string): string => `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/\n/g, "\\n")}"`;

/**
 * DOT text: states are circles (double circles when final, with "/ output" for a final output),
 * the start state has an arrow from an invisible node, arcs read "in:out" (just "in" when both
 * sides agree). Parallel arcs between two states share one edge. Output is deterministic.
 */
export function toDot(fst: Fst, options: FstDotOptions = {}): string {
  const name = (l: Label): string => (l === EPSILON ? "ε" : options.labelName ? options.labelName(l) : String(l));
  const limit = options.mergeLimit ?? 8;
  const lines = ["digraph fst {", "  rankdir=LR;"];
  if (options.title !== undefined) lines.push(`  label=${quote(options.title)};`, "  labelloc=t;");
  lines.push('  node [shape=circle, fontname="Helvetica"];', '  edge [fontname="Helvetica"];');
  if (fst.numStates > 0) lines.push('  start [shape=point, style=invis];', `  start -> ${fst.start};`);
  for (let s = 0; s < fst.numStates; s++) {
    const f = fst.finalOutput(s);
    if (f === undefined) lines.push(`  ${s} [label=${quote(String(s))}];`);
    else {
      const text = f.length === 0 ? String(s) : `${s} / ${f.map(name).join(" ")}`;
      lines.push(`  ${s} [shape=doublecircle, label=${quote(text)}];`);
    }
  }
  for (let s = 0; s < fst.numStates; s++) {
    const byTarget = new Map<number, string[]>();
    const arcs = fst.arcs(s).slice().sort((a, b) => a.target - b.target || a.input - b.input || a.output - b.output);
    for (const a of arcs) {
      const text = a.input === a.output ? name(a.input) : `${name(a.input)}:${name(a.output)}`;
      const list = byTarget.get(a.target);
      if (list === undefined) byTarget.set(a.target, [text]);
      else list.push(text);
    }
    for (const [t, texts] of byTarget) {
      const shown = texts.length > limit ? [...texts.slice(0, limit), `… ${texts.length - limit} more`] : texts;
      lines.push(`  ${s} -> ${t} [label=${quote(shown.join("\n"))}];`);
    }
  }
  lines.push("}");
  return `${lines.join("\n")}\n`;
}
