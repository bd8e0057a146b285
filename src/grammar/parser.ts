// Grammar parser: one .strata file's text → top-level items with exact spans, and their assembly
// into a Grammar. Pure (no file system); never throws; an error skips to the next statement.

import * as path from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type {
  ApplicationMode,
  ChangeElement,
  ClassDef,
  Cluster,
  Element,
  Environment,
  FeatureSpec,
  Grammar,
  NodeDef,
  Pattern,
  ProsodicCondition,
  Rule,
  Span,
  Step,
} from "./ast.js";
import {
  isAsciiUpper,
  isDigit,
  isIdentChar,
  isIdentStart,
  isIpaChar,
  isSpace,
  Scanner,
  splitStatements,
  SUBSCRIPT_DIGITS,
  SUPERSCRIPT_DIGITS,
  type Statement,
} from "./lexer.js";

/** The statement keywords, in the order DEVELOPERS.md lists them. */
export const STATEMENT_KEYWORDS = [
  "inventory",
  "diacritics",
  "include",
  "node",
  "class",
  "onsets",
  "codas",
  "heavy",
  "syllabify",
  "stress",
  "rule",
] as const;

export const PROSODIC_CONDITIONS: readonly ProsodicCondition[] = [
  "onset",
  "nucleus",
  "coda",
  "syllable-initial",
  "syllable-final",
  "word-initial",
  "word-final",
  "stressed",
  "unstressed",
  "primary",
];

/** One top-level statement after parsing, in file order (includes are expanded by the loader). */
export type TopItem =
  | { readonly kind: "include"; readonly path: string; readonly written: string; readonly span: Span }
  | { readonly kind: "inventory" | "diacritics"; readonly path: string; readonly span: Span }
  | { readonly kind: "node"; readonly def: NodeDef }
  /** `implicit`: made by the parser for a `{a | b}` choice in a rule target. */
  | { readonly kind: "class"; readonly def: ClassDef; readonly implicit: boolean }
  | { readonly kind: "onsets" | "codas"; readonly clusters: readonly Cluster[]; readonly span: Span }
  | { readonly kind: "heavy"; readonly patterns: readonly Pattern[]; readonly span: Span }
  | { readonly kind: "step"; readonly step: Step };

export interface ParsedFile {
  readonly file: string;
  readonly items: readonly TopItem[];
  readonly diagnostics: readonly Diagnostic[];
}

/** Raised inside one statement to abandon it; caught per statement, never escapes the parser. */
class Abort {
  constructor(readonly diagnostic: Diagnostic) {}
}

/** ∅ while parsing a sequence; only allowed as a whole target or change. */
type Item = Pattern | { readonly kind: "null"; readonly span: Span };

const GREEK_VARIABLE = /^[\u03b1-\u03c9]$/u;
const ASCII_VARIABLES: ReadonlyMap<string, string> = new Map([
  ["alpha", "α"],
  ["beta", "β"],
  ["gamma", "γ"],
  ["delta", "δ"],
]);

/**
 * Parses one file. `file` is used for spans and to resolve `inventory`/`diacritics`/`include`
 * paths (relative to the file's folder; the path module is used, not the file system).
 */
export function parseFile(text: string, file: string): ParsedFile {
  const items: TopItem[] = [];
  const diagnostics: Diagnostic[] = [];
  try {
    const { statements, orphans } = splitStatements(text);
    for (const o of orphans) {
      const c = o.chars[0]!;
      diagnostics.push(
        diagnostic("error", "grammar/orphan-line", "this indented line does not continue any statement", {
          file,
          line: c.line,
          column: c.column,
        }),
      );
    }
    let previousKeyword: string | null = null;
    for (const st of statements) {
      const p: StatementParser = new StatementParser(file, st, items, previousKeyword);
      try {
        p.parse();
      } catch (e) {
        if (e instanceof Abort) diagnostics.push(e.diagnostic);
        else throw e;
      }
      diagnostics.push(...p.warnings);
      previousKeyword = p.keyword;
    }
  } catch (e) {
    // A bug in the parser must still surface as a positioned diagnostic, not a stack trace.
    diagnostics.push(
      diagnostic("error", "grammar/internal", `internal parser error: ${e instanceof Error ? e.message : String(e)}`, {
        file,
        line: 1,
        column: 1,
      }),
    );
  }
  return { file, items, diagnostics };
}

