// Parser of variety files: a grammar that names its base (`base "…"`) and edits it by rule name —
// omit, replace, adjust, add before/after, and declarations that replace or extend the base's.
// Statement syntax only; applying the edits to the base is inherit.ts. DEVELOPERS.md, "Varieties".

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { ApplicationMode, Expansion, Span, Step } from "./ast.js";
import type { TopItem } from "./assemble.js";
import { splitStatements, type Char, type Statement } from "./lexer.js";
import { Abort } from "./parse-patterns.js";
import { RuleParser } from "./parse-rule.js";
import { STATEMENT_KEYWORDS, StatementParser } from "./parser.js";

/** The statements only a variety file has. */
export const VARIETY_KEYWORDS = ["base", "omit", "replace", "adjust", "add", "remove"] as const;
/**
 * Ordinary statements a variety may also hold: every declaration of the language (inventory, node,
 * class, onsets, …), each replacing (or adding) the base's of the same name; not steps or includes.
 */
export const VARIETY_DECLARATIONS: readonly string[] = STATEMENT_KEYWORDS.filter((k) => !["include", "rule", "syllabify", "stress"].includes(k));

/** Rule options as written in an edit; an absent field keeps the base rule's value. */
export interface RuleOptions {
  readonly optional?: boolean;
  readonly mode?: ApplicationMode;
  readonly prefer?: "applied" | "unapplied";
  readonly expansion?: Expansion;
}

/** A step named in an edit, where it is written. */
export interface NameRef {
  readonly name: string;
  readonly span: Span;
}

export interface Placement {
  readonly where: "before" | "after";
  readonly anchor: NameRef;
}

export type Edit =
  | { readonly kind: "omit"; readonly target: NameRef; readonly span: Span }
  /** A new body for a rule (with options changed where written), or new settings for a `stress` step. */
  | { readonly kind: "replace"; readonly target: NameRef; readonly options: RuleOptions; readonly step: Step; readonly span: Span }
  | { readonly kind: "adjust"; readonly target: NameRef; readonly options: RuleOptions; readonly span: Span }
  | { readonly kind: "add"; readonly step: Step; readonly placement: Placement; readonly span: Span }
  /** `class`, `node`, `onsets`, … written in the variety: replaces the base's declaration of that name, or adds one. */
  | { readonly kind: "declare"; readonly item: TopItem }
  /** `add onsets = …`, `add codas = …`, `add class X = …`: more clusters or members. */
  | { readonly kind: "extend"; readonly item: TopItem; readonly span: Span }
  /** `remove onsets = …`, `remove codas = …`: clusters taken out of the base's list. */
  | { readonly kind: "remove"; readonly item: TopItem; readonly span: Span };

export interface VarietyFile {
  readonly file: string;
  /** The base grammar: path resolved against this file's folder, as written, and where. */
  readonly base: { readonly path: string; readonly written: string; readonly span: Span } | null;
  readonly edits: readonly Edit[];
  readonly diagnostics: readonly Diagnostic[];
}

/** Whether a grammar text is a variety: its first statement is `base`. */
export function isVarietyText(text: string): boolean {
  const first = splitStatements(text).statements[0];
  if (first === undefined) return false;
  const word = first.chars.slice(0, 5).map((c) => c.ch).join("");
  return word === "base" || word.startsWith("base ") || word.startsWith("base\t") || word.startsWith('base"');
}

/** Parses a variety file. Never throws; an error abandons its statement and parsing goes on. */
export function parseVarietyFile(text: string, file: string): VarietyFile {
  const edits: Edit[] = [];
  const diagnostics: Diagnostic[] = [];
  let base: VarietyFile["base"] = null;
  try {
    const { statements, orphans } = splitStatements(text);
    for (const o of orphans)
      diagnostics.push(diagnostic("error", "grammar/orphan-line", "this indented line does not continue any statement", { file, line: o.chars[0]!.line, column: o.chars[0]!.column }));
    statements.forEach((st, index) => {
      const p = new VarietyParser(file, st);
      try {
        p.parseVariety(index === 0);
        if (p.base !== null) base = p.base;
        edits.push(...p.edits);
      } catch (e) {
        if (e instanceof Abort) diagnostics.push(e.diagnostic);
        else throw e;
      }
      diagnostics.push(...p.warnings);
    });
  } catch (e) {
    diagnostics.push(diagnostic("error", "grammar/internal", `internal parser error: ${e instanceof Error ? e.message : String(e)}`, { file, line: 1, column: 1 }));
  }
  return { file, base, edits, diagnostics };
}

