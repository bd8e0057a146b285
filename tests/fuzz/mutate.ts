// Mutation-style generators for the reader fuzz tests: take a valid file and inject the characters
// that break readers (CR, LF, quotes, commas, NUL, BOM, astral characters, long runs, bad UTF-8),
// delete or duplicate stretches; and shared checks that every diagnostic is positioned inside its file.

import fc from "fast-check";
import { expect } from "vitest";

/** Strings that readers handle specially or that once broke one. */
const NASTY = [
  "\r", "\n", "\r\n", "\r\r\n", '"', '""', ",", ",,", "\u0000", "\ufeff", "\ufffd", "\t", " ", "#", "\\",
  "\u{1D538}", "\u{1F600}", "é", "e\u0301", "\u00a0", "\u2028", "\u0007", "\u007f", "\ud800", "{", "}", "[", "]",
  "(", ")", "/", "_", "-", ":", "'", "ˈ", "ˌ", ".", "ə", "0", "9", "--", "\u0085",
];

/** One edit of a text. */
type Edit = { kind: "insert"; at: number; text: string } | { kind: "delete"; at: number; length: number } | { kind: "duplicate"; at: number; length: number };

const editArb: fc.Arbitrary<Edit> = fc.oneof(
  { weight: 6, arbitrary: fc.record({ kind: fc.constant("insert" as const), at: fc.nat(), text: fc.constantFrom(...NASTY) }) },
  {
    weight: 1,
    arbitrary: fc.record({
      kind: fc.constant("insert" as const),
      at: fc.nat(),
      // a long run: a long line, or many fields
      text: fc.tuple(fc.constantFrom("ə", "\u{1D538}", '"\u{1F600}",', ",", "a"), fc.integer({ min: 200, max: 2500 })).map(([s, n]) => s.repeat(n)),
    }),
  },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant("insert" as const), at: fc.nat(), text: fc.string({ maxLength: 6, unit: "binary" }) }) },
  { weight: 2, arbitrary: fc.record({ kind: fc.constant("delete" as const), at: fc.nat(), length: fc.integer({ min: 1, max: 40 }) }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant("duplicate" as const), at: fc.nat(), length: fc.integer({ min: 1, max: 200 }) }) },
);

function apply(text: string, e: Edit): string {
  const at = text.length === 0 ? 0 : e.at % (text.length + 1);
  switch (e.kind) {
    case "insert":
      return text.slice(0, at) + e.text + text.slice(at);
    case "delete":
      return text.slice(0, at) + text.slice(at + e.length);
    case "duplicate":
      return text.slice(0, at + e.length) + text.slice(at, at + e.length) + text.slice(at + e.length);
  }
}

/** A valid text with 1–6 edits (and sometimes none). */
export const mutated = (base: string): fc.Arbitrary<string> =>
  fc.array(editArb, { minLength: 0, maxLength: 6 }).map((edits) => edits.reduce(apply, base));

/** The bytes of a text, sometimes with one byte changed or inserted to make invalid UTF-8. */
export const mutatedBytes = (base: string): fc.Arbitrary<Buffer> =>
  fc.tuple(mutated(base), fc.option(fc.tuple(fc.nat(), fc.integer({ min: 0x80, max: 0xff }), fc.boolean()), { freq: 4 })).map(([text, b]) => {
    const buf = Buffer.from(text, "utf8");
    if (b === null || buf.length === 0) return buf;
    const [at0, byte, replace] = b;
    const at = at0 % buf.length;
    return replace ? Buffer.concat([buf.subarray(0, at), Buffer.from([byte]), buf.subarray(at + 1)]) : Buffer.concat([buf.subarray(0, at), Buffer.from([byte]), buf.subarray(at)]);
  });

/** Cut points splitting `n` bytes into chunks (as a stream delivers them). */
export const chunksOf = (bytes: Buffer): fc.Arbitrary<Buffer[]> =>
  fc.uniqueArray(fc.integer({ min: 1, max: Math.max(1, bytes.length - 1) }), { maxLength: bytes.length > 1 ? 6 : 0 }).map((cuts) => {
    const at = [0, ...[...cuts].sort((x, y) => x - y), bytes.length];
    return at.slice(1).map((end, i) => bytes.subarray(at[i]!, end));
  });

/** Physical lines by the test's own count: a line ends at CR LF, LF or a lone CR; a leading BOM is not text. */
export function ownLines(text: string): string[] {
  const t = text.startsWith("\ufeff") ? text.slice(1) : text;
  const out: string[] = [];
  const re = /([^\r\n]*)(\r\n|\n|\r|$)/gy;
  let m: RegExpExecArray | null;
  while ((m = re.exec(t)) !== null) {
    if (m[2] === "" && m[1] === "") break;
    out.push(m[1]!);
    if (m[2] === "") break;
  }
  return out;
}

/** A diagnostic-like position. */
interface Positioned {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  readonly code?: string;
}

/** Every position lies inside the text: 1 ≤ line ≤ its line count (line 1 for an empty file), 1 ≤ column ≤ the line's length + 1. */
export function expectPositionedInside(items: readonly Positioned[], text: string, file: string): void {
  const lines = ownLines(text);
  for (const d of items) {
    if (d.file !== file) continue;
    const where = `${d.code ?? "?"} at ${d.line}:${d.column}`;
    expect(Number.isInteger(d.line) && d.line >= 1, where).toBe(true);
    expect(d.line <= Math.max(1, lines.length), `${where}: beyond the ${lines.length} lines`).toBe(true);
    const len = [...(lines[d.line - 1] ?? "")].length;
    expect(Number.isInteger(d.column) && d.column >= 1 && d.column <= len + 1, `${where}: line ${d.line} has ${len} characters`).toBe(true);
  }
}
