// Graphviz DOT for a compiled machine, with arcs labelled in IPA (input:output), parallel arcs
// between two states merged into one edge. Deterministic: states and labels in a fixed order.

import type { Fst } from "../fst/index.js";
import type { Bundle } from "../inventory/types.js";
import { type Alphabet, FIRST_SEGMENT, symbolText } from "./alphabet.js";

/** DOT escapes for a double-quoted string. */
function quote(s: string): string {
  return `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/\n/g, "\\n")}"`;
}

export interface DotOptions {
  /** Graph title (shown as the graph label). */
  readonly title: string;
  /** Most labels written on one merged edge before the rest is counted (default 12). */
  readonly maxLabels?: number;
  /** Where the prosodic features are, to mark stressed nuclei in labels. */
  readonly prosody?: { readonly stress: number; readonly primary: number; readonly nucleus: (b: Bundle) => boolean };
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
  // Nuclei are told apart by their prosodic features: ˈ primary, ˌ secondary, plain unstressed,
  // a subscript zero for stress not yet assigned (common practice in this project's reports).
  const stressOf = (id: number): string => {
    const seg = alphabet.segments[id - FIRST_SEGMENT];
    if (seg === undefined || opts.prosody === undefined) return "";
    const s = seg.bundle[opts.prosody.stress], p = seg.bundle[opts.prosody.primary];
    if (s === "+") return p === "+" ? "ˈ" : "ˌ";
    return s === "0" && opts.prosody.nucleus(seg.bundle) ? "₀" : "";
  };
  const text = (id: number): string => {
    const t = symbolText(alphabet, id);
    const m = stressOf(id);
    return m === "₀" ? t + m : m + t;
  };
  for (let s = 0; s < f.numStates; s++) {
    const byTarget = new Map<number, string[]>();
    // Rewriting arcs (input ≠ output) first, so a merged edge shows them before the copies.
    const arcs = [...f.arcs(s)].sort((a, b) => a.target - b.target || Number(a.input === a.output) - Number(b.input === b.output) || a.input - b.input || a.output - b.output);
    for (const a of arcs) {
      const l = a.input === a.output ? text(a.input) : `${text(a.input)}:${text(a.output)}`;
      const list = byTarget.get(a.target) ?? [];
      if (!list.includes(l)) list.push(l);
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