const RULE_NAME_START = /^\p{L}$/u;
const RULE_NAME_CHAR = /^[\p{L}\p{N}_-]$/u;

/** One statement of a variety file. Ordinary declarations go to the statement parser it extends. */
class VarietyParser extends StatementParser {
  base: VarietyFile["base"] = null;
  readonly edits: Edit[] = [];
  /** Set while a step statement may end in `before NAME` / `after NAME` (read by `end`). */
  private placementWanted = false;
  private placement: Placement | null = null;

  constructor(file: string, st: Statement) {
    super(file, st, [], null);
  }

  override end(): void {
    this.sc.skipSpace();
    if (this.placementWanted && this.placement === null && (this.sc.lookingWord("before") || this.sc.lookingWord("after")))
      this.placement = this.readPlacement();
    super.end();
  }

  parseVariety(first: boolean): void {
    const sc = this.sc;
    const start = sc.index;
    const word = sc.peekWord();
    const kwSpan = sc.spanHere(Math.max(1, [...word].length));
    if (word === "base") {
      sc.eatWord("base");
      if (!first) this.fail("grammar/base-not-first", "'base' must be the first statement of a variety", kwSpan);
      const p = this.pathArgument();
      this.base = { path: p.resolved, written: p.written, span: p.span };
      return;
    }
    if (VARIETY_DECLARATIONS.includes(word)) {
      this.parse();
      for (const item of this.items) this.edits.push({ kind: "declare", item });
      return;
    }
    if (!(VARIETY_KEYWORDS as readonly string[]).includes(word)) {
      const hint =
        word === "rule" || word === "syllabify" || word === "stress"
          ? `; in a variety a new step says where it goes ('add ${word} … before NAME' or 'after NAME'), and 'replace NAME' gives a base step a new body`
          : word === "include"
            ? "; a variety takes its rules from its base and its own edits"
            : "";
      this.fail(
        "grammar/unknown-statement",
        `'${word || sc.peek()}' does not start a statement of a variety; expected one of ${[...VARIETY_KEYWORDS.slice(1), ...VARIETY_DECLARATIONS].join(", ")}${hint}`,
        kwSpan,
      );
    }
    sc.eatWord(word);
    this.space();
    switch (word) {
      case "omit": {
        const target = this.stepName();
        this.end();
        this.edits.push({ kind: "omit", target, span: sc.spanFrom(start) });
        return;
      }
      case "adjust": {
        const target = this.stepName();
        const { options } = this.options(false, false);
        if (Object.keys(options).length === 0) this.expected("a rule option (optional, obligatory, simultaneous, left-to-right, right-to-left, prefer applied, prefer unapplied, longest-first, union)");
        this.edits.push({ kind: "adjust", target, options, span: sc.spanFrom(start) });
        return;
      }
      case "replace":
        return this.replace(start);
      case "add":
        return this.add(start);
      case "remove": {
        const ks = sc.index;
        if (!(sc.lookingWord("onsets") || sc.lookingWord("codas"))) this.expected("'onsets' or 'codas' after 'remove'");
        const kw = sc.peekWord() as "onsets" | "codas";
        sc.eatWord(kw);
        this.clusters(kw, sc.spanFrom(ks));
        this.edits.push({ kind: "remove", item: this.items[this.items.length - 1]!, span: sc.spanFrom(start) });
        return;
      }
    }
  }

