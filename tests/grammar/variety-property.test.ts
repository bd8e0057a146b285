// Random edit scripts against a written-out reference: a random base grammar, a random script of
// omissions, replacements, option changes and insertions written as a variety, and the grammar the
// script describes built by plain list operations (by index, no names) and written out in full.
// The variety must resolve to the written-out grammar, step for step and option for option.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { ApplicationMode, Expansion, Grammar, Rule, Step } from "../../src/grammar/ast.js";
import { applyVariety, plainOrigins } from "../../src/grammar/inherit.js";
import { parseVarietyFile } from "../../src/grammar/parse-variety.js";
import { parseGrammarText } from "../../src/grammar/index.js";
import { arbGrammar, grammarText } from "../support/arb-grammar.js";
import { fcParams } from "../support/fc-seed.js";

interface Options {
  optional?: boolean;
  mode?: ApplicationMode;
  prefer?: "applied" | "unapplied";
  expansion?: Expansion;
}

type Action =
  | { kind: "keep" }
  | { kind: "omit" }
  | { kind: "adjust"; options: Options }
  | { kind: "replace"; body: Rule; options: Options };

const arbOptions: fc.Arbitrary<Options> = fc.record(
  {
    optional: fc.boolean(),
    mode: fc.constantFrom<ApplicationMode>("simultaneous", "left-to-right", "right-to-left"),
    prefer: fc.constantFrom<"applied" | "unapplied">("applied", "unapplied"),
    expansion: fc.constantFrom<Expansion>("union", "longest-first"),
  },
  { requiredKeys: [] },
);

const optionWords = (o: Options): string =>
  [
    o.optional === undefined ? "" : o.optional ? "optional" : "obligatory",
    o.mode ?? "",
    o.prefer === undefined ? "" : `prefer ${o.prefer}`,
    o.expansion ?? "",
  ].filter((w) => w !== "").join(" ");

/** The options written in an edit over a rule's own (the model of "adjust"). */
function withOptions(r: Rule, o: Options): Rule {
  const { expansion: _e, ...rest } = r;
  const expansion = o.expansion ?? r.expansion;
  return { ...rest, ...(o.optional !== undefined ? { optional: o.optional } : {}), ...(o.mode !== undefined ? { mode: o.mode } : {}), ...(o.prefer !== undefined ? { prefer: o.prefer } : {}), ...(expansion === "longest-first" ? { expansion } : {}) };
}

/** A rule's body as the grammar printer writes it (the lines after its header). */
function bodyText(r: Rule): string {
  const text = grammarText({ file: "x", inventory: null, diacritics: null, nodes: [], classes: [], onsets: null, codas: null, heavy: [], steps: [r], files: [] });
  return text.slice(text.indexOf(":\n", text.indexOf(`rule ${r.name}`)) + 2);
}

/** What must be equal: the steps without places; `prefer` only where it matters (optional rules). */
const comparable = (steps: readonly Step[]): unknown =>
  JSON.parse(JSON.stringify(steps.map((s) => (s.kind === "rule" && !s.optional ? { ...s, prefer: "applied" } : s)), (k, v) => (k === "span" ? undefined : v)));

const arbCase = arbGrammar({ maxRules: 4 }).chain((base) => {
  const n = base.grammar.steps.length;
  const action = (s: Step): fc.Arbitrary<Action> =>
    s.kind !== "rule"
      ? fc.constantFrom<Action>({ kind: "keep" }, { kind: "omit" })
      : fc.oneof(
          fc.constant<Action>({ kind: "keep" }),
          fc.constant<Action>({ kind: "omit" }),
          arbOptions.filter((o) => Object.keys(o).length > 0).map((options): Action => ({ kind: "adjust", options })),
          fc.tuple(arbGrammar({ maxRules: 1, prosody: false }), arbOptions).map(([g, options]): Action => ({ kind: "replace", body: g.grammar.steps[0] as Rule, options })),
        );
  return fc.record({
    base: fc.constant(base),
    actions: fc.tuple(...base.grammar.steps.map(action)),
    // Insertions: per gap between kept steps (0 … kept), maybe a new rule, written `after` the step
    // before the gap or `before` the one after it, and maybe a second one placed after the first.
    inserts: fc.array(fc.record({ gap: fc.nat({ max: n }), side: fc.boolean(), chained: fc.boolean(), rules: arbGrammar({ maxRules: 2, prosody: false }), options: arbOptions }), { maxLength: 3 }),
  });
});

