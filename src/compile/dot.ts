// Graphviz DOT for a compiled machine, with arcs labelled in IPA (input:output), parallel arcs
// between two states merged into one edge. Deterministic: states and labels in a fixed order.

import type { Fst } from "../fst/index.js";
import { type Alphabet, symbolText } from "./alphabet.js";

/** DOT escapes for a double-quoted string. */
function quote(s: string): string {
  return `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/\n/g, "\\n")}"`;
}

export interface DotOptions {
  /** Graph title (shown as the graph label). */
  readonly title: string;
  /** Most labels written on one merged edge before the rest is counted (default 12). */
  readonly maxLabels?: number;
}

/** A machine as a DOT digraph: circles for states, double circles for finals, the start marked by an arrow. */
export function machineToDot(f: Fst, alphabet: Alphabet, opts: DotOptions): string {
  const max = opts.maxLabels ?? 12;
  const lines: string[] = [];
  lines.push("digraph strata {");
  lines.push(`  label=${quote(opts.title)};`);
  lines.push("  labelloc=t;");
  lines.push("  rankdir=LR;");
  lines.push('  node [shape=circle, fontname="sans-serif"];');
  lines.push('  edge [fontname="sans-serif"];');
  if (f.numStates > 0) {
    lines.push('  start [shape=point];');
    lines.push(`  start -> q${f.start};`);
  }
  for (let s = 0; s < f.numStates; s++) {
    lines.push(`  q${s} [label="${s}"${f.isFinal(s) ? ", shape=doublecircle" : ""}];`);
  }
  const text = (id: number): string => symbolText(alphabet, id);
  for (let s = 0; s < f.numStates; s++) {
    const byTarget = new Map<number, string[]>();
    const arcs = [...f.arcs(s)].sort((a, b) => a.target - b.target || a.input - b.input || a.output - b.output);
    for (const a of arcs) {
      const l = a.input === a.output ? text(a.input) : `${text(a.input)}:${text(a.output)}`;
      const list = byTarget.get(a.target) ?? [];
      list.push(l);
      byTarget.set(a.target, list);
    }
    for (const [t, labels] of byTarget) {
      const shown = labels.length > max ? [...labels.slice(0, max), `… +${labels.length - max}`] : labels;
      lines.push(`  q${s} -> q${t} [label=${quote(shown.join(" "))}];`);
    }
  }
  lines.push("}");
  return lines.join("\n") + "\n";
}