  // replace NAME [options]: BODY   |   replace stress[-N] from left|right N [if heavy else M]
  private replace(start: number): void {
    const sc = this.sc;
    const nameStart = sc.index;
    const target = this.stepName();
    sc.skipSpace();
    if (sc.lookingWord("from")) {
      this.stress(nameStart);
      const step = this.takeStep();
      this.edits.push({ kind: "replace", target, options: {}, step: { ...step, name: target.name }, span: sc.spanFrom(start) });
      return;
    }
    const { options } = this.options(true, false);
    const rule = this.ruleBody(nameStart, target.name);
    this.edits.push({ kind: "replace", target, options, step: rule, span: sc.spanFrom(start) });
  }

  // add rule NAME [options] before|after ANCHOR: BODY  |  add syllabify before|after ANCHOR
  // | add stress from … before|after ANCHOR  |  add onsets|codas = …  |  add class NAME = …
  private add(start: number): void {
    const sc = this.sc;
    const ks = sc.index;
    if (sc.lookingWord("onsets") || sc.lookingWord("codas")) {
      const kw = sc.peekWord() as "onsets" | "codas";
      sc.eatWord(kw);
      this.clusters(kw, sc.spanFrom(ks));
      this.edits.push({ kind: "extend", item: this.items[this.items.length - 1]!, span: sc.spanFrom(start) });
      return;
    }
    if (sc.eatWord("class")) {
      this.classDef();
      this.edits.push({ kind: "extend", item: this.items[this.items.length - 1]!, span: sc.spanFrom(start) });
      return;
    }
    if (sc.eatWord("syllabify") || sc.lookingWord("stress")) {
      const isStress = sc.eatWord("stress");
      this.placementWanted = true;
      if (isStress) this.stress(ks);
      else {
        const kwSpan = sc.spanFrom(ks);
        this.end();
        this.items.push({ kind: "step", step: { kind: "syllabify", name: "syllabify", span: kwSpan } });
      }
      if (this.placement === null) this.expected("'before NAME' or 'after NAME' (where the new step goes)");
      this.edits.push({ kind: "add", step: this.takeStep(), placement: this.placement, span: sc.spanFrom(start) });
      return;
    }
    if (!sc.eatWord("rule")) this.expected("'rule', 'syllabify', 'stress', 'onsets', 'codas' or 'class' after 'add'");
    this.space();
    const nameStart = sc.index;
    const name = this.stepName();
    const { options, placement } = this.options(true, true);
    if (placement === null) this.fail("grammar/no-placement", `say where rule '${name.name}' goes: 'add rule ${name.name} before NAME:' or 'after NAME:'`, name.span);
    const rule = this.ruleBody(nameStart, name.name);
    this.edits.push({ kind: "add", step: applyOptions(rule, options), placement, span: sc.spanFrom(start) });
  }

  /** The one step item the statement parser pushed last; any implicit classes before it become declarations. */
  private takeStep(): Step {
    const it = this.items.pop();
    if (it === undefined || it.kind !== "step") throw new Error("no step parsed");
    return it.step;
  }

  /**
   * The rule body after the header's ':' (the cursor stands just after it): parsed by the rule
   * parser on the name and the body only, so every position stays the written one. A `{a | b}`
   * target's implicit class becomes a declaration of the variety.
   */
  private ruleBody(nameStart: number, name: string): Step & { kind: "rule" } {
    const chars = this.st.chars as readonly Char[];
    const nameLen = [...name].length;
    const colon = this.sc.index - 1;
    const sub: Statement = { chars: [...chars.slice(nameStart, nameStart + nameLen), chars[colon]!, ...chars.slice(colon + 1)], line: this.st.line };
    const rp = new RuleParser(this.file, sub);
    rp.rule();
    this.warnings.push(...rp.warnings);
    this.sc.skipToEnd();
    let rule: (Step & { kind: "rule" }) | undefined;
    for (const it of rp.items) {
      if (it.kind === "step" && it.step.kind === "rule") rule = it.step;
      else this.edits.push({ kind: "declare", item: it });
    }
    if (rule === undefined) throw new Error("no rule parsed");
    return rule;
  }