/**
 * Parses a grammar from text: the contract's pure entry point. `include` statements are not
 * followed (use `loadGrammar`); IPA literals stay as written until the loader splits them.
 */
export function parseGrammarText(text: string, file: string): { grammar: Grammar; diagnostics: Diagnostic[] } {
  const parsed = parseFile(text, file);
  const assembled = assembleGrammar(file, parsed.items, [file]);
  return { grammar: assembled.grammar, diagnostics: [...parsed.diagnostics, ...assembled.diagnostics] };
}

/**
 * Builds a Grammar from items in order (includes already expanded or ignored). Reports a second
 * `inventory`, `diacritics`, `onsets`, `codas` or `heavy`, and a node or class defined twice.
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
  return {
    grammar: { file, inventory, diacritics, nodes, classes, onsets, codas, heavy: heavy ?? [], steps, files },
    diagnostics,
  };
}

const where = (s: Span): string => `${path.basename(s.file)}:${s.line}:${s.column}`;

/** Parses one statement; pushes its item(s) to `items`. Throws Abort (caught by parseFile) on an error. */
class StatementParser {
  readonly sc: Scanner;
  readonly warnings: Diagnostic[] = [];
  keyword: string | null = null;

  constructor(
    readonly file: string,
    readonly st: Statement,
    readonly items: TopItem[],
    readonly previousKeyword: string | null,
  ) {
    this.sc = new Scanner(file, st.chars);
  }

  fail(code: string, message: string, span: Span = this.sc.spanHere()): never {
    throw new Abort(diagnostic("error", code, message, span));
  }

  expected(what: string): never {
    this.fail("grammar/syntax", `expected ${what}, found ${this.sc.describeHere()}`);
  }

  parse(): void {
    const sc = this.sc;
    const start = sc.index;
    const word = sc.peekWord();
    const kw = (STATEMENT_KEYWORDS as readonly string[]).find((k) => sc.lookingWord(k));
    if (kw === undefined) {
      const shown = word.length > 0 ? `'${word}'` : `'${sc.peek()}'`;
      const text = this.st.chars.map((ch) => ch.ch).join("");
      const hint =
        this.previousKeyword === "rule" && (text.includes("->") || text.includes("→"))
          ? " (the lines of a rule are indented)"
          : "";
      this.fail(
        "grammar/unknown-statement",
        `${shown} does not start a statement; expected one of ${STATEMENT_KEYWORDS.join(", ")}${hint}`,
        sc.spanHere(Math.max(1, [...word].length)),
      );
    }
    this.keyword = kw;
    sc.eatWord(kw);
    const kwSpan = sc.spanFrom(start);
    switch (kw) {
      case "inventory":
      case "diacritics": {
        const p = this.pathArgument();
        this.items.push({ kind: kw, path: p.resolved, span: p.span });
        break;
      }
      case "include": {
        const p = this.pathArgument();
        this.items.push({ kind: "include", path: p.resolved, written: p.written, span: p.span });
        break;
      }
      case "node":
        this.node();
        break;
      case "class":
        this.classDef();
        break;
      case "onsets":
      case "codas":
        this.clusters(kw, kwSpan);
        break;
      case "heavy":
        this.heavy(kwSpan);
        break;
      case "syllabify":
        this.end();
        this.items.push({ kind: "step", step: { kind: "syllabify", name: "syllabify", span: kwSpan } });
        break;
      case "stress":
        this.stress(start);
        break;
      case "rule":
        this.rule();
        break;
    }
  }

  /** Nothing may follow the statement. */
  end(): void {
    this.sc.skipSpace();
    if (!this.sc.atEnd()) this.fail("grammar/syntax", `unexpected ${this.sc.describeHere()} at the end of the statement`);
  }

  /** Inline whitespace only (the statement's own line); used where a value must follow on the line. */
  space(): void {
    this.sc.skipSpace();
  }

