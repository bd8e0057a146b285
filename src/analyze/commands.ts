// The library side of `strata explain` and `strata interactions`: load the grammar, read the words
// or the lexicon, run the analysis, format it. Returns the text and diagnostics; the CLI prints.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { loadGrammar } from "../grammar/index.js";
import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { tokenise } from "../inventory/index.js";
import { applyStress, readLexicon, rejectDiagnostic, type LexiconRow } from "../lexicon/read.js";
import { Deriver, explain, type ExplainItem } from "./explain.js";
import { FormWriter } from "./render.js";
import { explanationJson, explanationTable } from "./explain-format.js";
import type { Alphabet } from "../compile/index.js";
import { analyseInteractions } from "./interactions.js";
import { interactionDot, interactionJson, interactionTable } from "./interactions-format.js";
import { lexiconEvidence, type LexiconEvidence } from "./examples.js";

export interface CommandResult {
  readonly stdout: string;
  readonly diagnostics: readonly Diagnostic[];
  /** Exit code (DEVELOPERS.md, "Command-line conventions"): 0 done, 1 bad input. */
  readonly exitCode: number;
}

/** A command-line argument with the column where it starts on the command line. */
export interface Arg {
  readonly text: string;
  readonly column: number;
}

export const COMMAND_LINE = "command line";

const argError = (code: string, message: string, a: Arg): Diagnostic =>
  diagnostic("error", code, message, { file: COMMAND_LINE, line: 1, column: a.column, length: Math.max(1, Array.from(a.text).length) });

/** Loads and checks a grammar; its diagnostics either way. */
export function loadChecked(path: string): { grammar?: Grammar; inventory?: Inventory; diagnostics: Diagnostic[] } {
  const g = loadGrammar(path);
  if (g.grammar === undefined || g.inventory === undefined || g.diagnostics.some((d) => d.severity === "error")) return { diagnostics: [...g.diagnostics] };
  return { grammar: g.grammar, inventory: g.inventory, diagnostics: [...g.diagnostics] };
}

/** Every row of a lexicon file (or stream); rejects become diagnostics. */
export async function readRows(source: string | NodeJS.ReadableStream, inventory: Inventory, file: string): Promise<{ rows: LexiconRow[]; diagnostics: Diagnostic[] }> {
  const reader = readLexicon(source, { inventory, file });
  const rows: LexiconRow[] = [];
  const diagnostics: Diagnostic[] = [];
  for await (const item of reader) {
    if (item.kind === "row") rows.push(item);
    else diagnostics.push(rejectDiagnostic(item));
  }
  return { rows, diagnostics: [...reader.diagnostics, ...diagnostics] };
}

export interface ExplainCommandOptions {
  readonly grammar: string;
  readonly words: readonly Arg[];
  /** A lexicon CSV: its rows are explained (all of them when no words are given; else the spellings named). */
  readonly from?: string;
  readonly fromStream?: NodeJS.ReadableStream;
  readonly json?: boolean;
  readonly color?: boolean;
  readonly maxVariants?: number;
}

/** Parses broad IPA typed on the command line into a word (stress marks on the nuclei). */
function parsePron(inv: Inventory, a: Arg): { item?: ExplainItem; diagnostics: Diagnostic[] } {
  const t = tokenise(inv, a.text, { file: COMMAND_LINE, line: 1, column: a.column });
  if (!t.ok) return { diagnostics: [t.error] };
  const s = applyStress(inv, t.tokens);
  if (!s.ok) return { diagnostics: [argError(s.code, s.reason, { text: a.text, column: s.column })] };
  if (s.symbols.length === 0) return { diagnostics: [argError("explain/empty", "The pronunciation is empty.", a)] };
  return { item: { label: a.text, word: s.symbols }, diagnostics: [] };
}

