// Grammar parser, pattern level: SPE elements and patterns inside one statement — bundles and
// feature specs, segments, classes, boundaries, `( )`, `{ | }`, subscripts — with exact spans.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { Element, FeatureSpec, Pattern, Span } from "./ast.js";
import {
  isAsciiUpper,
  isDigit,
  isIdentChar,
  isIdentStart,
  isIpaChar,
  isSpace,
  Scanner,
  SUBSCRIPT_DIGITS,
  SUPERSCRIPT_DIGITS,
  type Statement,
} from "./lexer.js";

/** Raised inside one statement to abandon it; caught per statement, never escapes the parser. */
export class Abort {
  constructor(readonly diagnostic: Diagnostic) {}
}

/** ∅ while parsing a sequence; only allowed as a whole target or change. */
export type Item = Pattern | { readonly kind: "null"; readonly span: Span };

const GREEK_VARIABLE = /^[\u03b1-\u03c9]$/u;
const ASCII_VARIABLES: ReadonlyMap<string, string> = new Map([
  ["alpha", "α"],
  ["beta", "β"],
  ["gamma", "γ"],
  ["delta", "δ"],
]);

/**
 * Limits that keep every later stage (desugaring, the interpreter's matcher, the compiler's
 * context recognisers) within its stack and time: groups `( )` / `{ }` nested at most
 * MAX_NESTING deep, and at most MAX_ELEMENTS elements in one statement. Past either, the
 * statement is reported at the element that crosses the limit (`grammar/too-deep`, `grammar/too-long`).
 */
export const MAX_NESTING = 64;
export const MAX_ELEMENTS = 10_000;

/** Words that end a pattern (inside environments they are keywords, not IPA). */
export const RESERVED_IN_PATTERNS = ["where", "mirrored", "unless"] as const;

/** Where a pattern sequence is being read (it decides what may appear, e.g. ∅). */
export type PatternContext = "target" | "change" | "environment" | "group" | "heavy";

/** The pattern-level methods shared by the statement parsers; one instance per statement. */
export class PatternParser {
  readonly sc: Scanner;
  readonly warnings: Diagnostic[] = [];
  /** Groups open at the cursor, and elements read so far in this statement (see MAX_NESTING). */
  private depth = 0;
  private elements = 0;

  constructor(
    readonly file: string,
    readonly st: Statement,
  ) {
    this.sc = new Scanner(file, st.chars);
  }

  /** Inline whitespace only (the statement's own line); used where a value must follow on the line. */
  space(): void {
    this.sc.skipSpace();
  }

  fail(code: string, message: string, span: Span = this.sc.spanHere()): never {
    throw new Abort(diagnostic("error", code, message, span));
  }

  expected(what: string): never {
    this.fail("grammar/syntax", `expected ${what}, found ${this.sc.describeHere()}`);
  }


  noNull(items: Item[]): Pattern[] {
    return items.map((i) => {
      if (i.kind === "null") this.fail("grammar/null-misplaced", "∅ can only be a whole target or a whole change", i.span);
      return i;
    });
  }

  /** A `_` that marks the target's place (not an ASCII subscript such as `C_0`). */
  placeholderAhead(): boolean {
    return this.sc.peek() === "_" && !(isDigit(this.sc.peek(1)) && !this.sc.spaceBefore());
  }

  subscriptAhead(): boolean {
    const c = this.sc.peek();
    return (c !== undefined && SUBSCRIPT_DIGITS.includes(c)) || (c === "_" && isDigit(this.sc.peek(1)));
  }

  /**
   * A sequence of pattern items, stopping (without consuming) at the end, an arrow, '/', '_',
   * '|', ')', '}', ',' or the word `where`.
   */
  sequence(ctx: PatternContext): Item[] {
    const sc = this.sc;
    const out: Item[] = [];
    while (true) {
      sc.skipSpace();
      const c = sc.peek();
      if (c === undefined || c === "/" || c === "|" || c === ")" || c === "}" || c === "," || c === "→") break;
      if (sc.looking("->")) break;
      if (c === "_" && this.placeholderAhead()) break;
      if (RESERVED_IN_PATTERNS.some((w) => sc.lookingWord(w))) break;
      out.push(this.item(ctx));
    }
    return out;
  }

