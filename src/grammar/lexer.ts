// Grammar lexer: splits a .strata file into statements (a line starting in column 1 plus its
// indented continuation lines) and scans characters inside one statement with exact positions.

import type { Span } from "./ast.js";

/** One character (code point) of a statement, with where it stands in the file. */
export interface Char {
  readonly ch: string;
  readonly line: number;
  readonly column: number;
}

/** A top-level statement: its first line starts in column 1; indented lines continue it. */
export interface Statement {
  /** Code points with positions; line breaks between continuation lines are a single "\n". */
  readonly chars: readonly Char[];
  readonly line: number;
}

/**
 * Splits text into statements. Comments (`--` to the end of the line, outside "strings") are
 * removed here, so the parser never sees them. Blank and comment-only lines belong to nothing.
 * Invariant: every returned statement's first char is not whitespace and sits in column 1,
 * except for `orphans`: indented lines before the first statement (reported by the parser).
 */
export function splitStatements(text: string): { statements: Statement[]; orphans: Statement[] } {
  const statements: Statement[] = [];
  const orphans: Statement[] = [];
  const lines = text.split(/\r\n|\n|\r/);
  let current: Char[] | null = null;
  let currentLine = 0;
  const flush = (): void => {
    if (current !== null && current.length > 0) statements.push({ chars: current, line: currentLine });
    current = null;
  };
  lines.forEach((raw, i) => {
    const lineNo = i + 1;
    const cps = stripComment([...raw]);
    const firstNonSpace = cps.findIndex((c) => !isSpace(c));
    if (firstNonSpace < 0) return; // blank or comment-only
    const chars: Char[] = [];
    for (let c = firstNonSpace; c < cps.length; c++) chars.push({ ch: cps[c]!, line: lineNo, column: c + 1 });
    while (chars.length > 0 && isSpace(chars[chars.length - 1]!.ch)) chars.pop();
    if (firstNonSpace === 0) {
      flush();
      current = chars;
      currentLine = lineNo;
    } else if (current !== null) {
      const prev: Char[] = current;
      const last = prev[prev.length - 1]!;
      prev.push({ ch: "\n", line: last.line, column: last.column + 1 });
      for (const ch of chars) prev.push(ch); // not push(...chars): a very long line would overflow the stack
    } else {
      orphans.push({ chars, line: lineNo });
    }
  });
  flush();
  return { statements, orphans };
}

function stripComment(cps: string[]): string[] {
  let inString = false;
  for (let i = 0; i < cps.length; i++) {
    const c = cps[i]!;
    if (c === '"') inString = !inString;
    else if (!inString && c === "-" && cps[i + 1] === "-") return cps.slice(0, i);
  }
  return cps;
}

export const isSpace = (c: string | undefined): boolean => c === " " || c === "\t" || c === "\n" || c === "\u00a0";

const ASCII_UPPER = /^[A-Z]$/;
const IPA_CHAR = /^[\p{L}\p{M}]$/u;
export const isAsciiUpper = (c: string | undefined): boolean => c !== undefined && ASCII_UPPER.test(c);
/**
 * A code point that can be part of an IPA segment run: letters (Greek β θ χ included: outside
 * brackets they are IPA), combining marks, modifier letters; not ASCII capitals (class names)
 * and not the stress marks ˈ ˌ (stress is a feature in rules).
 */
export const isIpaChar = (c: string | undefined): boolean =>
  c !== undefined && !isAsciiUpper(c) && c !== "ˈ" && c !== "ˌ" && IPA_CHAR.test(c);
export const isDigit = (c: string | undefined): boolean => c !== undefined && c >= "0" && c <= "9";
export const isIdentStart = (c: string | undefined): boolean => c !== undefined && /^[A-Za-z]$/.test(c);
export const isIdentChar = (c: string | undefined): boolean => c !== undefined && /^[A-Za-z0-9_]$/.test(c);

