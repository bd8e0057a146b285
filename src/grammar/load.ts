// Loading a grammar from disk: reads its files (source.ts: includes, a variety's base chain, all
// confined to the project root), loads the
// inventory it names, splits IPA literals into single segments with the tokeniser, and checks it.

import * as fs from "node:fs";
import * as path from "node:path";
import { diagnostic, type Diagnostic, type SourcePos } from "../diagnostics.js";
import { capPerFile, MAX_DIAGNOSTICS_PER_FILE } from "../diagnostic-cap.js";
import { FILE_LIMITS, isInside, readTextFile, realPath } from "../files.js";
import { loadInventory, tokenise, type Inventory } from "../inventory/index.js";
import type { ChangeElement, ClassDef, Cluster, Element, Environment, Grammar, Pattern, Rule, Span, Step } from "./ast.js";
import { checkGrammar } from "./check.js";
import type { DeclarationEdit, OmittedStep, StepOrigin } from "./inherit.js";
import { projectRoot, readSource } from "./source.js";

/** The file a grammar folder is read from. */
export const GRAMMAR_FILE = "grammar.strata";

export interface LoadOptions {
  /** Most bytes of one grammar or included file (default FILE_LIMITS.grammar). */
  readonly maxGrammarBytes?: number;
  /** Most bytes of the inventory or diacritics file (default FILE_LIMITS.inventory). */
  readonly maxInventoryBytes?: number;
  /** Most diagnostics kept per file; the rest are counted in one more (default MAX_DIAGNOSTICS_PER_FILE). */
  readonly maxDiagnosticsPerFile?: number;
  /** The project root every file the grammar names must lie in (default: `defaultRoot`, source.ts). */
  readonly root?: string;
}

/** Where a loaded grammar's steps came from (every grammar has it; a plain grammar's steps are all its own). */
export interface VarietyOrigins {
  /** Per step of `grammar.steps`: where it is written, whether a variety added it, the edits that changed it. */
  readonly origins: readonly StepOrigin[];
  /** Base steps left out by the chain's varieties. */
  readonly omitted: readonly OmittedStep[];
  /** Declarations the chain's varieties replaced, added, extended or reduced. */
  readonly declarations: readonly DeclarationEdit[];
  /** The grammar files from the main one down to the plain grammar at the bottom of the chain. */
  readonly chain: readonly string[];
  /** The project root every file was confined to. */
  readonly root: string;
}

export interface LoadedGrammar {
  readonly grammar?: Grammar;
  readonly inventory?: Inventory;
  /** Where each step came from, the chain of variety files (main first) and the project root used. */
  readonly variety?: VarietyOrigins;
  readonly diagnostics: Diagnostic[];
}

const place = (d: Diagnostic): string => `${d.severity}\u0000${d.file}\u0000${d.line}\u0000${d.column}`;
const startOf = (file: string): SourcePos => ({ file, line: 1, column: 1 });

/**
 * Reads the grammar at `p` (a .strata file, or a folder holding `grammar.strata`), expands its
 * includes, loads its inventory, splits literals and runs the checker. Never throws: every problem
 * is a positioned diagnostic. `grammar` is present whenever the main file could be read (possibly
 * partial when there are errors); `inventory` whenever it loaded.
 */
export function loadGrammar(p: string, opts: LoadOptions = {}): LoadedGrammar {
  const r = loadUncapped(p, opts);
  return { ...r, diagnostics: capPerFile(r.diagnostics, "grammar/too-many-problems", opts.maxDiagnosticsPerFile ?? MAX_DIAGNOSTICS_PER_FILE) };
}

