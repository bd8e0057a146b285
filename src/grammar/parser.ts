// Grammar parser: one .strata file's text → top-level items with exact spans, and their assembly
// into a Grammar. Pure (no file system); never throws; an error skips to the next statement.
// Statement level here; rules in parse-rule.ts, patterns in parse-patterns.ts, assembly in assemble.ts.

import * as path from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { Cluster, Element, Grammar, Pattern, Span } from "./ast.js";
import { JOIN_MODES } from "./ast.js";
import { assembleGrammar, type TopItem } from "./assemble.js";
import { isAsciiUpper, isIdentChar, isIdentStart, isIpaChar, isDigit, isSpace, splitStatements, type Statement } from "./lexer.js";
import { Abort, coverSpan, itemSpan } from "./parse-patterns.js";
import { RuleParser } from "./parse-rule.js";

export { assembleGrammar, type TopItem } from "./assemble.js";
export { PROSODIC_CONDITIONS } from "./parse-rule.js";
export { elementText, patternSpan, specText } from "./parse-patterns.js";

/** The statement keywords, in the order DEVELOPERS.md lists them. */
export const STATEMENT_KEYWORDS = [
  "inventory",
  "diacritics",
  "language",
  "include",
  "node",
  "class",
  "onsets",
  "codas",
  "heavy",
  "joins",
  "syllabify",
  "stress",
  "rule",
] as const;

export interface ParsedFile {
  readonly file: string;
  readonly items: readonly TopItem[];
  readonly diagnostics: readonly Diagnostic[];
}

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

/** Parses one statement; pushes its item(s) to `items`. Throws Abort (caught by parseFile) on an error. */
export class StatementParser extends RuleParser {
  keyword: string | null = null;

  constructor(
    file: string,
    st: Statement,
    items: TopItem[],
    readonly previousKeyword: string | null,
  ) {
    super(file, st);
    this.items = items;
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
      case "language":
        this.language();
        break;
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
      case "joins":
        this.joins(kwSpan);
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

  // language "TAG" (a BCP 47 tag; its form is checked where it is used, e.g. PLS xml:lang)
  language(): void {
    const sc = this.sc;
    this.space();
    const start = sc.index;
    if (!sc.eat('"')) this.expected('a quoted language tag ("en-US")');
    let tag = "";
    while (!sc.atEnd() && sc.peek() !== '"' && sc.peek() !== "\n") tag += sc.next();
    if (!sc.eat('"')) this.fail("grammar/unterminated-string", "this quoted language tag has no closing '\"'", sc.spanFrom(start));
    const span = sc.spanFrom(start);
    if (tag.length === 0) this.fail("grammar/empty-language", "the language tag is empty", span);
    this.end();
    this.items.push({ kind: "language", tag, span });
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

  // joins = through | closed | closed-before-consonant
  joins(kwSpan: Span): void {
    const sc = this.sc;
    this.equals();
    const mode = JOIN_MODES.find((m) => sc.eatWord(m));
    if (mode === undefined) this.expected(JOIN_MODES.map((m) => `'${m}'`).join(", ").replace(/, ([^,]*)$/, " or $1"));
    this.end();
    this.items.push({ kind: "joins", mode, span: kwSpan });
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
}