  /** A rule or step name (`flapping`, `syllabify`, `stress-2`). */
  private stepName(): NameRef {
    const sc = this.sc;
    const s = sc.index;
    if (!RULE_NAME_START.test(sc.peek() ?? "")) this.expected("a rule or step name");
    while (RULE_NAME_CHAR.test(sc.peek() ?? "")) sc.next();
    return { name: sc.textFrom(s), span: sc.spanFrom(s) };
  }

  private readPlacement(): Placement {
    const sc = this.sc;
    const where = sc.eatWord("before") ? "before" : (sc.eatWord("after"), "after");
    this.space();
    const anchor = this.stepName();
    return { where, anchor };
  }

  /**
   * Rule options up to ':' (`colon`) or the end of the statement: the rule header's words plus
   * `obligatory` and `union` (their opposites), and `before NAME` / `after NAME` when `placed`.
   */
  private options(colon: boolean, placed: boolean): { options: RuleOptions; placement: Placement | null } {
    const sc = this.sc;
    const o: { optional?: boolean; mode?: ApplicationMode; prefer?: "applied" | "unapplied"; expansion?: Expansion } = {};
    let placement: Placement | null = null;
    const dup = (what: string, s: Span): never => this.fail("grammar/duplicate-option", `this edit states ${what} twice`, s);
    while (true) {
      sc.skipSpace();
      if (colon && sc.eat(":")) break;
      if (!colon && sc.atEnd()) break;
      const os = sc.index;
      if (sc.lookingWord("optional") || sc.lookingWord("obligatory")) {
        const v = sc.eatWord("optional");
        if (!v) sc.eatWord("obligatory");
        if (o.optional !== undefined) dup("whether the rule is optional", sc.spanFrom(os));
        o.optional = v;
      } else if (sc.lookingWord("simultaneous") || sc.lookingWord("left-to-right") || sc.lookingWord("right-to-left")) {
        const m = sc.peekWord() as ApplicationMode;
        sc.eatWord(m);
        if (o.mode !== undefined) dup("how the rule applies", sc.spanFrom(os));
        o.mode = m;
      } else if (sc.lookingWord("longest-first") || sc.lookingWord("union")) {
        const e: Expansion = sc.eatWord("longest-first") ? "longest-first" : (sc.eatWord("union"), "union");
        if (o.expansion !== undefined) dup("how '( )' expansions combine", sc.spanFrom(os));
        o.expansion = e;
      } else if (sc.eatWord("prefer")) {
        const p = this.preferred();
        if (o.prefer !== undefined) dup("'prefer'", sc.spanFrom(os));
        o.prefer = p;
      } else if (placed && (sc.lookingWord("before") || sc.lookingWord("after"))) {
        if (placement !== null) dup("where the rule goes", sc.spanFrom(os));
        placement = this.readPlacement();
      } else {
        const opts = "optional, obligatory, simultaneous, left-to-right, right-to-left, prefer applied, prefer unapplied, longest-first, union";
        this.expected(`${colon ? "':' or " : ""}${placed ? "'before NAME', 'after NAME' or " : ""}a rule option (${opts})`);
      }
    }
    return { options: o, placement };
  }
}

/** A rule with the options an edit writes; the rest kept. `union` is stored as no `expansion` (the default). */
export function applyOptions<R extends Step & { kind: "rule" }>(rule: R, o: RuleOptions): R {
  const { expansion: _old, ...rest } = rule;
  const expansion = o.expansion ?? rule.expansion;
  return {
    ...rest,
    ...(o.optional !== undefined ? { optional: o.optional } : {}),
    ...(o.mode !== undefined ? { mode: o.mode } : {}),
    ...(o.prefer !== undefined ? { prefer: o.prefer } : {}),
    ...(expansion !== undefined && expansion !== "union" ? { expansion } : {}),
  } as R;
}
