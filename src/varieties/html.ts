// The comparison of varieties as one self-contained HTML file, on the regression report's style sheet
// and helpers (regress/html*.ts): counts per pair, the rules responsible with a bar each (click to
// filter), the differing entries with the differing segments marked and both derivations on click,
// and the mergers and splits. No network, no external assets.

import { escapeHtml, htmlPage } from "../regress/html.js";
import { HTML_STYLE } from "../regress/html-assets.js";
import { diffSegments } from "../regress/segments.js";
import type { VarietiesComparison } from "./compare.js";
import { VARIETIES_SCRIPT } from "./html-script.js";

const EXTRA_STYLE = `
#differences tbody tr { cursor: pointer; } #differences tbody tr:hover { background: #f3f6fb; } #differences tr.selected { background: #e4ecf9; }
.sets td.form { white-space: nowrap; } .sets .group { display: inline-block; margin-right: 1.2em; }
`;

/** The page's data: rows compact (one array of segments per differing entry, `[text, 0 same | 1 a only | 2 b only]`). */
function pageData(c: VarietiesComparison) {
  return {
    lexicon: c.lexicon,
    pairs: c.pairs.map((p) => ({
      id: `${p.a}|${p.b}`, a: p.a, b: p.b, counts: p.counts,
      steps: { a: p.steps.a, b: p.steps.b, inventoryDiffers: p.steps.inventoryDiffers },
      rules: p.rules,
      rows: p.differences.map((d) => ({
        key: d.key, word: d.word, cause: d.cause, rules: d.rules,
        diff: diffSegments(d.a.narrow, d.b.narrow).map((x) => [x.text, x.kind === "same" ? 0 : x.kind === "old" ? 1 : 2]),
        aD: d.a.derivation, bD: d.b.derivation, aB: d.a.broad, bB: d.b.broad,
      })),
      sets: [
        ...p.mergers.map((s) => ({ kind: "merger", form: s.form, rules: s.rules, groups: s.groups })),
        ...p.splits.map((s) => ({ kind: "split", form: s.form, rules: s.rules, groups: s.groups })),
      ],
    })),
  };
}

/** The whole report page. */
export function formatVarietiesHtml(c: VarietiesComparison): string {
  return htmlPage(`Strata varieties: ${c.lexicon}`, HTML_STYLE + EXTRA_STYLE, `<p class="paths">build <code>${escapeHtml(c.build)}</code>: ${c.varieties.map((v) => `<code>${escapeHtml(v)}</code>`).join(", ")}</p>
</header>
<section><h2>Summary</h2><table id="summary"><thead><tr><th>pair</th><th>in both</th><th>differ</th><th>grammar</th><th>input</th><th>only first</th><th>only second</th><th>mergers</th><th>splits</th></tr></thead><tbody></tbody></table></section>
<section><h2>Rules responsible</h2><div id="rules"></div></section>
<section><h2>Entries that differ</h2>
<div class="filters">
<label>pair <select id="filter-pair"></select></label>
<label>rule <select id="filter-rule"><option value="">(any)</option></select></label>
<label>word <input id="filter-text" type="search" placeholder="word or key"></label>
<span id="shown"></span>
</div>
<table id="differences"><thead><tr><th data-sort="pair">pair</th><th data-sort="word">word</th><th data-sort="key">key</th><th data-sort="a">first</th><th data-sort="b">second</th><th data-sort="cause">cause</th><th data-sort="rule">rules</th></tr></thead><tbody></tbody></table>
<div id="derivation" hidden></div>
</section>
<section><h2>Mergers and splits</h2><p>A merger: entries with different broad forms that are homophonous in the first variety of the pair and told apart in the second; a split: the other way round. Syllable breaks, joins and tie bars are ignored; stress marks count.</p><div id="sets"></div></section>
`, pageData(c), VARIETIES_SCRIPT);
}
