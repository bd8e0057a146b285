// The comparison's reports on a deliberate rule change (flapping removed from the demo's general
// grammar): exit codes, the terminal summary with and without colour, JUnit XML validated against
// our schema, and the HTML report driven in headless Chromium (Debian's chromium package through
// playwright-core): counts shown, filtering by a rule, the derivation on click, a screenshot; and the
// report of strata varieties, built on the same page code, driven the same way.

import { existsSync, mkdirSync, mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium, type BrowserContext } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompare, type Outcome } from "../../src/regress/run.js";
import { formatJunit } from "../../src/regress/junit.js";
import { runVarieties } from "../../src/varieties/run.js";
import { build, copyLexicons, edit, ROOT } from "./support.js";
import { junitSchemaErrors } from "./junit-schema.js";

let root: string;
let out: string;
let outcome: Outcome;
const base = { examples: 3, json: false, reportOnly: false, quiet: false, color: false };

beforeAll(async () => {
  root = copyLexicons();
  expect(await build(join(root, "lexicons", "demo"), join(root, "old"))).toBe(0);
  edit(join(root, "lexicons", "en-us", "reductions.strata"), /rule flapping:\n.*\n/, "");
  expect(await build(join(root, "lexicons", "demo"), join(root, "new"))).toBe(4);
  out = join(root, "report");
  outcome = await runCompare(join(root, "old", "demo"), join(root, "new", "demo"), { ...base, out });
}, 180_000);