  // inventory "path" | diacritics "path" | include "path"
  pathArgument(): { written: string; resolved: string; span: Span } {
    const sc = this.sc;
    this.space();
    const start = sc.index;
    if (!sc.eat('"')) this.expected('a quoted path ("…")');
    let text = "";
    while (!sc.atEnd() && sc.peek() !== '"' && sc.peek() !== "\n") text += sc.next();
    if (!sc.eat('"')) this.fail("grammar/unterminated-string", "this quoted path has no closing '\"'", sc.spanFrom(start));
    const span = sc.spanFrom(start);
    if (text.length === 0) this.fail("grammar/empty-path", "the path is empty", span);
    this.end();
    const resolved = path.isAbsolute(text) ? path.normalize(text) : path.join(path.dirname(this.file), text);
    return { written: text, resolved, span };
  }

  equals(): void {
    this.space();
    if (!this.sc.eat("=")) this.expected("'='");
    this.space();
  }

  // node NAME = feature feature …
  node(): void {
    const sc = this.sc;
    this.space();
    const start = sc.index;
    if (!isIdentStart(sc.peek()) || isAsciiUpper(sc.peek()))
      this.expected("a node name (lower-case letters, digits, '_')");
    while (isIdentChar(sc.peek())) sc.next();
    const name = sc.textFrom(start);
    const span = sc.spanFrom(start);
    this.equals();
    const features: string[] = [];
    while (!sc.atEnd()) {
      if (!isIdentStart(sc.peek())) this.expected("a feature name");
      const fs = sc.index;
      while (isIdentChar(sc.peek())) sc.next();
      features.push(sc.textFrom(fs));
      sc.skipSpace();
    }
    if (features.length === 0) this.fail("grammar/empty-node", `node '${name}' groups no features`, span);
    this.items.push({ kind: "node", def: { name, features, span } });
  }

  // class NAME = member member …   (members: bundles, IPA segments, class names; '|' optional)
  classDef(): void {
    const sc = this.sc;
    this.space();
    const start = sc.index;
    if (!isAsciiUpper(sc.peek())) this.expected("a class name (an ASCII capital, then letters and digits)");
    while (/^[A-Za-z0-9]$/.test(sc.peek() ?? "")) sc.next();
    const name = sc.textFrom(start);
    const span = sc.spanFrom(start);
    if (sc.peek() !== undefined && !isSpace(sc.peek()) && sc.peek() !== "=")
      this.fail("grammar/bad-name", "a class name is an ASCII capital followed by ASCII letters and digits");
    this.equals();
    const members: Element[] = [];
    while (!sc.atEnd()) {
      if (sc.eat("|")) {
        sc.skipSpace();
        continue;
      }
      const item = this.atom("class");
      if (item.kind !== "element" || item.element.kind === "boundary")
        this.fail("grammar/bad-class-member", "a class member is a bundle, a segment or a class", itemSpan(item));
      members.push(item.element);
      if (this.subscriptAhead()) this.fail("grammar/bad-class-member", "a class member cannot be repeated");
      sc.skipSpace();
    }
    if (members.length === 0) this.fail("grammar/empty-class", `class '${name}' has no members`, span);
    this.items.push({ kind: "class", def: { name, members, span }, implicit: false });
  }

  // onsets = cluster cluster …  (IPA, split into segments by the loader)
  clusters(kw: "onsets" | "codas", kwSpan: Span): void {
    const sc = this.sc;
    this.equals();
    const clusters: Cluster[] = [];
    while (!sc.atEnd()) {
      const start = sc.index;
      while (!sc.atEnd() && !isSpace(sc.peek())) {
        if (!isIpaChar(sc.peek()))
          this.fail("grammar/bad-cluster", `'${sc.peek()}' cannot be part of an IPA cluster in '${kw}'`);
        sc.next();
      }
      clusters.push({ segments: [sc.textFrom(start).normalize("NFC")], span: sc.spanFrom(start) });
      sc.skipSpace();
    }
    if (clusters.length === 0) this.fail("grammar/empty-list", `'${kw}' lists no clusters`, kwSpan);
    this.items.push({ kind: kw, clusters, span: kwSpan });
  }