describe("random edit scripts resolve to the grammar written out in full", () => {
  it("variety = written-out reference", () => {
    fc.assert(
      fc.property(arbCase, ({ base, actions, inserts }) => {
        const steps = base.grammar.steps;
        const lines = ['base "base.strata"'];
        const kept: Step[] = [];
        steps.forEach((s, i) => {
          const a = actions[i]!;
          if (a.kind === "omit") lines.push(`omit ${s.name}`);
          if (a.kind === "adjust") lines.push(`adjust ${s.name} ${optionWords(a.options)}`);
          if (a.kind === "replace") lines.push(`replace ${s.name} ${optionWords(a.options)}:\n${bodyText(a.body)}`);
          if (a.kind === "keep") kept.push(s);
          else if (a.kind === "adjust") kept.push(withOptions(s as Rule, a.options));
          else if (a.kind === "replace") {
            const r = s as Rule;
            kept.push(withOptions({ ...a.body, name: r.name, optional: r.optional, mode: r.mode, prefer: r.prefer, ...(r.expansion !== undefined ? { expansion: r.expansion } : { expansion: undefined }) } as Rule, a.options));
          }
        });
        // The model: new rules by gap index, each gap once.
        const byGap = new Map<number, Rule[]>();
        let fresh = 0;
        for (const ins of inserts) {
          const gap = ins.gap % (kept.length + 1);
          if (byGap.has(gap) || kept.length === 0) continue; // one new rule per place; no place without a kept step
          const made = (ins.chained ? ins.rules.grammar.steps.slice(0, 2) : ins.rules.grammar.steps.slice(0, 1)) as Rule[];
          // A new rule has the defaults but for the options its header writes.
          const named = made.map((r) => {
            const { expansion: _e, ...plain } = r;
            return withOptions({ ...plain, name: `new${++fresh}`, optional: false, mode: "simultaneous", prefer: "applied" }, ins.options);
          });
          byGap.set(gap, named);
          const [first, second] = named;
          const useAfter = gap > 0 && (ins.side || gap === kept.length);
          const anchor = useAfter ? `after ${kept[gap - 1]!.name}` : `before ${kept[gap]!.name}`;
          lines.push(`add rule ${first!.name} ${anchor} ${optionWords(ins.options)}:\n${bodyText({ ...first!, name: first!.name })}`);
          if (second !== undefined) lines.push(`add rule ${second.name} after ${first!.name} ${optionWords(ins.options)}:\n${bodyText(second)}`);
        }
        const expected: Step[] = [];
        for (let g = 0; g <= kept.length; g++) {
          expected.push(...(byGap.get(g) ?? []));
          if (g < kept.length) expected.push(kept[g]!);
        }
        if (kept.length === 0 && byGap.size === 0) return; // nothing to compare but an empty list
        const parsedBase = parseGrammarText(base.text, "/p/base.strata");
        expect(parsedBase.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
        const varietyText = lines.join("\n") + "\n";
        const v = parseVarietyFile(varietyText, "/p/variety.strata");
        expect(v.diagnostics.filter((d) => d.severity === "error"), varietyText).toEqual([]);
        const r = applyVariety(parsedBase.grammar, plainOrigins(parsedBase.grammar), v, ["/p/base.strata", "/p/variety.strata"]);
        expect(r.diagnostics.filter((d) => d.severity === "error"), varietyText).toEqual([]);
        const reference: Grammar = { ...base.grammar, steps: expected };
        const written = parseGrammarText(grammarText(reference), "/p/full.strata");
        expect(comparable(r.grammar.steps), varietyText).toEqual(comparable(written.grammar.steps));
        expect(r.origins.map((o) => o.name)).toEqual(r.grammar.steps.map((s) => s.name));
      }),
      fcParams({ numRuns: 200 }),
    );
  });
});
