// The interaction report as a terminal table, as JSON and as a Graphviz DOT graph of the
// interaction network (steps as nodes in grammar order, relations as labelled edges).

import type { LexiconEvidence } from "./examples.js";
import { exampleKey } from "./examples.js";
import { RELATIONS, type Decided, type InteractionReport, type RelationKind, type Witness } from "./interactions.js";
import type { FormWriter } from "./render.js";

/** Kiparsky's (1968) name of the order a relation describes. */
export const ORDER_NAME: Readonly<Record<RelationKind, string>> = {
  feeds: "feeding", bleeds: "bleeding", counterfeeds: "counterfeeding", counterbleeds: "counterbleeding",
};

const form = (w: FormWriter, ids: readonly number[] | null): string => (ids === null ? "?" : w.text(ids));
const under = (w: FormWriter, ids: readonly number[] | null): string => (ids === null ? "" : ` (from /${w.text(ids)}/)`);

/** One line telling what the witness shows. A = earlier step, B = later step. */
export function witnessText(w: FormWriter, kind: RelationKind, A: string, B: string, x: Witness): string {
  const s = (ids: readonly number[]): string => form(w, ids);
  switch (kind) {
    case "feeds": return `${s(x.input)} —${A}→ ${s(x.first)} —${B}→ ${s(x.after)}; ${B} alone leaves ${s(x.input)}`;
    case "bleeds": return `${s(x.input)} —${B}→ ${s(x.directly)}, but ${s(x.input)} —${A}→ ${s(x.first)}, which ${B} leaves`;
    case "counterfeeds": return `swapped: ${s(x.input)} —${B}→ ${s(x.first)} —${A}→ ${s(x.after)}; ${A} alone leaves ${s(x.input)}`;
    case "counterbleeds": return `${s(x.input)} —${A}→ ${s(x.directly)}; swapped, ${s(x.input)} —${B}→ ${s(x.first)}, which ${A} leaves`;
  }
}

const notDecided = (d: Decided<unknown>): string | null => (d.decided ? null : d.reason);

export function interactionTable(r: InteractionReport, w: FormWriter, grammarName: string, ev?: LexiconEvidence): string {
  const names = r.steps.map((s) => s.name);
  const out: string[] = [];
  const n = names.length;
  out.push(`Interactions in ${grammarName}: ${n} steps, ${(n * (n - 1)) / 2} ordered pairs, over the strings that reach each step.`);
  out.push("");
  out.push("Steps (dead: changes no string that reaches it)");
  const width = Math.max(...names.map((x) => x.length)) + 2;
  r.steps.forEach((s, k) => {
    let line = `  ${String(k + 1).padStart(2)}. ${s.name.padEnd(width)}`;
    const a = s.applies;
    if (!a.decided) line += `not decided: ${a.reason}`;
    else if (a.value === null) line += "DEAD";
    else line += `applies, e.g. ${form(w, a.value.input)}${under(w, a.value.source)}`;
    if (ev !== undefined) line += ev.applied[k] === 0 ? `; changes no entry of the lexicon` : `; changes ${ev.applied[k]} of ${ev.entries} entries`;
    out.push(line);
  });
  out.push("");
  out.push("Relations (A before B; the witness is the shortest string reaching A)");
  const rows: string[][] = [];
  const undecided: string[] = [];
  for (const p of r.pairs) {
    const A = names[p.a]!, B = names[p.b]!;
    for (const kind of RELATIONS) {
      const d = p.relations[kind];
      if (!d.decided) { undecided.push(`  ${A} ${kind} ${B}: not decided: ${d.reason}`); continue; }
      if (d.value === null) continue;
      rows.push([A, kind, B, `${witnessText(w, kind, A, B, d.value)}${under(w, d.value.source)}`]);
      const ex = ev?.examples.get(exampleKey(p.a, p.b, kind));
      if (ex !== undefined && ex.length > 0) rows.push(["", "", "", `entries: ${ex.map((e) => `${e.word} (line ${e.line})`).join(", ")}`]);
    }
  }
  if (rows.length === 0) out.push("  none");
  const wa = Math.max(1, ...rows.map((x) => x[0]!.length)) + 2;
  const wk = Math.max(1, ...rows.map((x) => x[1]!.length)) + 2;
  const wb = Math.max(1, ...rows.map((x) => x[2]!.length)) + 2;
  for (const x of rows) out.push(`  ${x[0]!.padEnd(wa)}${x[1]!.padEnd(wk)}${x[2]!.padEnd(wb)}${x[3]}`);
  out.push("");
  out.push("Adjacent steps swapped (commute: no output changes; forced: some output changes)");
  for (const s of r.swaps) {
    const d = s.difference;
    const head = `  ${names[s.a]} ↔ ${names[s.b]}: `;
    if (!d.decided) out.push(`${head}not decided: ${d.reason}`);
    else if (d.value === null) out.push(`${head}commute`);
    else out.push(`${head}forced: ${form(w, d.value.input)} gives ${form(w, d.value.inOrder)} in this order, ${form(w, d.value.swapped)} swapped${under(w, d.value.source)}`);
  }
  if (r.environments.length > 0) {
    out.push("");
    out.push("Environments (shadowed: adds no application beyond the rule's other environments)");
    for (const e of r.environments) {
      const head = `  ${names[e.step]}, environment ${e.environment + 1} (line ${e.line}): `;
      const d = e.adds;
      if (!d.decided) out.push(`${head}not decided: ${d.reason}`);
      else if (d.value === null) out.push(`${head}SHADOWED`);
      else out.push(`${head}needed, e.g. ${form(w, d.value.input)}${under(w, d.value.source)}`);
    }
  }
  if (undecided.length > 0) {
    out.push("");
    out.push("Not decided");
    out.push(...undecided);
  }
  if (ev !== undefined && ev.skipped > 0) out.push("", `${ev.skipped} lexicon entries have segments outside the grammar's alphabet and were left out.`);
  out.push("");
  out.push(`Largest machine built: ${r.largest.states} states (${r.largest.what}).`);
  return out.join("\n") + "\n";
}