  // heavy = pattern | pattern …
  heavy(kwSpan: Span): void {
    const sc = this.sc;
    this.equals();
    const patterns: Pattern[] = [];
    while (true) {
      const start = sc.index;
      const items = this.sequence("heavy");
      if (items.length === 0) this.expected("a rhyme pattern");
      patterns.push(this.toPattern(this.noNull(items), coverSpan(items, sc.spanHereAt(start))));
      sc.skipSpace();
      if (sc.eat("|")) continue;
      if (sc.atEnd()) break;
      this.expected("'|' or the end of the statement");
    }
    this.items.push({ kind: "heavy", patterns, span: kwSpan });
  }

  // stress from left|right N [if heavy else M]
  stress(start: number): void {
    const sc = this.sc;
    this.space();
    if (!sc.eatWord("from")) this.expected("'from'");
    this.space();
    let edge: "left" | "right";
    if (sc.eatWord("left")) edge = "left";
    else if (sc.eatWord("right")) edge = "right";
    else this.expected("'left' or 'right'");
    this.space();
    const position = this.count();
    let otherwise: number | null = null;
    this.space();
    if (sc.eatWord("if")) {
      this.space();
      if (!sc.eatWord("heavy")) this.expected("'heavy'");
      this.space();
      if (!sc.eatWord("else")) this.expected("'else'");
      this.space();
      otherwise = this.count();
    }
    const span = sc.spanFrom(start);
    this.end();
    this.items.push({ kind: "step", step: { kind: "stress", name: "stress", span, edge, position, otherwise } });
  }

  /** A syllable count: a whole number from 1. */
  count(): number {
    const sc = this.sc;
    const start = sc.index;
    while (isDigit(sc.peek())) sc.next();
    if (sc.index === start) this.expected("a syllable count (1, 2, 3, …)");
    const n = Number(sc.textFrom(start));
    if (!(n >= 1 && n <= 99)) this.fail("grammar/bad-count", "a syllable count is a whole number from 1 to 99", sc.spanFrom(start));
    return n;
  }

  // rule NAME [optional] [simultaneous|left-to-right|right-to-left] [prefer applied|unapplied] : body
  rule(): void {
    const sc = this.sc;
    this.space();
    const nameStart = sc.index;
    if (!/^\p{L}$/u.test(sc.peek() ?? "")) this.expected("a rule name");
    while (/^[\p{L}\p{N}_-]$/u.test(sc.peek() ?? "")) sc.next();
    const name = sc.textFrom(nameStart);
    const span = sc.spanFrom(nameStart);
    let optional: boolean | null = null;
    let mode: ApplicationMode | null = null;
    let prefer: "applied" | "unapplied" | null = null;
    const dup = (what: string, s: Span): never =>
      this.fail("grammar/duplicate-option", `rule '${name}' states ${what} twice`, s);
    while (true) {
      sc.skipSpace();
      if (sc.eat(":")) break;
      const os = sc.index;
      if (sc.eatWord("optional")) {
        if (optional !== null) dup("'optional'", sc.spanFrom(os));
        optional = true;
      } else if (sc.lookingWord("simultaneous") || sc.lookingWord("left-to-right") || sc.lookingWord("right-to-left")) {
        const m = sc.peekWord() as ApplicationMode;
        sc.eatWord(m);
        if (mode !== null) dup("how it applies", sc.spanFrom(os));
        mode = m;
      } else if (sc.eatWord("prefer")) {
        sc.skipSpace();
        let p: "applied" | "unapplied";
        if (sc.eatWord("applied")) p = "applied";
        else if (sc.eatWord("unapplied")) p = "unapplied";
        else this.expected("'applied' or 'unapplied' after 'prefer'");
        if (prefer !== null) dup("'prefer'", sc.spanFrom(os));
        prefer = p;
      } else {
        this.expected("':' or a rule option (optional, simultaneous, left-to-right, right-to-left, prefer applied, prefer unapplied)");
      }
    }
    if (prefer !== null && optional !== true)
      this.warnings.push(
        diagnostic("warning", "grammar/prefer-obligatory", `rule '${name}' is obligatory, so 'prefer' has no effect`, span),
      );
    sc.skipSpace();
    if (sc.atEnd()) this.fail("grammar/empty-rule", `rule '${name}' has no body (TARGET -> CHANGE / ENVIRONMENT)`, span);
    const target = this.target(name);
    const change = this.change();
    const environments: Environment[] = [];
    sc.skipSpace();
    while (!sc.atEnd()) {
      if (!sc.eat("/")) this.expected("'/' before an environment");
      environments.push(this.environment());
      sc.skipSpace();
    }
    const rule: Rule = {
      kind: "rule",
      name,
      span,
      optional: optional ?? false,
      mode: mode ?? "simultaneous",
      prefer: prefer ?? "applied",
      target,
      change,
      environments,
    };
    this.items.push({ kind: "step", step: rule });
  }

