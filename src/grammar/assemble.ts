// Grammar assembly: a file's parsed top-level items (includes already expanded) → one Grammar,
// with the declarations that may appear once checked.

import * as path from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { ClassDef, Cluster, Grammar, JoinMode, NodeDef, Pattern, Span, Step } from "./ast.js";

/** One top-level statement after parsing, in file order (includes are expanded by the loader). */
export type TopItem =
  | { readonly kind: "include"; readonly path: string; readonly written: string; readonly span: Span }
  | { readonly kind: "inventory" | "diacritics"; readonly path: string; readonly span: Span }
  | { readonly kind: "node"; readonly def: NodeDef }
  /** `implicit`: made by the parser for a `{a | b}` choice in a rule target. */
  | { readonly kind: "class"; readonly def: ClassDef; readonly implicit: boolean }
  | { readonly kind: "onsets" | "codas"; readonly clusters: readonly Cluster[]; readonly span: Span }
  | { readonly kind: "heavy"; readonly patterns: readonly Pattern[]; readonly span: Span }
  | { readonly kind: "joins"; readonly mode: JoinMode; readonly span: Span }
  | { readonly kind: "step"; readonly step: Step }
  /** `language "en-US"`: the variety's language tag (PLS xml:lang when no varieties.json names one). */
  | { readonly kind: "language"; readonly tag: string; readonly span: Span };

/**
 * Builds a Grammar from items in order (includes already expanded or ignored). Reports a second
 * `inventory`, `diacritics`, `language`, `onsets`, `codas`, `heavy` or `joins`, and a node or class defined twice.
 * Steps other than rules are named by their keyword, numbered from the second on (`stress-2`).
 */
export function assembleGrammar(
  file: string,
  items: readonly TopItem[],
  files: readonly string[],
): { grammar: Grammar; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  let inventory: string | null = null;
  let diacritics: string | null = null;
  const nodes: NodeDef[] = [];
  const classes: ClassDef[] = [];
  let onsets: readonly Cluster[] | null = null;
  let codas: readonly Cluster[] | null = null;
  let heavy: readonly Pattern[] | null = null;
  let language: Grammar["language"];
  let joins: JoinMode | null = null;
  let joinsSpan: Span | null = null;
  const steps: Step[] = [];
  const seen = new Map<string, Span>();
  const once = (what: string, span: Span): boolean => {
    const first = seen.get(what);
    if (first !== undefined) {
      diagnostics.push(
        diagnostic("error", "grammar/duplicate-declaration", `'${what}' is already declared (${where(first)})`, span),
      );
      return false;
    }
    seen.set(what, span);
    return true;
  };
  const counts = new Map<string, number>();
  for (const it of items) {
    switch (it.kind) {
      case "include":
        break;
      case "inventory":
        if (once("inventory", it.span)) inventory = it.path;
        break;
      case "diacritics":
        if (once("diacritics", it.span)) diacritics = it.path;
        break;
      case "node":
        if (nodes.some((n) => n.name === it.def.name))
          diagnostics.push(diagnostic("error", "grammar/duplicate-name", `node '${it.def.name}' is defined twice`, it.def.span));
        else nodes.push(it.def);
        break;
      case "class":
        if (classes.some((c) => c.name === it.def.name)) {
          if (!it.implicit)
            diagnostics.push(
              diagnostic("error", "grammar/duplicate-name", `class '${it.def.name}' is defined twice`, it.def.span),
            );
        } else classes.push(it.def);
        break;
      case "onsets":
        if (once("onsets", it.span)) onsets = it.clusters;
        break;
      case "codas":
        if (once("codas", it.span)) codas = it.clusters;
        break;
      case "heavy":
        if (once("heavy", it.span)) heavy = it.patterns;
        break;
      case "language":
        if (once("language", it.span)) language = { tag: it.tag, span: it.span };
        break;
      case "joins":
        if (once("joins", it.span)) { joins = it.mode; joinsSpan = it.span; }
        break;
      case "step": {
        const s = it.step;
        if (s.kind === "rule") steps.push(s);
        else {
          const n = (counts.get(s.kind) ?? 0) + 1;
          counts.set(s.kind, n);
          steps.push({ ...s, name: n === 1 ? s.kind : `${s.kind}-${n}` });
        }
        break;
      }
      default: {
        const never: never = it;
        return never;
      }
    }
  }
  // A closing join needs the onsets to decide what stays after it (with codas but no onsets the
  // syllabifier would have to weigh every longer coda across the join).
  if (joins !== null && joins !== "through" && joinsSpan !== null && onsets === null && codas !== null) {
    diagnostics.push(diagnostic("error", "grammar/joins-without-onsets", `'joins = ${joins}' needs an 'onsets' list when 'codas' is declared`, joinsSpan));
  }
  return {
    grammar: { file, inventory, diacritics, nodes, classes, onsets, codas, heavy: heavy ?? [], ...(joins !== null ? { joins } : {}), steps, files, ...(language !== undefined ? { language } : {}) },
    diagnostics,
  };
}

const where = (s: Span): string => `${path.basename(s.file)}:${s.line}:${s.column}`;
