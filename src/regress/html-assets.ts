// The HTML report's style sheet and script, inlined into the page (kept apart from html.ts so the
// page's structure reads on its own). The script only reads the JSON in #data; no network.

export const HTML_STYLE = `
body { font: 14px/1.4 system-ui, sans-serif; margin: 1.5em; color: #222; }
h1 { font-size: 1.4em; margin: 0 0 .2em; } h2 { font-size: 1.15em; margin-top: 1.5em; }
table { border-collapse: collapse; margin: .5em 0; } th, td { border-bottom: 1px solid #ddd; padding: .25em .6em; text-align: left; vertical-align: top; }
th[data-sort] { cursor: pointer; user-select: none; } th.asc::after { content: " ▲"; } th.desc::after { content: " ▼"; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.ok { color: #1a7f37; } .bad { color: #b42318; font-weight: bold; }
.ipa { font-family: "Charis SIL", "Doulos SIL", "DejaVu Sans", serif; font-size: 1.1em; }
.d-old { background: #ffd7d5; color: #8a1212; text-decoration: line-through; } .d-new { background: #c9f2d0; color: #0f5a23; }
.bar { background: #4d7cc7; height: .9em; display: inline-block; vertical-align: middle; min-width: 2px; }
.barcell { width: 240px; } .filters label { margin-right: 1em; } #shown { color: #555; }
#changes tbody tr { cursor: pointer; } #changes tbody tr:hover { background: #f3f6fb; } #changes tr.selected { background: #e4ecf9; }
#derivation { border: 1px solid #aac; padding: .5em 1em; margin: .5em 0; background: #fafbff; }
#derivation .cols { display: flex; gap: 3em; } .unexpected { color: #b42318; }
a.rule { color: #1f4ea3; cursor: pointer; text-decoration: underline; }
`;

/**
 * The pages' helpers, shared with the varieties report: `el` (an element with attributes, `text`
 * setting its text, and children); `diffText` and `diffSpan` (one side of a segment diff
 * `[[text, 0 same | 1 first only | 2 second only], …]`, leaving out the parts marked `hide`, as text
 * or as a span with the differing parts marked); `sortOnClick` (a click on a `th[data-sort]` of
 * the table sorts by that key, again the other way; `state` holds `key` and `dir`).
 */
export const HTML_HELPERS = `function el(tag, attrs, children) {
    var e = document.createElement(tag);
    if (attrs) for (var k in attrs) { if (k === "text") e.textContent = attrs[k]; else e.setAttribute(k, attrs[k]); }
    (children || []).forEach(function (c) { e.appendChild(typeof c === "string" ? document.createTextNode(c) : c); });
    return e;
  }
  function diffText(diff, hide) { return diff.filter(function (p) { return p[1] !== hide; }).map(function (p) { return p[0]; }).join(""); }
  function diffSpan(diff, hide) {
    var span = el("span", { "class": "ipa" });
    diff.forEach(function (p) {
      if (p[1] === hide) return;
      span.appendChild(p[1] === 0 ? document.createTextNode(p[0]) : el("span", { "class": p[1] === 1 ? "d-old" : "d-new", text: p[0] }));
    });
    return span;
  }
  function sortOnClick(table, state, render) {
    document.querySelectorAll("#" + table + " th[data-sort]").forEach(function (th) {
      th.addEventListener("click", function () {
        var k = th.getAttribute("data-sort");
        state.dir = state.key === k ? -state.dir : 1; state.key = k;
        document.querySelectorAll("#" + table + " th").forEach(function (h) { h.classList.remove("asc", "desc"); });
        th.classList.add(state.dir > 0 ? "asc" : "desc");
        render();
      });
    });
  }`;