export async function runExplainCommand(o: ExplainCommandOptions): Promise<CommandResult> {
  const g = loadChecked(o.grammar);
  if (g.grammar === undefined || g.inventory === undefined) return { stdout: "", diagnostics: g.diagnostics, exitCode: 1 };
  const inv = g.inventory;
  const diagnostics = [...g.diagnostics];
  const items: ExplainItem[] = [];
  let rows: LexiconRow[] = [];
  if (o.from !== undefined) {
    const src = o.from === "-" ? (o.fromStream ?? process.stdin) : o.from;
    const r = await readRows(src, inv, o.from === "-" ? "<stdin>" : o.from);
    diagnostics.push(...r.diagnostics);
    if (r.diagnostics.some((d) => d.severity === "error") && r.rows.length === 0) return { stdout: "", diagnostics, exitCode: 1 };
    rows = r.rows;
  }
  const fromRow = (row: LexiconRow): ExplainItem => ({ label: `${row.word} /${row.pron}/`, word: row.symbols, source: { file: row.file, line: row.line } });
  if (o.words.length === 0) {
    if (o.from === undefined) return { stdout: "", diagnostics: [...diagnostics, diagnostic("error", "explain/nothing", "Give one or more words (broad IPA, or spellings found in --from FILE), or --from FILE alone to explain every entry.", { file: COMMAND_LINE, line: 1, column: 1 })], exitCode: 1 };
    items.push(...rows.map(fromRow));
  }
  let bad = false;
  for (const a of o.words) {
    const found = rows.filter((r) => r.word === a.text.normalize("NFC"));
    if (found.length > 0) { items.push(...found.map(fromRow)); continue; }
    const p = parsePron(inv, a);
    if (p.item === undefined) {
      bad = true;
      const hint = o.from !== undefined ? ` It is not a spelling in ${o.from} either.` : "";
      diagnostics.push(...p.diagnostics.map((d) => ({ ...d, message: d.message + hint })));
      continue;
    }
    items.push(p.item);
  }
  if (bad) return { stdout: "", diagnostics, exitCode: 1 };
  const { deriver, diagnostics: cd } = Deriver.build(g.grammar, inv);
  diagnostics.push(...cd);
  if (deriver === null) return { stdout: "", diagnostics, exitCode: 1 };
  const outs: string[] = [];
  const json: unknown[] = [];
  for (const item of items) {
    const e = explain(deriver, item, o.maxVariants ?? 16);
    if (e === null) {
      const pos = item.source !== undefined ? { file: item.source.file, line: item.source.line, column: 1 } : { file: COMMAND_LINE, line: 1, column: 1 };
      diagnostics.push(diagnostic("error", "explain/outside-alphabet", `The compiled grammar does not accept '${item.label}' (a segment outside its alphabet).`, pos));
      continue;
    }
    if (o.json === true) json.push(explanationJson(deriver, e));
    else outs.push(explanationTable(deriver, e, { color: o.color ?? false }));
  }
  const stdout = o.json === true ? JSON.stringify(json, null, 2) + "\n" : outs.join("\n");
  return { stdout, diagnostics, exitCode: diagnostics.some((d) => d.severity === "error") ? 1 : 0 };
}

export interface InteractionsCommandOptions {
  readonly grammar: string;
  /** The name shown in the output (the path as given, never made absolute). */
  readonly grammarName: string;
  readonly lexicon?: string;
  readonly lexiconStream?: NodeJS.ReadableStream;
  /** Most lexicon entries shown per relation (default 3). */
  readonly examples?: number;
  readonly format?: "table" | "json" | "dot";
  readonly maxStates?: number;
}

export async function runInteractionsCommand(o: InteractionsCommandOptions): Promise<CommandResult & { readonly seconds?: number }> {
  const g = loadChecked(o.grammar);
  if (g.grammar === undefined || g.inventory === undefined) return { stdout: "", diagnostics: g.diagnostics, exitCode: 1 };
  const diagnostics = [...g.diagnostics];
  let rows: LexiconRow[] | undefined;
  if (o.lexicon !== undefined) {
    const src = o.lexicon === "-" ? (o.lexiconStream ?? process.stdin) : o.lexicon;
    const r = await readRows(src, g.inventory, o.lexicon === "-" ? "<stdin>" : o.lexicon);
    diagnostics.push(...r.diagnostics);
    if (r.rows.length === 0 && r.diagnostics.some((d) => d.severity === "error")) return { stdout: "", diagnostics, exitCode: 1 };
    rows = r.rows;
  }
  const { report, diagnostics: ad } = analyseInteractions(g.grammar, g.inventory, o.maxStates !== undefined ? { maxStates: o.maxStates } : {});
  diagnostics.push(...ad);
  if (report === null) return { stdout: "", diagnostics, exitCode: 1 };
  const { deriver, diagnostics: cd } = Deriver.build(g.grammar, g.inventory);
  diagnostics.push(...cd);
  if (deriver === null) return { stdout: "", diagnostics, exitCode: 1 };
  let ev: LexiconEvidence | undefined;
  if (rows !== undefined) {
    if (!extendsAlphabet(report.machines.alphabet, deriver.alphabet)) throw new Error("the analysis and the compiled grammar disagree on the alphabet");
    ev = lexiconEvidence(report, deriver, rows, o.examples ?? 3);
  }
  // The analysis's alphabet: the compiler's, then the symbols only another order of the steps makes.
  const w = new FormWriter(report.machines.alphabet, g.inventory);
  const format = o.format ?? "table";
  const stdout = format === "json" ? JSON.stringify(interactionJson(report, w, o.grammarName, ev), null, 2) + "\n"
    : format === "dot" ? interactionDot(report, o.grammarName)
    : interactionTable(report, w, o.grammarName, ev);
  return { stdout, diagnostics, exitCode: diagnostics.some((d) => d.severity === "error") ? 1 : 0, seconds: report.seconds };
}

/** Does `wide` hold every symbol of `narrow` under the same id? */
function extendsAlphabet(wide: Alphabet, narrow: Alphabet): boolean {
  return wide.size >= narrow.size && narrow.segments.every((s, i) => s.key === wide.segments[i]!.key);
}
