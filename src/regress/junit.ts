// The comparison as JUnit XML, the report format CI servers read: one <testsuite> per variety;
// in it one <testcase> per pinned expectation (failing when it does not hold) and one per change
// class (added, removed, input, grammar:RULE, variants:RULE — failing when not declared expected),
// plus one "no unexpected changes" case so a suite is never empty. No timings (the file is
// byte-stable for the same two builds).

import { create } from "xmlbuilder2";
import type { Comparison, VarietyComparison } from "./compare.js";
import { PINNED_FILE, type PinResult } from "./pinned.js";

const CHECK_WORDS: Record<string, string> = { is: "is", has: "has", lacks: "lacks", matches: "matches" };

/** XML 1.0 cannot carry most C0 controls, even escaped: they are written as \uXXXX. */
const xmlSafe = (s: string): string => s.replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`);

function pinText(p: PinResult): string {
  const lines = [`${p.message}`, `why: ${p.why}`, `source: ${p.source}`];
  for (const f of p.found) {
    lines.push(`derivation of ${f.key}:`);
    if (f.derivation.length === 0) lines.push(`  (no step changed it) ${f.narrow}`);
    for (const d of f.derivation) lines.push(`  ${d.step}: ${d.form}`);
  }
  return lines.join("\n");
}

function classText(v: VarietyComparison, cls: string, examples: number): string {
  const lines: string[] = [];
  if (cls === "added" || cls === "removed") {
    for (const e of (cls === "added" ? v.added : v.removed).slice(0, examples)) lines.push(`${e.key} ${e.word}: ${e.narrow}`);
  } else {
    for (const c of v.changes.filter((c) => c.class === cls).slice(0, examples)) {
      lines.push(`${c.key} ${c.word}: ${c.old.narrow} → ${c.new.narrow}${c.blame !== undefined ? ` (${c.blame.text})` : ""}`);
    }
  }
  return lines.join("\n");
}

/** The JUnit XML document (UTF-8, final newline). `examples`: entries listed in each failure's text. */
export function formatJunit(c: Comparison, examples = 20): string {
  const doc = create({ version: "1.0", encoding: "UTF-8" });
  /** Failing cases of a suite: failed pins, unexpected change classes, and the summary case when there are any. */
  const failing = (v: VarietyComparison): number => {
    const unexpected = v.classes.filter((x) => !x.expected).length;
    return v.failedExpectations + unexpected + (unexpected > 0 ? 1 : 0);
  };
  const failures = c.varieties.reduce((k, v) => k + failing(v), 0);
  const tests = c.varieties.reduce((k, v) => k + v.expectations.length + v.classes.length + 1, 0);
  const root = doc.ele("testsuites", { name: `strata compare ${c.lexicon}`, tests: String(tests), failures: String(failures), errors: "0" });
  for (const v of c.varieties) {
    const vFailures = failing(v);
    const suite = root.ele("testsuite", { name: `${c.lexicon}.${v.name}`, tests: String(v.expectations.length + v.classes.length + 1), failures: String(vFailures), errors: "0", skipped: "0" });
    const props = suite.ele("properties");
    props.ele("property", { name: "old", value: xmlSafe(c.old) });
    props.ele("property", { name: "new", value: xmlSafe(c.new) });
    for (const [k, n] of Object.entries(v.counts)) if (typeof n === "number") props.ele("property", { name: k, value: String(n) });
    for (const p of v.expectations) {
      const name = `${PINNED_FILE}:${p.line} ${p.entry} ${CHECK_WORDS[p.check]} ${p.value}`;
      const tc = suite.ele("testcase", { classname: `${c.lexicon}.${v.name}.pinned`, name: xmlSafe(name) });
      if (!p.passed) tc.ele("failure", { message: xmlSafe(p.message), type: "expectation" }).txt(xmlSafe(pinText(p)));
    }
    const unexpected = v.classes.filter((x) => !x.expected);
    const summary = suite.ele("testcase", { classname: `${c.lexicon}.${v.name}.changes`, name: "no unexpected changes" });
    if (unexpected.length > 0) {
      summary.ele("failure", { message: `${unexpected.reduce((k, x) => k + x.count, 0)} unexpected changes in ${unexpected.length} classes`, type: "unexpected-change" })
        .txt(unexpected.map((x) => `${x.class}: ${x.count}`).join("\n"));
    }
    for (const x of v.classes) {
      const tc = suite.ele("testcase", { classname: `${c.lexicon}.${v.name}.changes`, name: xmlSafe(x.class) });
      const text = xmlSafe(classText(v, x.class, examples));
      if (!x.expected) tc.ele("failure", { message: `${x.count} entr${x.count === 1 ? "y" : "ies"} changed (${x.class}), not declared expected`, type: "unexpected-change" }).txt(text);
      else tc.ele("system-out").txt(`${x.count} expected change${x.count === 1 ? "" : "s"}\n${text}`);
    }
  }
  return doc.end({ prettyPrint: true }) + "\n";
}
