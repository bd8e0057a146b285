// Positioned problems with input (inventory, grammar, lexicon, options): errors are values, never stack traces.
// Only the CLI renders them (with the source line and a caret); the library collects and returns them.

import { splitLines } from "./lines.js";

/** "hint": a suggestion (lint's likely unmarked joins); never fails a run, not even with --strict. */
export type Severity = "error" | "warning" | "hint";

/** A place in a source file. Lines and columns count from 1; columns count Unicode code points. */
export interface SourcePos {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  /** How many code points the problem spans on its line (for the caret underline); 1 when unknown. */
  readonly length?: number;
}

export interface Diagnostic extends SourcePos {
  readonly severity: Severity;
  /** Stable machine-readable code, e.g. "inventory/ragged-row", "grammar/unknown-feature". */
  readonly code: string;
  /** A sentence a linguist understands, without the position (the position is in the fields). */
  readonly message: string;
}

/** Thrown only at API edges that cannot return diagnostics; carries every diagnostic collected. */
export class StrataError extends Error {
  readonly diagnostics: readonly Diagnostic[];
  constructor(diagnostics: readonly Diagnostic[]) {
    super(diagnostics.map(formatDiagnostic).join("\n"));
    this.name = "StrataError";
    this.diagnostics = diagnostics;
  }
}

export function diagnostic(
  severity: Severity,
  code: string,
  message: string,
  pos: SourcePos,
): Diagnostic {
  return { severity, code, message, file: pos.file, line: pos.line, column: pos.column, length: pos.length ?? 1 };
}

export const hasErrors = (ds: readonly Diagnostic[]): boolean => ds.some((d) => d.severity === "error");

/** One line: `file:line:column: error: message [code]`. */
export function formatDiagnostic(d: Diagnostic): string {
  return `${d.file}:${d.line}:${d.column}: ${d.severity}: ${d.message} [${d.code}]`;
}

let lastText: string | undefined;
let lastLines: readonly string[] = [];
/** The lines of a source text; the last split is kept, so rendering many diagnostics of one file splits it once. */
function linesOf(text: string): readonly string[] {
  if (text !== lastText) {
    lastText = text;
    lastLines = splitLines(text);
  }
  return lastLines;
}

/**
 * The one-line form followed by the offending source line and a caret under the span.
 * `sourceText` is the whole file the diagnostic points into, when the caller has it.
 */
export function renderDiagnostic(d: Diagnostic, sourceText?: string): string {
  const head = formatDiagnostic(d);
  if (sourceText === undefined) return head;
  // The same lines every position is computed on (src/lines.ts): CR LF, LF or a lone CR ends a line.
  const text = linesOf(sourceText)[d.line - 1];
  if (text === undefined) return head;
  const shown = [...text].map((ch) => (ch === "\t" ? " " : ch)).join("");
  const pad = " ".repeat(Math.max(0, d.column - 1));
  const caret = "^".repeat(Math.max(1, d.length ?? 1));
  const gutter = String(d.line).padStart(5);
  return `${head}\n${gutter} | ${shown}\n${" ".repeat(gutter.length)} | ${pad}${caret}`;
}