function loadUncapped(p: string, opts: LoadOptions): LoadedGrammar {
  const diagnostics: Diagnostic[] = [];
  const grammarLimit = opts.maxGrammarBytes ?? FILE_LIMITS.grammar;
  try {
    let main = path.resolve(p);
    if (isDirectory(main)) main = path.join(main, GRAMMAR_FILE);
    const mainRead = readTextFile(main, { what: "grammar file", limit: grammarLimit, code: "grammar/unreadable" });
    if (!mainRead.ok) {
      diagnostics.push(mainRead.diagnostic);
      return { diagnostics };
    }
    const root = projectRoot(main, opts.root);
    if (!isInside(root, main)) {
      diagnostics.push(diagnostic("error", "grammar/file-outside", `The grammar '${path.basename(main)}' is outside the project root (${root}).`, startOf(main)));
      return { diagnostics };
    }
    const source = readSource(main, mainRead.text, root, grammarLimit, diagnostics);
    const variety = { origins: source.origins, omitted: source.omitted, declarations: source.declarations, chain: source.chain, root };
    let grammar = source.grammar;
    if (grammar.inventory === null) {
      if (source.failed !== true) diagnostics.push(diagnostic("error", "grammar/no-inventory", 'the grammar names no inventory (inventory "segments.csv")', startOf(main)));
      return { grammar, variety, diagnostics };
    }
    const invItem = { span: source.declared.inventory };
    const diaItem = { span: source.declared.diacritics };
    // Every file the grammar names stays inside its folder, as includes do (symbolic links resolved).
    const defaultDiacritics = path.join(path.dirname(grammar.inventory), "diacritics.csv");
    const named: [string, Span | undefined, string][] = [[grammar.inventory, invItem.span, "inventory"]];
    if (grammar.diacritics !== null) named.push([grammar.diacritics, diaItem.span, "diacritics file"]);
    else if (fs.existsSync(defaultDiacritics)) named.push([defaultDiacritics, invItem.span, "diacritics file beside the inventory"]);
    for (const [file, span, what] of named)
      if (!isInside(root, file)) {
        diagnostics.push(
          diagnostic("error", "grammar/file-outside", `The ${what} '${path.basename(file)}' is outside the project root (${root}); files a grammar names must stay inside it.`, span ?? startOf(main)),
        );
        return { grammar, variety, diagnostics };
      }
    if (!fs.existsSync(grammar.inventory)) {
      diagnostics.push(diagnostic("error", "grammar/inventory-missing", `the inventory file ${grammar.inventory} does not exist`, invItem?.span ?? startOf(main)));
      return { grammar, variety, diagnostics };
    }
    if (grammar.diacritics !== null && !fs.existsSync(grammar.diacritics)) {
      diagnostics.push(diagnostic("error", "grammar/inventory-missing", `the diacritics file ${grammar.diacritics} does not exist`, diaItem?.span ?? startOf(main)));
      return { grammar, variety, diagnostics };
    }
    const inv = loadInventory(grammar.inventory, grammar.diacritics ?? undefined, {
      ...(opts.maxInventoryBytes !== undefined ? { limit: opts.maxInventoryBytes } : {}),
      ...(invItem.span !== undefined ? { inventoryAt: invItem.span } : {}),
      ...(diaItem.span !== undefined ? { diacriticsAt: diaItem.span } : {}),
    });
    diagnostics.push(...inv.diagnostics);
    if (inv.inventory === undefined) return { grammar, variety, diagnostics };
    const split = splitLiterals(grammar, inv.inventory);
    diagnostics.push(...split.diagnostics);
    grammar = split.grammar;
    // The checker re-reads literals; a place the splitter already reported is not reported twice.
    const reported = new Set(diagnostics.map(place));
    diagnostics.push(...checkGrammar(grammar, inv.inventory).filter((d) => !reported.has(place(d))));
    return { grammar, inventory: inv.inventory, variety, diagnostics };
  } catch (e) {
    diagnostics.push(
      diagnostic("error", "grammar/internal", `internal error while loading the grammar: ${e instanceof Error ? e.message : String(e)}`, startOf(p)),
    );
    return { diagnostics };
  }
}

function isDirectory(p: string): boolean {
  try {
    return fs.statSync(p).isDirectory();
  } catch {
    return false;
  }
}

/**
 * Splits every IPA literal (segments in patterns, targets, changes, class members, clusters) into
 * single segments with the inventory's tokeniser (`st` → `s`, `t`). A literal the tokeniser cannot
 * read is an error at its place. A subscript on a multi-segment literal binds to its last segment
 * (SPE: `st₀` is `s t₀`). Class members and target choices must be single segments.
 */