describe("exit codes and the terminal summary", () => {
  it("exits 4 on unexpected changes and failed expectations, 0 with --report-only", async () => {
    expect(outcome.exitCode).toBe(4);
    const only = await runCompare(join(root, "old", "demo"), join(root, "new", "demo"), { ...base, reportOnly: true });
    expect(only.exitCode).toBe(0);
    const same = await runCompare(join(root, "old", "demo"), join(root, "old", "demo"), base);
    expect(same.exitCode).toBe(0);
    expect(same.stdout).toContain("no unexpected changes, every expectation holds");
  });

  it("prints counts, the blamed rule with examples, and no colour unless asked", async () => {
    const t = outcome.stdout;
    expect(t).toMatch(/^general: 391 → 391 entries: 33 changed \(grammar 33\), 0 added, 0 removed, 358 unchanged$/m);
    expect(t).toMatch(/^ {2}flapping +33 +step removed 33$/m);
    expect(t).toContain("thirty               ˈθɝ.ɾi → ˈθɝ.ti");
    expect(t).toContain("pinned expectations: 29 of 33 hold");
    expect(t).not.toMatch(/\u001b\[/);
    const coloured = await runCompare(join(root, "old", "demo"), join(root, "new", "demo"), { ...base, color: true });
    expect(coloured.stdout).toMatch(/\u001b\[/);
    // The examples limit: 3 per rule here, in general and in regional (whose base has the same flapping).
    expect(t.split("\n").filter((l) => l.includes("(unexpected)")).length).toBe(6);
  });

  it("--json prints the whole comparison, every change included", async () => {
    const j = await runCompare(join(root, "old", "demo"), join(root, "new", "demo"), { ...base, json: true });
    const doc = JSON.parse(j.stdout);
    expect(doc.varieties[0].changes.length).toBe(33);
    expect(doc.varieties[0].changes[0].new.derivation).toBeInstanceOf(Array);
    expect(readFileSync(join(out, "compare.json"), "utf8")).toBe(j.stdout);
  });
});

describe("JUnit XML", () => {
  it("is valid against our schema, one suite per variety, one case per expectation and per change class", () => {
    const xml = readFileSync(join(out, "junit.xml"), "utf8");
    expect(junitSchemaErrors(xml)).toEqual([]);
    const suites = [...xml.matchAll(/<testsuite name="([^"]+)" tests="(\d+)" failures="(\d+)"/g)].map((m) => [m[1], Number(m[2]), Number(m[3])]);
    // general: 33 pins + 1 class (grammar:flapping) + "no unexpected changes"; failures: 4 pins, the class, the summary case.
    // regional (the Canadian voice, whose base has the same flapping): 35 pins + the class + the summary case;
    // failures: its flapping pin (thirty), the class, the summary case.
    expect(suites).toEqual([["demo.general", 35, 6], ["demo.careful", 31, 0], ["demo.regional", 37, 3]]);
    expect(xml).toContain('<testcase classname="demo.general.changes" name="grammar:flapping">');
    expect(xml).toMatch(/<failure message="Expected thirty to be ˈθɝ\.ɾi; ct0022 is ˈθɝ\.ti\." type="expectation">/);
    expect(xml).toContain("derivation of ct0022:\n  syllabify: ˈθɝ.ti");
    expect(xml.endsWith("</testsuites>\n")).toBe(true);
  });

  it("the schema does reject a malformed report (a test case without classname)", () => {
    expect(junitSchemaErrors('<testsuites><testsuite name="x" tests="1"><testcase name="y"/></testsuite></testsuites>').length).toBeGreaterThan(0);
  });

  it("is byte-stable for the same two builds", () => {
    expect(formatJunit(outcome.comparison!)).toBe(readFileSync(join(out, "junit.xml"), "utf8"));
  });
});

describe("the HTML report in headless Chromium", () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    // A fresh profile folder each run (playwright passes it to Chromium as --user-data-dir).
    browser = await chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), "strata-chromium-")), {
      executablePath: "/usr/bin/chromium",
      headless: true,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
  }, 60_000);
  afterAll(async () => {
    await browser?.close();
  });

  /** Opens a report file: it names nothing on the network, and loads without a script error; the requests it makes are recorded. */
  async function openReport(file: string) {
    expect(existsSync(file)).toBe(true);
    expect(readFileSync(file, "utf8")).not.toMatch(/(src|href)=["']?(https?:)?\/\//);
    const page = await browser.newPage();
    const requests: string[] = [];
    page.on("request", (r) => requests.push(r.url()));
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(String(e)));
    await page.goto(pathToFileURL(file).href);
    expect(errors).toEqual([]);
    return { page, requests };
  }

  it("shows the counts, filters by a rule, shows a derivation on click, loads nothing from the network", async () => {
    const { page, requests } = await openReport(join(out, "report.html"));
    const count = (variety: string, what: string) => page.textContent(`#summary tr[data-variety="${variety}"] td[data-count="${what}"]`);
    expect(await count("general", "changed")).toBe("33");
    expect(await count("general", "grammar")).toBe("33");
    expect(await count("general", "unchanged")).toBe("358");
    expect(await count("careful", "changed")).toBe("0");
    expect(await count("general", "failed")).toBe("4");
    expect(await page.locator("table.blame[data-variety=general] tbody tr").count()).toBe(1);
    expect(await page.locator("#changes tbody tr").count()).toBe(66); // general and regional

    // Filter by the rule: every row left is blamed on it; by a cause no change has: none left.
    await page.selectOption("#filter-rule", "flapping");
    const rules = await page.locator("#changes tbody tr").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-rule")));
    expect(rules.length).toBe(66);
    expect(new Set(rules)).toEqual(new Set(["flapping"]));
    await page.fill("#filter-text", "thirty");
    expect(await page.locator("#changes tbody tr").count()).toBe(2); // general and regional
    expect(await page.textContent("#shown")).toBe("2 of 66 entries");
    // The differing segment is marked on both sides.
    expect(await page.textContent("#changes tbody tr td:nth-child(4) .d-old")).toBe("ɾ");
    expect(await page.textContent("#changes tbody tr td:nth-child(5) .d-new")).toBe("t");
    await page.click("#changes tbody tr");
    const derivation = await page.textContent("#derivation");
    expect(derivation).toContain("flapping: ˈθɝ.ɾi");
    expect(derivation).toContain("step flapping removed");
    await page.selectOption("#filter-cause", "input");
    expect(await page.locator("#changes tbody tr").count()).toBe(0);

    // Sorting by word: ascending order of the rows shown.
    await page.selectOption("#filter-cause", "");
    await page.fill("#filter-text", "");
    await page.click("#changes th[data-sort=word]");
    const words = await page.locator("#changes tbody tr td:nth-child(2)").allTextContents();
    expect(words).toEqual([...words].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0)));
    mkdirSync(join(ROOT, "build"), { recursive: true });
    await page.screenshot({ path: join(ROOT, "build", "regress-report.png"), fullPage: true });
    expect(requests.every((u) => u.startsWith("file:"))).toBe(true);
    await page.close();
  }, 60_000);
  it("the varieties report (strata varieties -o) on the same page code: counts, a rule filter, both derivations on click, the sets", async () => {
    const v = await runVarieties(join(root, "old", "demo"), { format: "table", examples: 3, out: join(root, "varieties"), quiet: true, color: false });
    expect(v.exitCode).toBe(0);
    const { page, requests } = await openReport(join(root, "varieties", "report.html"));
    const pair = v.comparison!.pairs[0]!;
    const count = (what: string) => page.textContent(`#summary tr[data-pair="general|careful"] td[data-count="${what}"]`);
    expect(await count("differ")).toBe(String(pair.counts.differ));
    expect(await count("mergers")).toBe("0");
    expect(await page.locator("table.rules[data-pair='general|careful'] tbody tr").count()).toBe(pair.rules.length);
    expect(await page.locator("#differences tbody tr").count()).toBe(v.comparison!.pairs.reduce((n, p) => n + p.counts.differ, 0));
    await page.selectOption("#filter-pair", "general|careful");
    expect(await page.locator("#differences tbody tr").count()).toBe(pair.counts.differ);
    // A click on a rule filters the entries to those it is responsible for.
    await page.click("table.rules[data-pair='general|careful'] a.rule[data-rule=glottal-stop]");
    const shown = await page.locator("#differences tbody tr").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-rules")));
    expect(shown.length).toBe(pair.differences.filter((d) => d.rules.includes("glottal-stop")).length);
    expect(shown.every((r) => (r ?? "").split(", ").includes("glottal-stop"))).toBe(true);
    await page.selectOption("#filter-rule", "");
    await page.fill("#filter-text", "thirty");
    expect(await page.locator("#differences tbody tr").count()).toBe(1);
    expect(await page.textContent("#differences tbody tr td:nth-child(4) .d-old")).toBe("ɾ");
    expect(await page.textContent("#differences tbody tr td:nth-child(5) .d-new")).toBe("t");
    await page.click("#differences tbody tr");
    const derivation = await page.textContent("#derivation");
    expect(derivation).toContain("flapping: ˈθɝ.ɾi");
    expect(derivation).toContain("careful");
    expect(await page.textContent("#sets")).toContain("general ↔ careful: 0 mergers, 0 splits");
    await page.screenshot({ path: join(ROOT, "build", "varieties-report.png"), fullPage: true });
    expect(requests.every((u) => u.startsWith("file:"))).toBe(true);
    await page.close();
  }, 60_000);
});