  /** An atom with an optional SPE subscript/superscript: `C₀`, `C₁`, `C₀²`, `C_0`, `C_0^2`. */
  item(ctx: PatternContext): Item {
    const sc = this.sc;
    const start = sc.index;
    const atom = this.atom(ctx);
    if (!this.subscriptAhead()) {
      if (sc.peek() === "^" || (sc.peek() !== undefined && SUPERSCRIPT_DIGITS.includes(sc.peek()!)))
        this.fail("grammar/bad-subscript", "a maximum (superscript) needs a minimum subscript first, as in C₀²");
      return atom;
    }
    if (atom.kind === "null") this.fail("grammar/bad-subscript", "∅ cannot be repeated", atom.span);
    let min: number;
    let max: number | null = null;
    if (sc.eat("_")) {
      min = this.digits("0123456789");
      if (sc.eat("^")) {
        if (!isDigit(sc.peek())) this.expected("a digit after '^'");
        max = this.digits("0123456789");
      }
    } else {
      min = this.digits(SUBSCRIPT_DIGITS);
      if (sc.peek() !== undefined && SUPERSCRIPT_DIGITS.includes(sc.peek()!)) max = this.digits(SUPERSCRIPT_DIGITS);
    }
    const span = sc.spanFrom(start);
    if (max !== null && max < min)
      this.fail("grammar/bad-subscript", `the maximum ${max} is below the minimum ${min}`, span);
    if (max === 0) this.fail("grammar/bad-subscript", "a maximum of 0 repetitions matches nothing", span);
    return { kind: "repeat", body: atom, min, max, span };
  }

  digits(alphabet: string): number {
    const sc = this.sc;
    let n = 0;
    let any = false;
    while (sc.peek() !== undefined && alphabet.includes(sc.peek()!)) {
      n = n * 10 + alphabet.indexOf(sc.next()!);
      any = true;
    }
    if (!any) this.expected("a digit");
    return n;
  }

  atom(ctx: PatternContext | "class"): Item {
    const sc = this.sc;
    const start = sc.index;
    const c = sc.peek();
    if (++this.elements > MAX_ELEMENTS) this.tooLong();
    if (c === "(" || c === "{") {
      if (this.depth >= MAX_NESTING)
        this.fail("grammar/too-deep", `groups '( )' and '{ }' may be nested at most ${MAX_NESTING} deep`);
      this.depth++;
      try {
        return this.group(start, c);
      } finally {
        this.depth--;
      }
    }
    return this.simpleAtom(ctx, start, c);
  }

  private tooLong(): never {
    return this.fail("grammar/too-long", `a statement may hold at most ${MAX_ELEMENTS} elements; split the rule or use a class or a repetition`);
  }

  /** `( … )` or `{ … | … }`, the opening bracket at the cursor. */
  private group(start: number, c: "(" | "{"): Item {
    const sc = this.sc;
    if (c === "(") {
      sc.next();
      const body = this.noNull(this.sequence("group"));
      sc.skipSpace();
      if (!sc.eat(")")) {
        if (sc.atEnd()) this.fail("grammar/unclosed", "this '(' is never closed", sc.spanFrom(start));
        this.expected("')'");
      }
      const span = sc.spanFrom(start);
      if (body.length === 0) this.fail("grammar/empty-group", "an optional part '( )' is empty", span);
      return { kind: "optional", body: this.toPattern(body, span), span };
    }
    sc.next();
    const options: Pattern[] = [];
    while (true) {
      const os = sc.index;
      const body = this.noNull(this.sequence("group"));
      sc.skipSpace();
      if (body.length === 0) this.fail("grammar/empty-group", "a choice '{ | }' has an empty option", sc.spanHereAt(os));
      options.push(this.toPattern(body, coverSpan(body, sc.spanHereAt(os))));
      if (sc.eat("|")) continue;
      if (sc.eat("}")) break;
      if (sc.atEnd()) this.fail("grammar/unclosed", "this '{' is never closed", sc.spanHereAt(start));
      this.expected("'|' or '}'");
    }
    return { kind: "choice", options, span: sc.spanFrom(start) };
  }

  /** Everything but a group: bundle, boundary, ∅, class name, IPA segment run. */
  private simpleAtom(ctx: PatternContext | "class", start: number, c: string | undefined): Item {
    const sc = this.sc;
    if (c === "[") return { kind: "element", element: this.bundle() };
    // `+` before a letter is a feature value written outside a bundle (an error below), not a join.
    if (c === "#" || c === "$" || c === "." || (c === "+" && !/^[A-Za-z]$/.test(sc.peek(1) ?? ""))) {
      sc.next();
      return { kind: "element", element: { kind: "boundary", which: c === "#" ? "word" : c === "+" ? "join" : "syllable", span: sc.spanFrom(start) } };
    }
    if (c === "∅" || (c === "0" && !isDigit(sc.peek(1)))) {
      sc.next();
      const span = sc.spanFrom(start);
      if (ctx === "target" || ctx === "change") return { kind: "null", span };
      this.fail("grammar/null-misplaced", "∅ can only be a whole target or a whole change", span);
    }
    if (isAsciiUpper(c)) {
      while (/^[A-Za-z0-9]$/.test(sc.peek() ?? "")) sc.next();
      return { kind: "element", element: { kind: "class", name: sc.textFrom(start), span: sc.spanFrom(start) } };
    }
    if (isIpaChar(c)) {
      // A run splits into up to one segment per code point (by the loader): each counts.
      while (isIpaChar(sc.peek())) {
        sc.next();
        if (sc.index - start > 1 && ++this.elements > MAX_ELEMENTS) this.tooLong();
      }
      const symbol = sc.textFrom(start).normalize("NFC");
      return { kind: "element", element: { kind: "segment", symbol, span: sc.spanFrom(start) } };
    }
    if (c === "ˈ" || c === "ˌ")
      this.fail("grammar/stress-mark", "stress marks are not segments in rules; use [+stress] or [+primary] on a nucleus");
    if (c === "]") this.fail("grammar/syntax", "this ']' closes no '['");
    if (c === "-" || c === "−" || c === "+")
      this.fail("grammar/syntax", `'${c}' outside '[ ]': feature values go inside a bundle, as in [${c === "+" ? "+" : "-"}voice]`);
    return this.expected(ctx === "class" ? "a bundle, a segment or a class name" : "a segment, bundle, class, boundary, '(' or '{'");
  }