export function splitLiterals(grammar: Grammar, inv: Inventory): { grammar: Grammar; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const cpLen = (s: string): number => [...s].length;
  const read = (symbol: string, span: Span): { symbol: string; span: Span }[] | null => {
    const r = tokenise(inv, symbol, { file: span.file, line: span.line, column: span.column });
    if (!r.ok) {
      diagnostics.push({ ...r.error, code: "grammar/unknown-segment", length: r.error.length ?? 1 });
      return null;
    }
    const out: { symbol: string; span: Span }[] = [];
    for (const t of r.tokens) {
      if (t.kind !== "segment") {
        diagnostics.push(
          diagnostic("error", "grammar/not-a-segment", `'${symbol}' contains a stress mark or break, which is not a segment`, { ...span, column: t.column }),
        );
        return null;
      }
      out.push({ symbol: t.text, span: { file: span.file, line: span.line, column: t.column, length: Math.max(1, cpLen(t.text)) } });
    }
    return out;
  };
  const single = (e: Element, what: string): Element => {
    if (e.kind !== "segment") return e;
    const parts = read(e.symbol, e.span);
    if (parts === null) return e;
    if (parts.length !== 1) {
      diagnostics.push(
        diagnostic("error", "grammar/not-one-segment", `${what} is one segment, but '${e.symbol}' reads as ${parts.length} (${parts.map((x) => x.symbol).join(" ")}); separate them with spaces`, e.span),
      );
      return e;
    }
    return { kind: "segment", symbol: parts[0]!.symbol, span: parts[0]!.span };
  };
  const splitElement = (e: Element): Element[] => {
    if (e.kind !== "segment") return [e];
    const parts = read(e.symbol, e.span);
    if (parts === null) return [e];
    return parts.map((x) => ({ kind: "segment", symbol: x.symbol, span: x.span }));
  };
  const el = (element: Element): Pattern => ({ kind: "element", element });
  const pattern = (p: Pattern): Pattern => {
    switch (p.kind) {
      case "element": {
        const parts = splitElement(p.element);
        return parts.length === 1 ? el(parts[0]!) : { kind: "sequence", items: parts.map(el), span: p.element.span };
      }
      case "sequence":
        return { ...p, items: p.items.flatMap((i) => {
          const q = pattern(i);
          return i.kind === "element" && q.kind === "sequence" ? q.items : [q];
        }) };
      case "optional":
        return { ...p, body: pattern(p.body) };
      case "choice":
        return { ...p, options: p.options.map(pattern) };
      case "repeat": {
        const body = pattern(p.body);
        if (p.body.kind === "element" && body.kind === "sequence" && body.items.length > 1) {
          const last = body.items[body.items.length - 1]!;
          return { kind: "sequence", items: [...body.items.slice(0, -1), { ...p, body: last }], span: p.span };
        }
        return { ...p, body };
      }
    }
  };
  const env = (e: Environment): Environment => ({ ...e, left: pattern(e.left), right: pattern(e.right) });
  const change = (c: ChangeElement): ChangeElement[] => (c.kind === "segment" ? splitElement(c) as ChangeElement[] : [c]);
  const implicit = new Set(grammar.classes.filter((c) => c.name.startsWith("{")).map((c) => c.name));
  const classes: ClassDef[] = grammar.classes.map((c) => ({
    ...c,
    members: c.members.map((m) => single(m, implicit.has(c.name) ? "each choice in a target" : "a class member")),
  }));
  const cluster = (c: Cluster): Cluster => {
    const parts = c.segments.flatMap((s) => read(s, c.span) ?? []);
    return { ...c, segments: parts.map((x) => x.symbol) };
  };
  const steps: Step[] = grammar.steps.map((s): Step => {
    if (s.kind !== "rule") return s;
    const rule: Rule = {
      ...s,
      target: s.target.flatMap(splitElement),
      change: s.change.flatMap(change),
      environments: s.environments.map(env),
    };
    return rule;
  });
  return {
    grammar: {
      ...grammar,
      classes,
      onsets: grammar.onsets?.map(cluster) ?? null,
      codas: grammar.codas?.map(cluster) ?? null,
      heavy: grammar.heavy.map(pattern),
      steps,
    },
    diagnostics,
  };
}