export const SUBSCRIPT_DIGITS = "₀₁₂₃₄₅₆₇₈₉";
export const SUPERSCRIPT_DIGITS = "⁰¹²³⁴⁵⁶⁷⁸⁹";

/** A cursor over one statement's characters. Positions past the end point just after the last char. */
export class Scanner {
  private i = 0;
  constructor(
    readonly file: string,
    private readonly chars: readonly Char[],
  ) {}

  get index(): number {
    return this.i;
  }
  set index(v: number) {
    this.i = v;
  }
  atEnd(): boolean {
    return this.i >= this.chars.length;
  }
  peek(k = 0): string | undefined {
    return this.chars[this.i + k]?.ch;
  }
  next(): string | undefined {
    const c = this.chars[this.i]?.ch;
    if (c !== undefined) this.i++;
    return c;
  }
  /** True (and consumed) when the text at the cursor is `s`. */
  eat(s: string): boolean {
    const cps = [...s];
    for (let k = 0; k < cps.length; k++) if (this.peek(k) !== cps[k]) return false;
    this.i += cps.length;
    return true;
  }
  /** Is the text at the cursor `s` (without consuming)? */
  looking(s: string): boolean {
    const cps = [...s];
    return cps.every((c, k) => this.peek(k) === c);
  }
  /** The ASCII word at the cursor (letters, digits, `_`, `-`), without consuming. */
  peekWord(): string {
    let k = 0;
    let w = "";
    while (true) {
      const c = this.peek(k);
      if (c === undefined || !(isIdentChar(c) || c === "-")) break;
      w += c;
      k++;
    }
    return w;
  }
  /** Whether the word at the cursor is exactly `w` (followed by a non-word character). */
  lookingWord(w: string): boolean {
    if (!this.looking(w)) return false;
    const after = this.peek([...w].length);
    return after === undefined || !(isIdentChar(after) || after === "-");
  }
  eatWord(w: string): boolean {
    if (!this.lookingWord(w)) return false;
    this.i += [...w].length;
    return true;
  }
  skipSpace(): void {
    while (isSpace(this.peek())) this.i++;
  }
  /** Whether whitespace precedes the cursor (or it is at the start). */
  spaceBefore(): boolean {
    return this.i === 0 || isSpace(this.chars[this.i - 1]?.ch);
  }
  /** The span from char index `start` up to the cursor (at least one code point long). */
  spanFrom(start: number): Span {
    const first = this.posAt(start);
    const endIdx = Math.max(start + 1, this.i);
    const last = this.chars[endIdx - 1];
    const length = last !== undefined && last.line === first.line ? last.column - first.column + 1 : 1;
    return { file: this.file, line: first.line, column: first.column, length: Math.max(1, length) };
  }
  /** A one-or-more code point span at the cursor. */
  spanHere(length = 1): Span {
    const p = this.posAt(this.i);
    return { file: this.file, line: p.line, column: p.column, length };
  }
  /** A one code point span at char index `idx`. */
  spanHereAt(idx: number): Span {
    const p = this.posAt(idx);
    return { file: this.file, line: p.line, column: p.column, length: 1 };
  }
  private posAt(idx: number): { line: number; column: number } {
    const c = this.chars[idx];
    if (c !== undefined) return c;
    const last = this.chars[this.chars.length - 1];
    if (last === undefined) return { line: 1, column: 1 };
    return { line: last.line, column: last.column + 1 };
  }
  /** Text from `start` to the cursor. */
  textFrom(start: number): string {
    return this.chars
      .slice(start, this.i)
      .map((c) => c.ch)
      .join("");
  }
  /** Skip to the end of the statement (error recovery inside a statement). */
  skipToEnd(): void {
    this.i = this.chars.length;
  }
  /** A short description of what stands at the cursor, for "expected …, found …" messages. */
  describeHere(): string {
    const c = this.peek();
    if (c === undefined) return "the end of the statement";
    if (c === "\n") return "the end of the line";
    const w = this.peekWord();
    if (w.length > 1) return `'${w}'`;
    return `'${c}'`;
  }
}