  /** `[ spec spec … ]` where spec is `+f`, `-f`, `−f`, `0f`, `αf`, `-αf`, `alpha f`, `α node`; commas optional. */
  bundle(): Element & { kind: "bundle" } {
    const sc = this.sc;
    const start = sc.index;
    sc.next(); // '['
    const specs: FeatureSpec[] = [];
    while (true) {
      sc.skipSpace();
      if (sc.eat("]")) break;
      if (sc.eat(",")) continue;
      if (sc.atEnd() || sc.peek() === "[" )
        this.fail("grammar/unclosed", "this '[' is never closed", sc.spanHereAt(start));
      specs.push(this.spec());
    }
    return { kind: "bundle", specs, span: sc.spanFrom(start) };
  }

  spec(): FeatureSpec {
    const sc = this.sc;
    const start = sc.index;
    let sign: "+" | "-" | "0" | null = null;
    const c = sc.peek();
    if (c === "+") sign = "+";
    else if (c === "-" || c === "−") sign = "-";
    else if (c === "0") sign = "0";
    if (sign !== null) {
      sc.next();
      while (sc.peek() === " " || sc.peek() === "\t") sc.next();
    }
    // alpha variable?
    let variable: string | null = null;
    const v = sc.peek();
    if (v !== undefined && GREEK_VARIABLE.test(v)) {
      variable = v;
      sc.next();
    } else {
      for (const [ascii, greek] of ASCII_VARIABLES) {
        if (sc.looking(ascii) && isSpace(sc.peek([...ascii].length))) {
          sc.index = sc.index + ascii.length;
          variable = greek;
          break;
        }
      }
    }
    if (variable !== null) sc.skipSpace();
    const fs = sc.index;
    if (!isIdentStart(sc.peek())) {
      if (variable !== null) this.expected(`a feature or node name after the variable ${variable}`);
      if (sign !== null) this.expected(`a feature name after '${sign === "-" ? c : sign}'`);
      this.expected("a feature value (+, -, − or 0) and name, or ']'");
    }
    while (isIdentChar(sc.peek())) sc.next();
    const feature = sc.textFrom(fs);
    const span = sc.spanFrom(start);
    if (variable !== null) {
      if (sign === "0") this.fail("grammar/bad-feature-value", "a variable takes '+' or '-', not '0'", span);
      return { kind: "variable", feature, variable, negated: sign === "-", span };
    }
    if (sign === null)
      this.fail("grammar/bad-feature-value", `feature '${feature}' needs a value: +${feature}, -${feature} or 0${feature}`, span);
    return { kind: "value", feature, value: sign, span };
  }

  toPattern(items: readonly Pattern[], span: Span): Pattern {
    return items.length === 1 ? items[0]! : { kind: "sequence", items, span };
  }
}

/**
 * The span from the first to the last of `items` (on one line; across lines it keeps the first
 * item's line and runs to that line's end of the first item), or `empty` when there are none.
 */
export function coverSpan(items: readonly Item[], empty: Span): Span {
  return coverSpans(items.map(itemSpan), empty);
}

export function coverSpans(spans: readonly Span[], empty: Span): Span {
  const first = spans[0];
  const last = spans[spans.length - 1];
  if (first === undefined || last === undefined) return empty;
  if (last.line !== first.line) return first;
  return { ...first, length: Math.max(1, last.column + last.length - first.column) };
}

export const itemSpan = (i: Item): Span => (i.kind === "null" ? i.span : patternSpan(i));

/** The span of any pattern (element patterns take their element's span). */
export function patternSpan(p: Pattern): Span {
  return p.kind === "element" ? p.element.span : p.span;
}

/** Source-like text of an element, used to name implicit classes (`{t|d}`). */
export function elementText(e: Element): string {
  switch (e.kind) {
    case "segment":
      return e.symbol;
    case "class":
      return e.name;
    case "boundary":
      return e.which === "word" ? "#" : e.which === "join" ? "+" : "$";
    case "bundle":
      return `[${e.specs.map(specText).join(" ")}]`;
  }
}

export function specText(s: FeatureSpec): string {
  if (s.kind === "value") return `${s.value}${s.feature}`;
  return `${s.negated ? "-" : ""}${s.variable}${s.feature}`;
}
