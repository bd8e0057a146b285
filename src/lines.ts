// What a line is, for every position Strata reports and every source line it shows: one definition
// shared by the readers and by diagnostic rendering, so a position always points at the line shown.

/*
 * A line ends at CR LF, at LF, or at a lone CR (the three line ends of text files in use; a file
 * with CR-only line ends is read line by line like any other). A line break at the very end of the
 * text does not start another line. A leading byte-order mark (U+FEFF) is not part of line 1: it is
 * not shown and columns do not count it. Columns count Unicode code points from 1.
 */

/** The line-end pattern (CR LF first, so that it counts as one break). */
export const LINE_BREAK = /\r\n|\r|\n/;

/** The text without a leading byte-order mark. */
export const stripBom = (text: string): string => (text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);

/** The lines of a text (leading BOM removed; no empty last line for a final line break). */
export function splitLines(text: string): string[] {
  const lines = stripBom(text).split(LINE_BREAK);
  if (lines.length > 1 && lines[lines.length - 1] === "") lines.pop();
  return lines;
}

/** How many lines a text has (0 for an empty text). */
export function lineCount(text: string): number {
  const t = stripBom(text);
  return t === "" ? 0 : splitLines(t).length;
}

/** Code points in `s[from, to)` (a surrogate pair counts once). Linear. */
export function codePointsBetween(s: string, from: number, to: number): number {
  let n = 0;
  for (let i = from; i < to; i++) {
    const c = s.charCodeAt(i);
    // A low surrogate right after a high one belongs to the same code point.
    if (c >= 0xdc00 && c <= 0xdfff && i > from) {
      const p = s.charCodeAt(i - 1);
      if (p >= 0xd800 && p <= 0xdbff) continue;
    }
    n++;
  }
  return n;
}

/**
 * Line and column (1-based) of the UTF-16 offset `offset` of `text` (a leading BOM is not counted;
 * an offset inside a CR LF pair is on the line the pair ends; the very end of a text that ends in
 * a line break is the end of its last line, not a line of its own). Linear in `offset`.
 */
export function positionAt(text: string, offset: number): { line: number; column: number } {
  const start = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  let end = Math.max(start, Math.min(offset, text.length));
  if (end === text.length && end > start) {
    const last = text.charCodeAt(end - 1);
    if (last === 10) end -= end - 2 >= start && text.charCodeAt(end - 2) === 13 ? 2 : 1;
    else if (last === 13) end -= 1;
  }
  let line = 1;
  let lineStart = start;
  for (let i = start; i < end; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: codePointsBetween(text, lineStart, end) + 1 };
}