  /** TARGET up to the arrow: fixed-length elements, or ∅. A `{a | b}` of single elements becomes an implicit class. */
  target(ruleName: string): Element[] {
    const sc = this.sc;
    const start = sc.index;
    const items = this.sequence("target");
    sc.skipSpace();
    if (!(sc.eat("->") || sc.eat("→"))) this.expected("'->' (or '→') after the target");
    if (items.length === 0) this.fail("grammar/empty-target", `rule '${ruleName}' has no target before the arrow (write ∅ or 0 to insert)`, sc.spanFrom(start));
    if (items.some((i) => i.kind === "null")) {
      if (items.length > 1) this.fail("grammar/null-not-alone", "∅ must be the whole target (insertion)", items.find((i) => i.kind === "null")!.span);
      return [];
    }
    return items.map((it): Element => {
      switch (it.kind) {
        case "element":
          if (it.element.kind === "boundary")
            this.fail("grammar/boundary-target", "a boundary cannot be rewritten; put it in the environment", it.element.span);
          return it.element;
        case "choice": {
          const members: Element[] = [];
          for (const o of it.options) {
            if (o.kind !== "element" || o.element.kind === "boundary")
              this.fail("grammar/target-not-fixed", "each choice in a target must be a single segment, bundle or class", patternSpan(o));
            members.push(o.element);
          }
          const name = `{${members.map(elementText).join("|")}}`;
          const cspan = it.span;
          this.items.push({ kind: "class", def: { name, members, span: cspan }, implicit: true });
          return { kind: "class", name, span: cspan };
        }
        case "optional":
        case "repeat":
        case "sequence":
          return this.fail(
            "grammar/target-not-fixed",
            "a target is a fixed sequence of segments: no optional parts or repetition",
            it.span,
          );
        case "null":
          return this.fail("grammar/null-not-alone", "∅ must be the whole target", it.span);
      }
    });
  }

  /** CHANGE after the arrow: bundles and segments, or ∅. */
  change(): ChangeElement[] {
    const sc = this.sc;
    sc.skipSpace();
    const start = sc.index;
    const items = this.sequence("change");
    if (items.length === 0) this.fail("grammar/empty-change", "expected a change after the arrow (write ∅ or 0 to delete)", sc.spanFrom(start));
    if (items.some((i) => i.kind === "null")) {
      if (items.length > 1) this.fail("grammar/null-not-alone", "∅ must be the whole change (deletion)", items.find((i) => i.kind === "null")!.span);
      return [];
    }
    return items.map((it): ChangeElement => {
      if (it.kind === "element") {
        const e = it.element;
        if (e.kind === "bundle" || e.kind === "segment") return e;
        if (e.kind === "class")
          this.fail("grammar/class-in-change", `a change cannot be a class ('${e.name}'); write a bundle or a segment`, e.span);
        this.fail("grammar/boundary-in-change", "a change cannot write a boundary", e.span);
      }
      return this.fail("grammar/bad-change", "a change is a sequence of bundles and segments (no optional parts, choices or repetition)", it.span);
    });
  }