export const HTML_SCRIPT = `
(function () {
  "use strict";
  var data = JSON.parse(document.getElementById("data").textContent);
  ${HTML_HELPERS}
  // Summary counts.
  var sbody = document.querySelector("#summary tbody");
  data.varieties.forEach(function (v) {
    var c = v.counts;
    var cells = [["variety", v.name], ["old", c.old], ["new", c.new], ["changed", c.changed], ["input", c.byCause.input], ["grammar", c.byCause.grammar], ["variants", c.byCause.variants], ["added", c.added], ["removed", c.removed], ["unchanged", c.unchanged], ["unexpected", c.unexpected], ["failed", c.failedExpectations]];
    sbody.appendChild(el("tr", { "data-variety": v.name }, cells.map(function (p, i) { return el("td", { "data-count": p[0], "class": i ? "num" : "", text: String(p[1]) }); })));
  });
  // Blame tables with a bar per rule.
  var blame = document.getElementById("blame");
  data.varieties.forEach(function (v) {
    blame.appendChild(el("h3", { text: v.name }));
    if (v.blame.length === 0) { blame.appendChild(el("p", { text: "No change blamed on a rule." })); return; }
    var max = Math.max.apply(null, v.blame.map(function (r) { return r.count; }));
    var rows = v.blame.map(function (r) {
      var how = Object.keys(r.how).map(function (h) { return h + " " + r.how[h]; }).join(", ");
      var link = el("a", { "class": "rule", "data-rule": r.rule, "data-variety": v.name, text: r.rule });
      link.addEventListener("click", function () { setFilter(v.name, r.rule); });
      return el("tr", { "data-rule": r.rule }, [el("td", {}, [link]), el("td", { "class": "num", text: String(r.count) }),
        el("td", { "class": "barcell" }, [el("span", { "class": "bar", style: "width:" + Math.max(1, Math.round(240 * r.count / max)) + "px" })]),
        el("td", { text: how }), el("td", { text: r.examples.join(", ") })]);
    });
    blame.appendChild(el("table", { "class": "blame", "data-variety": v.name }, [el("thead", {}, [el("tr", {}, ["rule", "changes", "", "how", "examples"].map(function (h) { return el("th", { text: h }); }))]), el("tbody", {}, rows)]));
  });
  // Changed entries: filters, sorting, derivation on click.
  var all = [];
  data.varieties.forEach(function (v) { v.rows.forEach(function (r) { r.variety = v.name; all.push(r); }); });
  var fv = document.getElementById("filter-variety"), fr = document.getElementById("filter-rule"), fc = document.getElementById("filter-cause"), ft = document.getElementById("filter-text");
  fv.appendChild(el("option", { value: "", text: "(any)" }));
  data.varieties.forEach(function (v) { fv.appendChild(el("option", { value: v.name, text: v.name })); });
  var rules = {};
  all.forEach(function (r) { if (r.rule) rules[r.rule] = true; });
  Object.keys(rules).sort().forEach(function (r) { fr.appendChild(el("option", { value: r, text: r })); });
  var sort = { key: "", dir: 1 }, LIMIT = 5000;
  function form(r, side) { return diffSpan(r.diff, side === "old" ? 2 : 1); }
  function value(r, k) { return k === "old" || k === "new" ? diffText(r.diff, k === "old" ? 2 : 1) : String(r[k] || ""); }
  function render() {
    var text = ft.value.trim().toLowerCase();
    var rows = all.filter(function (r) {
      return (!fv.value || r.variety === fv.value) && (!fr.value || r.rule === fr.value) && (!fc.value || r.cause === fc.value) &&
        (!text || r.word.toLowerCase().indexOf(text) >= 0 || r.key.toLowerCase().indexOf(text) >= 0);
    });
    if (sort.key) rows.sort(function (a, b) { var x = value(a, sort.key), y = value(b, sort.key); return x < y ? -sort.dir : x > y ? sort.dir : 0; });
    var tbody = document.querySelector("#changes tbody");
    tbody.textContent = "";
    rows.slice(0, LIMIT).forEach(function (r) {
      var tr = el("tr", { "data-key": r.key, "data-variety": r.variety, "data-rule": r.rule, "data-cause": r.cause }, [
        el("td", { text: r.variety }), el("td", { text: r.word }), el("td", { text: r.key }), el("td", {}, [form(r, "old")]), el("td", {}, [form(r, "new")]),
        el("td", { "class": r.expected ? "" : "unexpected", text: r.cause + (r.expected ? "" : " (unexpected)") }), el("td", { text: r.how || r.rule })]);
      tr.addEventListener("click", function () { show(r, tr); });
      tbody.appendChild(tr);
    });
    document.getElementById("shown").textContent = rows.length + " of " + all.length + " entries" + (rows.length > LIMIT ? " (first " + LIMIT + " shown)" : "");
  }
  function derivationList(title, d, variants) {
    var box = el("div", {}, [el("h4", { text: title })]);
    if (d.length === 0) box.appendChild(el("p", { text: "(no step changed it)" }));
    else box.appendChild(el("ol", {}, d.map(function (s) { return el("li", {}, [s.step + ": ", el("span", { "class": "ipa", text: s.form })]); })));
    if (variants.length > 1) box.appendChild(el("p", { text: "variants: " + variants.join(", ") }));
    return box;
  }
  function show(r, tr) {
    var prev = document.querySelector("#changes tr.selected");
    if (prev) prev.classList.remove("selected");
    tr.classList.add("selected");
    var box = document.getElementById("derivation");
    box.textContent = "";
    box.appendChild(el("h3", { text: r.word + " (" + r.key + ", " + r.variety + ")" + (r.how ? ": " + r.how : "") }));
    box.appendChild(el("div", { "class": "cols" }, [derivationList("old derivation", r.oldD, r.oldV), derivationList("new derivation", r.newD, r.newV)]));
    box.hidden = false;
  }
  function setFilter(variety, rule) { fv.value = variety; fr.value = rule; render(); document.getElementById("changes").scrollIntoView(); }
  [fv, fr, fc].forEach(function (s) { s.addEventListener("change", render); });
  ft.addEventListener("input", render);
  sortOnClick("changes", sort, render);
  render();
  // Pinned expectations.
  var ex = document.getElementById("expectations");
  data.varieties.forEach(function (v) {
    if (v.expectations.length === 0) return;
    var failed = v.expectations.filter(function (e) { return !e.passed; }).length;
    ex.appendChild(el("h3", { text: v.name + ": " + (v.expectations.length - failed) + " of " + v.expectations.length + " hold" }));
    ex.appendChild(el("table", { "class": "pins" }, [el("tbody", {}, v.expectations.map(function (e) {
      return el("tr", { "class": e.passed ? "" : "bad" }, [el("td", { text: e.passed ? "✓" : "✗" }), el("td", { text: "pinned.csv:" + e.line }), el("td", { text: e.entry + " " + e.check + " " + e.value }), el("td", { text: e.passed ? e.why : e.message }), el("td", { text: e.source })]);
    }))]));
  });
  if (!ex.firstChild) ex.appendChild(el("p", { text: "The new build checked no pinned expectations." }));
})();
`;
