// Applying a variety's edits to its base grammar: the resolved step list (omit, replace, adjust,
// add before/after), declarations replaced or extended, and where every step came from.
// Pure: the base arrives assembled (loader), the edits parsed (parse-variety.ts).

import * as path from "node:path";
import { closest } from "fastest-levenshtein";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { Cluster, Grammar, Rule, Span, Step } from "./ast.js";
import { assembleGrammar } from "./assemble.js";
import { applyOptions, type Edit, type NameRef, type VarietyFile } from "./parse-variety.js";

/** A place in a grammar file. */
export interface Where {
  readonly file: string;
  readonly line: number;
}

/** Where one step of a resolved grammar came from. */
export interface StepOrigin {
  readonly name: string;
  /** Where the step was first written: in the base file, or in the variety that added it (a replaced body is at its edit). */
  readonly defined: Where;
  /** How it got into the grammar: written in a plain grammar, or added by a variety. */
  readonly added: boolean;
  /** The edits applied to it, oldest first (the base's own variety first in a chain). */
  readonly edits: readonly { readonly kind: "replaced" | "adjusted"; readonly at: Where }[];
}

/** A base step a variety left out: where it was written and where the `omit` is. */
export interface OmittedStep {
  readonly name: string;
  readonly defined: Where;
  readonly omittedAt: Where;
}

/** A declaration a variety replaced, added, extended or reduced (`class Stop`, `onsets`, …). */
export interface DeclarationEdit {
  readonly what: string;
  readonly how: "replaced" | "added" | "extended" | "reduced";
  readonly at: Where;
}

const at = (s: Span): Where => ({ file: s.file, line: s.line });
const where = (s: Span): string => `${path.basename(s.file)}:${s.line}:${s.column}`;

/** Origins of a plain grammar's steps: each defined where it is written. */
export function plainOrigins(g: Grammar): StepOrigin[] {
  return g.steps.map((s) => ({ name: s.name, defined: at(s.span), added: false, edits: [] }));
}

/**
 * Applies `v`'s edits to `base`. Errors (unknown names, an edit twice on one step, an anchor on an
 * omitted step, two new steps competing for one place) are positioned at the edit; the erroneous
 * edit is left out and the rest still applies, so further problems show in the same run.
 */