  // / LEFT _ RIGHT [where cond, cond …]
  environment(): Environment {
    const sc = this.sc;
    sc.skipSpace();
    const start = sc.index;
    const leftStart = sc.index;
    const left = this.sequence("environment");
    const leftSpan = coverSpan(left, sc.spanHereAt(leftStart));
    sc.skipSpace();
    if (!this.placeholderAhead()) this.expected("'_' (the target's place) in the environment");
    const underscore = sc.spanHere();
    sc.next();
    sc.skipSpace();
    const rightStart = sc.index;
    const right = this.sequence("environment");
    const rightSpan = coverSpan(right, sc.spanHereAt(rightStart));
    sc.skipSpace();
    if (this.placeholderAhead()) this.fail("grammar/extra-underscore", "an environment has only one '_'");
    const conditions: { condition: ProsodicCondition; span: Span }[] = [];
    if (sc.eatWord("where")) {
      sc.skipSpace();
      while (true) {
        const cs = sc.index;
        const w = sc.peekWord();
        const c = PROSODIC_CONDITIONS.find((p) => p === w);
        if (w.length === 0) this.expected(`a condition (${PROSODIC_CONDITIONS.join(", ")})`);
        sc.eatWord(w);
        if (c === undefined)
          this.fail("grammar/unknown-condition", `'${w}' is not a condition; use one of ${PROSODIC_CONDITIONS.join(", ")}`, sc.spanFrom(cs));
        conditions.push({ condition: c, span: sc.spanFrom(cs) });
        sc.skipSpace();
        if (sc.eat(",")) {
          sc.skipSpace();
          continue;
        }
        if (sc.atEnd() || sc.peek() === "/") break;
        if (/^[a-z]$/.test(sc.peek() ?? "")) continue;
        this.expected("',' or another environment");
      }
    }
    const span = coverSpans(
      [sc.spanHereAt(start), ...left.map(itemSpan), underscore, ...right.map(itemSpan), ...conditions.map((c) => c.span)],
      sc.spanHereAt(start),
    );
    return {
      left: { kind: "sequence", items: this.noNull(left), span: leftSpan },
      right: { kind: "sequence", items: this.noNull(right), span: rightSpan },
      conditions,
      span,
    };
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
  sequence(ctx: "target" | "change" | "environment" | "group" | "heavy"): Item[] {
    const sc = this.sc;
    const out: Item[] = [];
    while (true) {
      sc.skipSpace();
      const c = sc.peek();
      if (c === undefined || c === "/" || c === "|" || c === ")" || c === "}" || c === "," || c === "→") break;
      if (sc.looking("->")) break;
      if (c === "_" && this.placeholderAhead()) break;
      if (sc.lookingWord("where")) break;
      out.push(this.item(ctx));
    }
    return out;
  }

  /** An atom with an optional SPE subscript/superscript: `C₀`, `C₁`, `C₀²`, `C_0`, `C_0^2`. */
  item(ctx: "target" | "change" | "environment" | "group" | "heavy"): Item {
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

  atom(ctx: "target" | "change" | "environment" | "group" | "heavy" | "class"): Item {
    const sc = this.sc;
    const start = sc.index;
    const c = sc.peek();
    if (c === "[") return { kind: "element", element: this.bundle() };
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
    if (c === "{") {
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
    if (c === "#" || c === "$" || c === ".") {
      sc.next();
      return { kind: "element", element: { kind: "boundary", which: c === "#" ? "word" : "syllable", span: sc.spanFrom(start) } };
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
      while (isIpaChar(sc.peek())) sc.next();
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
function coverSpan(items: readonly Item[], empty: Span): Span {
  return coverSpans(items.map(itemSpan), empty);
}

function coverSpans(spans: readonly Span[], empty: Span): Span {
  const first = spans[0];
  const last = spans[spans.length - 1];
  if (first === undefined || last === undefined) return empty;
  if (last.line !== first.line) return first;
  return { ...first, length: Math.max(1, last.column + last.length - first.column) };
}

const itemSpan = (i: Item): Span => (i.kind === "null" ? i.span : patternSpan(i));

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
      return e.which === "word" ? "#" : "$";
    case "bundle":
      return `[${e.specs.map(specText).join(" ")}]`;
  }
}

export function specText(s: FeatureSpec): string {
  if (s.kind === "value") return `${s.value}${s.feature}`;
  return `${s.negated ? "-" : ""}${s.variable}${s.feature}`;
}
