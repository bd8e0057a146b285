// The comparison as one self-contained HTML file (no network, no external assets; works opened
// from disk): summary counts, the blame table with a bar per rule, a sortable and filterable table
// of changed entries with the differing segments marked, and an entry's derivations on click.

import type { Comparison } from "./compare.js";
import { diffSegments, type DiffPart } from "./segments.js";
import { HTML_SCRIPT, HTML_STYLE } from "./html-assets.js";

/** Text for HTML element content and attribute values. */
export const escapeHtml = (s: string): string => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** JSON inside <script>: no "</" (ends the element) and no U+2028/2029 surprises. */
const scriptJson = (v: unknown): string => JSON.stringify(v).replace(/</g, "\\u003c").replace(/[\u2028\u2029]/g, (c) => (c === "\u2028" ? "\\u2028" : "\\u2029"));

const compactParts = (ps: readonly DiffPart[]): [string, 0 | 1 | 2][] => ps.map((p) => [p.text, p.kind === "same" ? 0 : p.kind === "old" ? 1 : 2]);

/** The data the page's script renders (rows compact: one array per changed entry). */
function pageData(c: Comparison) {
  return {
    lexicon: c.lexicon,
    old: c.old,
    new: c.new,
    varieties: c.varieties.map((v) => ({
      name: v.name,
      counts: { ...v.counts, unexpected: v.unexpected, failedExpectations: v.failedExpectations },
      sources: v.sources,
      blame: v.blame,
      expectations: v.expectations.map((e) => ({ line: e.line, entry: e.entry, check: e.check, value: e.value, why: e.why, source: e.source, passed: e.passed, message: e.message })),
      rows: [
        ...v.changes.map((ch) => ({
          key: ch.key, word: ch.word, cause: ch.cause, rule: ch.blame?.rule ?? "", how: ch.blame?.text ?? "", expected: ch.expected,
          diff: compactParts(diffSegments(ch.old.narrow, ch.new.narrow)),
          oldD: ch.old.derivation, newD: ch.new.derivation, oldV: ch.old.variants, newV: ch.new.variants,
        })),
        ...v.added.map((e) => ({ key: e.key, word: e.word, cause: "added", rule: "", how: "", expected: false, diff: [[e.narrow, 2]], oldD: [], newD: [], oldV: [], newV: [e.narrow] })),
        ...v.removed.map((e) => ({ key: e.key, word: e.word, cause: "removed", rule: "", how: "", expected: false, diff: [[e.narrow, 1]], oldD: [], newD: [], oldV: [e.narrow], newV: [] })),
      ],
    })),
  };
}

/** A whole self-contained page: the style sheet, the body (after the title), the data as JSON in #data and the script that renders it. */
export function htmlPage(title: string, style: string, body: string, data: unknown, script: string): string {
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>${style}</style>
</head>
<body>
<header><h1>${escapeHtml(title)}</h1>
${body}<script type="application/json" id="data">${scriptJson(data)}</script>
<script>${script}</script>
</body>
</html>
`;
}

/** The whole report page. */
export function formatHtml(c: Comparison): string {
  const title = `Strata comparison: ${c.lexicon}`;
  return htmlPage(title, HTML_STYLE, `<p class="paths">old <code>${escapeHtml(c.old)}</code> → new <code>${escapeHtml(c.new)}</code></p>
<p id="verdict" class="${c.unexpected === 0 && c.failedExpectations === 0 ? "ok" : "bad"}">${c.unexpected} unexpected change${c.unexpected === 1 ? "" : "s"}, ${c.failedExpectations} failed expectation${c.failedExpectations === 1 ? "" : "s"}</p>
</header>
<section><h2>Summary</h2><table id="summary"><thead><tr><th>variety</th><th>old</th><th>new</th><th>changed</th><th>input</th><th>grammar</th><th>variants</th><th>added</th><th>removed</th><th>unchanged</th><th>unexpected</th><th>failed expectations</th></tr></thead><tbody></tbody></table></section>
<section><h2>Blame: changes per rule</h2><div id="blame"></div></section>
<section><h2>Changed entries</h2>
<div class="filters">
<label>variety <select id="filter-variety"></select></label>
<label>rule <select id="filter-rule"><option value="">(any)</option></select></label>
<label>cause <select id="filter-cause"><option value="">(any)</option><option>grammar</option><option>variants</option><option>input</option><option>added</option><option>removed</option></select></label>
<label>word <input id="filter-text" type="search" placeholder="word or key"></label>
<span id="shown"></span>
</div>
<table id="changes"><thead><tr><th data-sort="variety">variety</th><th data-sort="word">word</th><th data-sort="key">key</th><th data-sort="old">old</th><th data-sort="new">new</th><th data-sort="cause">cause</th><th data-sort="rule">rule</th></tr></thead><tbody></tbody></table>
<div id="derivation" hidden></div>
</section>
<section><h2>Pinned expectations</h2><div id="expectations"></div></section>
`, pageData(c), HTML_SCRIPT);
}