export function applyVariety(
  base: Grammar,
  baseOrigins: readonly StepOrigin[],
  v: VarietyFile,
  files: readonly string[],
): { grammar: Grammar; origins: StepOrigin[]; omitted: OmittedStep[]; declarations: DeclarationEdit[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const err = (code: string, message: string, span: Span): void => void diagnostics.push(diagnostic("error", code, message, span));
  const baseNames = new Map<string, number>();
  base.steps.forEach((s, i) => { if (!baseNames.has(s.name)) baseNames.set(s.name, i); });
  const unknown = (ref: NameRef, extra: readonly string[] = []): void => {
    const names = [...baseNames.keys(), ...extra];
    const near = names.length > 0 ? closest(ref.name, names) : undefined;
    const hint = near !== undefined && near !== ref.name ? ` (did you mean '${near}'?)` : "";
    err("grammar/unknown-step", `The base grammar has no rule or step named '${ref.name}'${hint}.`, ref.span);
  };

  // Edits of base steps: one per step.
  const editOf = new Map<string, Edit & { kind: "omit" | "replace" | "adjust" }>();
  for (const e of v.edits) {
    if (e.kind !== "omit" && e.kind !== "replace" && e.kind !== "adjust") continue;
    const i = baseNames.get(e.target.name);
    if (i === undefined && v.edits.some((a) => a.kind === "add" && a.step.name === e.target.name)) {
      err("grammar/unknown-step", `'${e.target.name}' is added by this variety, not a step of the base; write its body and options in its 'add' statement.`, e.target.span);
      continue;
    }
    if (i === undefined) { unknown(e.target); continue; }
    const first = editOf.get(e.target.name);
    if (first !== undefined) {
      err("grammar/duplicate-edit", `'${e.target.name}' is already edited by this variety (${first.kind} at ${where(first.span)}); write one edit per step.`, e.target.span);
      continue;
    }
    const s = base.steps[i]!;
    if (e.kind === "adjust" && s.kind !== "rule") { err("grammar/edit-kind", `'${e.target.name}' is a ${s.kind} step, which has no rule options; 'replace' gives it new settings.`, e.target.span); continue; }
    if (e.kind === "replace" && s.kind !== e.step.kind) {
      err("grammar/edit-kind", `'${e.target.name}' is a ${s.kind === "rule" ? "rule" : `${s.kind} step`}; it cannot be replaced by a ${e.step.kind === "rule" ? "rule" : `${e.step.kind} step`}.`, e.target.span);
      continue;
    }
    editOf.set(e.target.name, e);
  }

  // New steps: names not taken, each anchored on a kept base step or on another new step. Steps
  // other than rules are numbered by their kind, as in a plain grammar (syllabify-2, stress-3).
  const counts = new Map<string, number>();
  for (const s of base.steps) if (s.kind !== "rule") counts.set(s.kind, (counts.get(s.kind) ?? 0) + 1);
  const adds = new Map<string, Edit & { kind: "add" }>();
  for (const e0 of v.edits) {
    if (e0.kind !== "add") continue;
    let e = e0;
    if (e.step.kind !== "rule") {
      const k = (counts.get(e.step.kind) ?? 0) + 1;
      counts.set(e.step.kind, k);
      e = { ...e, step: { ...e.step, name: k === 1 ? e.step.kind : `${e.step.kind}-${k}` } };
    }
    const n = e.step.name;
    const taken = baseNames.has(n) ? "the base grammar has a step of that name; 'replace' gives it a new body" : adds.has(n) ? `it is already added at ${where(adds.get(n)!.span)}` : null;
    if (taken !== null) { err("grammar/duplicate-rule", `The variety cannot add '${n}': ${taken}.`, e.step.span); continue; }
    adds.set(n, e);
  }
  const slots = new Map<string, Edit & { kind: "add" }>();
  const slotOf = new Map<string, string>();
  const kept = base.steps.filter((s) => editOf.get(s.name)?.kind !== "omit");
  const keptIndex = new Map(kept.map((s, i) => [s.name, i] as const));
  for (const e of adds.values()) {
    const { where: side, anchor } = e.placement;
    let slot: string;
    if (keptIndex.has(anchor.name)) slot = `gap ${keptIndex.get(anchor.name)! + (side === "after" ? 1 : 0)}`;
    else if (adds.has(anchor.name) && anchor.name !== e.step.name) slot = `${side} ${anchor.name}`;
    else if (baseNames.has(anchor.name)) { err("grammar/anchor-omitted", `'${anchor.name}' is omitted by this variety (${where(editOf.get(anchor.name)!.span)}); place '${e.step.name}' next to a step that stays.`, anchor.span); continue; }
    else { unknown(anchor, [...adds.keys()]); continue; }
    const other = slots.get(slot);
    if (other !== undefined) {
      const o = other.placement;
      err(
        "grammar/ambiguous-order",
        `'${e.step.name}' and '${other.step.name}' (${where(other.span)}) both go right ${side === o.where && anchor.name === o.anchor.name ? `${side} '${anchor.name}'` : `between the same two steps ('${o.where} ${o.anchor.name}' and '${side} ${anchor.name}')`}, so their order is not said; place one next to the other ('add rule ${e.step.name} after ${other.step.name}:').`,
        anchor.span,
      );
      continue;
    }
    slots.set(slot, e);
    slotOf.set(e.step.name, slot);
  }

  const origins = new Map(baseOrigins.map((o) => [o.name, o] as const));
  const outSteps: Step[] = [];
  const outOrigins: StepOrigin[] = [];
  const placed = new Set<string>();
  // `prefer` written in an edit of a rule that ends up obligatory has no effect (as in a rule header).
  const preferUseless = (e: { readonly options: { readonly prefer?: string }; readonly span: Span }, r: Step): void => {
    if (r.kind === "rule" && !r.optional && e.options.prefer !== undefined)
      diagnostics.push(diagnostic("warning", "grammar/prefer-obligatory", `rule '${r.name}' is obligatory, so 'prefer' has no effect`, e.span));
  };
  const emitSlot = (slot: string, depth: number): void => {
    const e = slots.get(slot);
    if (e === undefined || depth > adds.size) return;
    const n = e.step.name;
    placed.add(n);
    emitSlot(`before ${n}`, depth + 1);
    outSteps.push(e.step);
    outOrigins.push({ name: n, defined: at(e.step.span), added: true, edits: [] });
    emitSlot(`after ${n}`, depth + 1);
  };
  kept.forEach((s, i) => {
    emitSlot(`gap ${i}`, 0);
    const e = editOf.get(s.name);
    const o = origins.get(s.name) ?? { name: s.name, defined: at(s.span), added: false, edits: [] };
    if (e?.kind === "replace") {
      const step = e.step.kind === "rule" && s.kind === "rule" ? applyOptions({ ...e.step, optional: s.optional, mode: s.mode, prefer: s.prefer, ...(s.expansion ? { expansion: s.expansion } : {}) } as Rule, e.options) : e.step;
      if (e.step.kind === "rule") preferUseless(e, step);
      outSteps.push({ ...step, name: s.name });
      outOrigins.push({ ...o, edits: [...o.edits, { kind: "replaced", at: at(e.span) }] });
    } else if (e?.kind === "adjust" && s.kind === "rule") {
      const adjusted = applyOptions(s, e.options);
      preferUseless(e, adjusted);
      outSteps.push(adjusted);
      outOrigins.push({ ...o, edits: [...o.edits, { kind: "adjusted", at: at(e.span) }] });
    } else {
      outSteps.push(s);
      outOrigins.push(o);
    }
  });
  emitSlot(`gap ${kept.length}`, 0);
  for (const e of slots.values())
    if (!placed.has(e.step.name))
      err("grammar/anchor-cycle", `'${e.step.name}' is placed ${e.placement.where} '${e.placement.anchor.name}', which is itself placed by way of '${e.step.name}': the new steps never reach a step of the base.`, e.placement.anchor.span);

  const omitted: OmittedStep[] = base.steps.flatMap((s) => {
    const e = editOf.get(s.name);
    return e?.kind === "omit" ? [{ name: s.name, defined: origins.get(s.name)?.defined ?? at(s.span), omittedAt: at(e.span) }] : [];
  });
  const decl = declarations(base, v, err, diagnostics);
  return {
    grammar: { ...decl, file: v.file, steps: outSteps, files },
    origins: outOrigins,
    omitted,
    declarations: declarationEdits(base, v),
    diagnostics,
  };
}

/**
 * The base's declarations with the variety's replacements and extensions. The variety's own
 * declarations are assembled as a grammar of their own (so a declaration made twice is reported as
 * in any grammar); a node or class replaces the base's of that name or is added, and every other
 * declaration it makes (inventory, onsets, heavy, … and any the language gains) replaces the base's.
 */
function declarations(base: Grammar, v: VarietyFile, err: (code: string, message: string, span: Span) => void, diagnostics: Diagnostic[]): Grammar {
  const own = assembleGrammar(v.file, v.edits.flatMap((e) => (e.kind === "declare" ? [e.item] : [])), []);
  diagnostics.push(...own.diagnostics);
  const merged: Record<string, unknown> = { ...base };
  for (const [k, value] of Object.entries(own.grammar)) {
    if (k === "file" || k === "files" || k === "steps" || value === null || value === undefined || (Array.isArray(value) && value.length === 0)) continue;
    merged[k] = value;
  }
  const named = <T extends { readonly name: string }>(mine: readonly T[], theirs: readonly T[]): T[] => {
    const out = [...mine];
    for (const d of theirs) {
      const i = out.findIndex((x) => x.name === d.name);
      if (i >= 0) out[i] = d;
      else out.push(d);
    }
    return out;
  };
  const g = { ...merged, nodes: named(base.nodes, own.grammar.nodes), classes: named(base.classes, own.grammar.classes) } as unknown as Grammar;
  const classes = [...g.classes];
  let { onsets, codas } = g;
  const clusterText = (c: Cluster): string => c.segments.join("");
  for (const e of v.edits) {
    if (e.kind !== "extend" && e.kind !== "remove") continue;
    const it = e.item;
    if (it.kind === "class") {
      const i = classes.findIndex((c) => c.name === it.def.name);
      if (i < 0) { err("grammar/unknown-class", `There is no class '${it.def.name}' to add members to; 'class ${it.def.name} = …' defines one.`, it.def.span); continue; }
      classes[i] = { ...classes[i]!, members: [...classes[i]!.members, ...it.def.members] };
    } else if (it.kind === "onsets" || it.kind === "codas") {
      const list = it.kind === "onsets" ? onsets : codas;
      if (list === null) { err("grammar/no-list", `The base grammar declares no ${it.kind} (it allows every cluster); write '${it.kind} = …' to declare a list.`, it.span); continue; }
      let next: Cluster[] = [...list];
      if (e.kind === "extend") next.push(...it.clusters);
      else
        for (const c of it.clusters) {
          const t = clusterText(c);
          if (!next.some((x) => clusterText(x) === t)) err("grammar/unknown-cluster", `'${t}' is not among the base grammar's ${it.kind}.`, c.span);
          next = next.filter((x) => clusterText(x) !== t);
        }
      if (it.kind === "onsets") onsets = next;
      else codas = next;
    }
  }
  return { ...g, classes, onsets, codas };
}

/** What the variety's declarations did to the base's, in file order (implicit `{a | b}` classes left out). */
function declarationEdits(base: Grammar, v: VarietyFile): DeclarationEdit[] {
  const out: DeclarationEdit[] = [];
  for (const e of v.edits) {
    if (e.kind !== "declare" && e.kind !== "extend" && e.kind !== "remove") continue;
    const it = e.item;
    if (it.kind === "class" && it.implicit) continue;
    const def = "def" in it ? (it.def as { readonly name: string; readonly span: Span }) : undefined;
    const what = def !== undefined ? `${it.kind} ${def.name}` : it.kind;
    const span = def?.span ?? (it as { readonly span: Span }).span;
    let how: DeclarationEdit["how"] = e.kind === "extend" ? "extended" : e.kind === "remove" ? "reduced" : "added";
    if (e.kind === "declare") {
      const had = def !== undefined
        ? (it.kind === "node" ? base.nodes : base.classes).some((x) => x.name === def.name)
        : ((x: unknown) => x !== null && x !== undefined && !(Array.isArray(x) && x.length === 0))((base as unknown as Record<string, unknown>)[it.kind]);
      if (had) how = "replaced";
    }
    out.push({ what, how, at: at(span) });
  }
  return out;
}