function decidedJson<T>(d: Decided<T | null>, f: (v: T) => unknown): unknown {
  return d.decided ? { decided: true, value: d.value === null ? null : f(d.value) } : { decided: false, reason: d.reason };
}

export function interactionJson(r: InteractionReport, w: FormWriter, grammarName: string, ev?: LexiconEvidence): unknown {
  const names = r.steps.map((s) => s.name);
  const t = (ids: readonly number[] | null): string | null => (ids === null ? null : w.text(ids));
  return {
    grammar: grammarName,
    steps: r.steps.map((s, k) => ({
      index: k + 1, name: s.name,
      applies: decidedJson(s.applies, (v) => ({ witness: t(v.input), underlying: t(v.source) })),
      dead: s.applies.decided ? s.applies.value === null : null,
      ...(ev !== undefined ? { lexiconEntriesChanged: ev.applied[k] } : {}),
      reachingStates: s.reachingStates, domainStates: s.domainStates,
    })),
    relations: r.pairs.flatMap((p) => RELATIONS.flatMap((kind) => {
      const d = p.relations[kind];
      if (d.decided && d.value === null) return [];
      return [{
        a: names[p.a], b: names[p.b], relation: kind, order: ORDER_NAME[kind],
        ...(d.decided && d.value !== null ? {
          witness: { input: t(d.value.input), underlying: t(d.value.source), first: t(d.value.first), directly: t(d.value.directly), after: t(d.value.after) },
          ...(ev !== undefined ? { entries: (ev.examples.get(exampleKey(p.a, p.b, kind)) ?? []).map((e) => ({ word: e.word, pron: e.pron, file: e.file, line: e.line })) } : {}),
        } : { decided: false, reason: (d as { reason: string }).reason }),
      }];
    })),
    swaps: r.swaps.map((s) => ({
      a: names[s.a], b: names[s.b],
      result: decidedJson(s.difference, (v) => ({ input: t(v.input), underlying: t(v.source), inOrder: t(v.inOrder), swapped: t(v.swapped) })),
      commute: s.difference.decided ? s.difference.value === null : null,
    })),
    environments: r.environments.map((e) => ({
      step: names[e.step], environment: e.environment + 1, line: e.line,
      result: decidedJson(e.adds, (v) => ({ input: t(v.input), underlying: t(v.source) })),
      shadowed: e.adds.decided ? e.adds.value === null : null,
    })),
    largestMachine: r.largest,
  };
}

const q = (s: string): string => `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"')}"`;

const EDGE_STYLE: Readonly<Record<RelationKind, string>> = {
  feeds: 'color="#1b7837"', bleeds: 'color="#b2182b"', counterfeeds: 'color="#1b7837", style=dashed', counterbleeds: 'color="#b2182b", style=dashed',
};

/** Graphviz DOT: steps in order (grey order chain), relations as labelled edges A → B, dead steps dashed. */
export function interactionDot(r: InteractionReport, grammarName: string): string {
  const lines: string[] = [`digraph interactions {`, `  label=${q(`Rule interactions: ${grammarName}`)};`, `  rankdir=LR;`, `  node [shape=box, fontname="Helvetica"];`, `  edge [fontname="Helvetica", fontsize=10];`];
  r.steps.forEach((s, k) => {
    const dead = s.applies.decided && s.applies.value === null;
    lines.push(`  s${k} [label=${q(`${k + 1}. ${s.name}`)}${dead ? ", style=dashed" : ""}];`);
  });
  for (const s of r.swaps) {
    const forced = s.difference.decided && s.difference.value !== null;
    lines.push(`  s${s.a} -> s${s.b} [color="#999999", ${forced ? 'label="order forced", penwidth=2' : 'style=dotted, label="commute"'}];`);
  }
  for (const p of r.pairs) {
    for (const kind of RELATIONS) {
      const d = p.relations[kind];
      if (d.decided && d.value === null) continue;
      const label = d.decided ? kind : `${kind}? (not decided)`;
      lines.push(`  s${p.a} -> s${p.b} [label=${q(label)}, ${EDGE_STYLE[kind]}, constraint=false];`);
    }
  }
  lines.push("}");
  return lines.join("\n") + "\n";
}
