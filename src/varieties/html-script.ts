// The varieties report's script, inlined into the page (kept apart from html.ts so the page's
// structure reads on its own). It only reads the JSON in #data; no network.

import { HTML_HELPERS } from "../regress/html-assets.js";

export const VARIETIES_SCRIPT = `
(function () {
  "use strict";
  var data = JSON.parse(document.getElementById("data").textContent);
  ${HTML_HELPERS}
  // Summary counts, one row per pair.
  var sbody = document.querySelector("#summary tbody");
  data.pairs.forEach(function (p) {
    var c = p.counts;
    var cells = [["pair", p.a + " ↔ " + p.b], ["common", c.common], ["differ", c.differ], ["grammar", c.byCause.grammar], ["input", c.byCause.input], ["onlyA", c.onlyA], ["onlyB", c.onlyB], ["mergers", c.mergers], ["splits", c.splits]];
    sbody.appendChild(el("tr", { "data-pair": p.id }, cells.map(function (x, i) { return el("td", { "data-count": x[0], "class": i ? "num" : "", text: String(x[1]) }); })));
  });
  // Rules responsible, a bar each; a click filters the entries.
  var rulesBox = document.getElementById("rules");
  data.pairs.forEach(function (p) {
    rulesBox.appendChild(el("h3", { text: p.a + " ↔ " + p.b }));
    var steps = function (name, list) { return name + ": " + (list.length ? list.map(function (s) { return s.step + " (" + s.change.replace("-", " ") + ")"; }).join(", ") : "none"); };
    rulesBox.appendChild(el("p", { "class": "steps", text: "steps that differ — " + steps(p.a, p.steps.a) + "; " + steps(p.b, p.steps.b) + (p.steps.inventoryDiffers ? "; the inventories differ" : "") }));
    if (p.rules.length === 0) { rulesBox.appendChild(el("p", { text: "No entry differs." })); return; }
    var max = Math.max.apply(null, p.rules.map(function (r) { return r.entries; }));
    var rows = p.rules.map(function (r) {
      var link = el("a", { "class": "rule", "data-rule": r.rule, "data-pair": p.id, text: r.rule });
      link.addEventListener("click", function () { setFilter(p.id, r.rule); });
      var where = r.where === "a" ? p.a : r.where === "b" ? p.b : "both";
      return el("tr", { "data-rule": r.rule }, [el("td", {}, [link]), el("td", { "class": "num", text: String(r.entries) }),
        el("td", { "class": "barcell" }, [el("span", { "class": "bar", style: "width:" + Math.max(1, Math.round(240 * r.entries / max)) + "px" })]),
        el("td", { text: where + ": " + r.change.replace("only-here", "only here") }), el("td", { text: r.examples.join(", ") })]);
    });
    rulesBox.appendChild(el("table", { "class": "rules", "data-pair": p.id }, [el("thead", {}, [el("tr", {}, ["rule", "entries", "", "where, how", "examples"].map(function (h) { return el("th", { text: h }); }))]), el("tbody", {}, rows)]));
  });
  // Entries that differ: filters, sorting, both derivations on click.
  var all = [];
  data.pairs.forEach(function (p) { p.rows.forEach(function (r) { r.pair = p.id; r.pairText = p.a + " ↔ " + p.b; r.aName = p.a; r.bName = p.b; r.rule = r.rules.join(", "); all.push(r); }); });
  var fp = document.getElementById("filter-pair"), fr = document.getElementById("filter-rule"), ft = document.getElementById("filter-text");
  fp.appendChild(el("option", { value: "", text: "(any)" }));
  data.pairs.forEach(function (p) { fp.appendChild(el("option", { value: p.id, text: p.a + " ↔ " + p.b })); });
  var names = {};
  all.forEach(function (r) { r.rules.forEach(function (x) { names[x] = true; }); });
  Object.keys(names).sort().forEach(function (x) { fr.appendChild(el("option", { value: x, text: x })); });
  var sort = { key: "", dir: 1 }, LIMIT = 5000;
  function form(r, side) { return diffSpan(r.diff, side === "a" ? 2 : 1); }
  function value(r, k) { return k === "a" || k === "b" ? diffText(r.diff, k === "a" ? 2 : 1) : k === "pair" ? r.pairText : String(r[k] || ""); }
  function render() {
    var text = ft.value.trim().toLowerCase();
    var rows = all.filter(function (r) {
      return (!fp.value || r.pair === fp.value) && (!fr.value || r.rules.indexOf(fr.value) >= 0) &&
        (!text || r.word.toLowerCase().indexOf(text) >= 0 || r.key.toLowerCase().indexOf(text) >= 0);
    });
    if (sort.key) rows.sort(function (a, b) { var x = value(a, sort.key), y = value(b, sort.key); return x < y ? -sort.dir : x > y ? sort.dir : 0; });
    var tbody = document.querySelector("#differences tbody");
    tbody.textContent = "";
    rows.slice(0, LIMIT).forEach(function (r) {
      var tr = el("tr", { "data-key": r.key, "data-pair": r.pair, "data-rules": r.rule, "data-cause": r.cause }, [
        el("td", { text: r.pairText }), el("td", { text: r.word }), el("td", { text: r.key }), el("td", {}, [form(r, "a")]), el("td", {}, [form(r, "b")]),
        el("td", { text: r.cause }), el("td", { text: r.rule || (r.cause === "input" ? "(input)" : "(unattributed)") })]);
      tr.addEventListener("click", function () { show(r, tr); });
      tbody.appendChild(tr);
    });
    document.getElementById("shown").textContent = rows.length + " of " + all.length + " entries" + (rows.length > LIMIT ? " (first " + LIMIT + " shown)" : "");
  }
  function derivationList(title, broad, d) {
    var box = el("div", {}, [el("h4", { text: title }), el("p", {}, ["broad ", el("span", { "class": "ipa", text: broad })])]);
    if (d.length === 0) box.appendChild(el("p", { text: "(no step changed it)" }));
    else box.appendChild(el("ol", {}, d.map(function (s) { return el("li", {}, [s.step + ": ", el("span", { "class": "ipa", text: s.form })]); })));
    return box;
  }
  function show(r, tr) {
    var prev = document.querySelector("#differences tr.selected");
    if (prev) prev.classList.remove("selected");
    tr.classList.add("selected");
    var box = document.getElementById("derivation");
    box.textContent = "";
    box.appendChild(el("h3", { text: r.word + " (" + r.key + ")" + (r.rule ? ": " + r.rule : "") }));
    box.appendChild(el("div", { "class": "cols" }, [derivationList(r.aName, r.aB, r.aD), derivationList(r.bName, r.bB, r.bD)]));
    box.hidden = false;
  }
  function setFilter(pair, rule) { fp.value = pair; fr.value = rule; render(); document.getElementById("differences").scrollIntoView(); }
  [fp, fr].forEach(function (s) { s.addEventListener("change", render); });
  ft.addEventListener("input", render);
  sortOnClick("differences", sort, render);
  render();
  // Mergers and splits: one table per pair, one row per set, the entries grouped by their form in the other variety.
  var setsBox = document.getElementById("sets");
  data.pairs.forEach(function (p) {
    setsBox.appendChild(el("h3", { text: p.a + " ↔ " + p.b + ": " + p.counts.mergers + " merger" + (p.counts.mergers === 1 ? "" : "s") + ", " + p.counts.splits + " split" + (p.counts.splits === 1 ? "" : "s") }));
    if (p.sets.length === 0) return;
    setsBox.appendChild(el("table", { "class": "sets", "data-pair": p.id }, [
      el("thead", {}, [el("tr", {}, ["", "homophonous", "told apart as", "rules"].map(function (h) { return el("th", { text: h }); }))]),
      el("tbody", {}, p.sets.map(function (s) {
        var merging = s.kind === "merger" ? p.a : p.b, other = s.kind === "merger" ? p.b : p.a;
        return el("tr", { "data-kind": s.kind }, [el("td", { text: s.kind }),
          el("td", { "class": "form" }, [merging + " ", el("span", { "class": "ipa", text: s.form })]),
          el("td", {}, [other + ": "].concat(s.groups.map(function (g) { return el("span", { "class": "group" }, [g.entries.map(function (e) { return e.word; }).join(", ") + " ", el("span", { "class": "ipa", text: g.entries[0].distinct })]); }))),
          el("td", { text: s.rules.join(", ") })]);
      }))]));
  });
})();
`;
