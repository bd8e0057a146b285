// Grammar parser, rule level: `rule NAME options: TARGET -> CHANGE / environments`, built on the
// pattern-level parser (parse-patterns.ts).

import { diagnostic } from "../diagnostics.js";
import type { ApplicationMode, ChangeElement, Element, Environment, Expansion, ProsodicCondition, Rule, Span } from "./ast.js";
import type { TopItem } from "./assemble.js";
import { coverSpan, coverSpans, elementText, itemSpan, PatternParser, patternSpan } from "./parse-patterns.js";

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

/** Rule statements; the statement parser (parser.ts) extends it with the other statements. */
export class RuleParser extends PatternParser {
  /** The items of the file so far (a rule target's `{a | b}` adds an implicit class). */
  items: TopItem[] = [];

  // rule NAME [optional] [simultaneous|left-to-right|right-to-left] [prefer applied|unapplied] [longest-first] : body
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
    let expansion: Expansion | null = null;
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
      } else if (sc.eatWord("longest-first")) {
        if (expansion !== null) dup("'longest-first'", sc.spanFrom(os));
        expansion = "longest-first";
      } else if (sc.eatWord("prefer")) {
        const p = this.preferred();
        if (prefer !== null) dup("'prefer'", sc.spanFrom(os));
        prefer = p;
      } else {
        this.expected("':' or a rule option (optional, simultaneous, left-to-right, right-to-left, prefer applied, prefer unapplied, longest-first)");
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
    const unless: Environment[] = [];
    sc.skipSpace();
    while (!sc.atEnd()) {
      if (sc.eatWord("unless")) unless.push(this.environment());
      else if (sc.eat("/")) environments.push(this.environment());
      else this.expected("'/' before an environment (or 'unless' before one where the rule does not apply)");
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
      ...(unless.length > 0 ? { unless } : {}),
      ...(expansion !== null ? { expansion } : {}),
    };
    this.items.push({ kind: "step", step: rule });
  }

  /** `applied` or `unapplied` after the word `prefer`. */
  preferred(): "applied" | "unapplied" {
    this.sc.skipSpace();
    if (this.sc.eatWord("applied")) return "applied";
    if (this.sc.eatWord("unapplied")) return "unapplied";
    return this.expected("'applied' or 'unapplied' after 'prefer'");
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

  // / LEFT _ RIGHT [mirrored] [where cond, cond …]   (also after `unless`)
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
    const ms = sc.index;
    const mirrored = sc.eatWord("mirrored");
    const mirrorSpan = mirrored ? [sc.spanFrom(ms)] : [];
    sc.skipSpace();
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
        if (sc.atEnd() || sc.peek() === "/" || sc.lookingWord("unless")) break;
        if (/^[a-z]$/.test(sc.peek() ?? "")) continue;
        this.expected("',' or another environment");
      }
    }
    const span = coverSpans(
      [sc.spanHereAt(start), ...left.map(itemSpan), underscore, ...right.map(itemSpan), ...mirrorSpan, ...conditions.map((c) => c.span)],
      sc.spanHereAt(start),
    );
    return {
      left: { kind: "sequence", items: this.noNull(left), span: leftSpan },
      right: { kind: "sequence", items: this.noNull(right), span: rightSpan },
      conditions,
      span,
      ...(mirrored ? { mirrored } : {}),
    };
  }
}
