// Bench section "regress": `strata compare` on two builds of the whole CMU dictionary (varieties
// general and careful) whose grammars differ in one rule's context (flapping no longer after r).
// Targets: the comparison takes at most twice the time of reading and parsing both builds' JSON
// Lines files, and peaks at 400 MB or less. Output check: the comparison's counts and blame agree
// with a plain line-by-line diff of the two builds.

import { cpSync, existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { packageRootFrom, writeCmuFolder } from "./cmu.js";
import { fmt, fmtMB, fmtMs, median, runChild, strataCli, textTable, type ChildRun } from "./util.js";

const VARIETIES = ["general", "careful"];
const REPS = 3;

/** A lexicon folder `<dir>/cmu` running the CMU CSV through `<dir>/lexicons/en-us`, optionally edited. */
function sourceFolder(root: string, dir: string, csv: string, edit?: (enUs: string) => void): string {
  rmSync(dir, { recursive: true, force: true });
  cpSync(join(root, "lexicons", "en-us"), join(dir, "lexicons", "en-us"), { recursive: true });
  edit?.(join(dir, "lexicons", "en-us"));
  const lex = join(dir, "cmu");
  mkdirSync(lex, { recursive: true });
  cpSync(csv, join(lex, "lexicon.csv"));
  const varieties = VARIETIES.map((name) => ({ name, lang: "en-US", grammar: `../lexicons/en-us/${name === "general" ? "grammar" : "careful"}.strata` }));
  writeFileSync(join(lex, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties }, null, 2) + "\n");
  return lex;
}

export async function benchRegress(): Promise<{ ok: boolean }> {
  const root = packageRootFrom(import.meta.url);
  const distBench = dirname(fileURLToPath(import.meta.url));
  const rssWrapper = join(distBench, "rss.js");
  const cli = strataCli(root);
  const work = join(root, "build", "bench", "regress");
  const say = (s = "") => console.log(s);
  const failures: string[] = [];
  say("== regress: strata compare on two builds of the CMU dictionary (one rule changed) ==");
  const cmu = writeCmuFolder(root);
  const oldSrc = sourceFolder(root, join(work, "old-src"), cmu.csv);
  const newSrc = sourceFolder(root, join(work, "new-src"), cmu.csv, (enUs) => {
    const f = join(enUs, "reductions.strata");
    const text = readFileSync(f, "utf8");
    const next = text.replace("AlveolarStop -> ɾ / Vowel (ɹ) _", "AlveolarStop -> ɾ / Vowel _");
    if (next === text) failures.push("the bench's rule edit did not apply (reductions.strata changed?)");
    writeFileSync(f, next);
  });
  const cache = join(root, "build", "cache");
  const builds: ChildRun[] = [];
  for (const [src, out] of [[oldSrc, join(work, "old")], [newSrc, join(work, "new")]] as const) {
    rmSync(out, { recursive: true, force: true });
    const b = await runChild(rssWrapper, cli, ["build", src, "-o", out, "--format", "jsonl", "--quiet", "--allow-rejects", "--cache-dir", cache], { cwd: root });
    builds.push(b);
    if (b.code !== 0) failures.push(`strata build ${src} exited with ${b.code}: ${b.stderr.trim().split("\n").slice(0, 3).join(" | ")}`);
  }
  say(`builds: ${fmt(cmu.rows)} entries × ${VARIETIES.length} varieties, ${builds.map((b) => fmtMs(b.wallMs)).join(" and ")}`);
  const oldBuild = join(work, "old", "cmu");
  const newBuild = join(work, "new", "cmu");
  if (failures.length > 0 || !existsSync(join(newBuild, "build.json"))) {
    for (const f of failures) say(`FAILED: ${f}`);
    return { ok: false };
  }
  const floorScript = join(distBench, "child-regress-read.js");
  const reads: ChildRun[] = [];
  const raws: ChildRun[] = [];
  const compares: ChildRun[] = [];
  for (let k = 0; k < REPS; k++) {
    raws.push(await runChild(rssWrapper, floorScript, [oldBuild, newBuild, VARIETIES.join(","), "raw"]));
    reads.push(await runChild(rssWrapper, floorScript, [oldBuild, newBuild, VARIETIES.join(",")]));
    compares.push(await runChild(rssWrapper, cli, ["compare", oldBuild, newBuild, "--quiet", "--report-only"], { cwd: root }));
  }
  for (const r of [...reads, ...raws, ...compares]) if (r.code !== 0) failures.push(`a child exited with ${r.code}: ${r.stderr.slice(0, 300)}`);
  // Output check: one more comparison with its files, against the floor script's plain diff.
  const reportDir = join(work, "report");
  rmSync(reportDir, { recursive: true, force: true });
  const withFiles = await runChild(rssWrapper, cli, ["compare", oldBuild, newBuild, "--quiet", "-o", reportDir], { cwd: root });
  if (withFiles.code !== 4) failures.push(`strata compare -o exited with ${withFiles.code} (4 expected: unexpected changes): ${withFiles.stderr.slice(0, 300)}`);
  const plain = JSON.parse(reads[0]?.stdout || "{}") as { read?: number; differ?: number };
  if (existsSync(join(reportDir, "compare.json"))) {
    const c = JSON.parse(readFileSync(join(reportDir, "compare.json"), "utf8")) as { varieties: { name: string; counts: { changed: number; unchanged: number }; blame: { rule: string; count: number }[] }[] };
    const changed = c.varieties.reduce((k, v) => k + v.counts.changed, 0);
    const total = c.varieties.reduce((k, v) => k + v.counts.changed + v.counts.unchanged, 0);
    say(`check: changed entries ${fmt(changed)} = plain line diff ${fmt(plain.differ ?? -1)}: ${changed === plain.differ ? "yes" : "NO"}; entries compared ${fmt(total)} = ${fmt(cmu.rows * VARIETIES.length)}: ${total === cmu.rows * VARIETIES.length ? "yes" : "NO"}`);
    if (changed !== plain.differ) failures.push(`compare found ${changed} changed entries, the plain diff ${plain.differ}`);
    if (total !== cmu.rows * VARIETIES.length) failures.push(`compare matched ${total} entries, expected ${cmu.rows * VARIETIES.length}`);
    const rules = new Set(c.varieties.flatMap((v) => v.blame.map((b) => b.rule)));
    say(`check: every change blamed on flapping: ${[...rules].join(", ") === "flapping" ? "yes" : `NO (${[...rules].join(", ")})`}`);
    if ([...rules].join(",") !== "flapping") failures.push(`blame names ${[...rules].join(", ")}, not only flapping`);
    for (const v of c.varieties) say(`  ${v.name}: ${fmt(v.counts.changed)} changed, ${fmt(v.counts.unchanged)} unchanged`);
  } else failures.push("strata compare -o wrote no compare.json");

  const t = (rs: ChildRun[]) => median(rs.map((r) => r.wallMs));
  const peak = (rs: ChildRun[]) => Math.max(...rs.map((r) => r.maxRssBytes ?? 0));
  const ratio = t(compares) / t(reads);
  const mb = peak(compares) / 1e6;
  say(textTable(["", "median wall", "peak RSS"], [
    ["read both builds' JSONL (lines only)", fmtMs(t(raws)), fmtMB(peak(raws))],
    ["read and parse both builds' JSONL (the floor)", fmtMs(t(reads)), fmtMB(peak(reads))],
    ["strata compare (no report files)", fmtMs(t(compares)), fmtMB(peak(compares))],
    ["strata compare -o (JSON, JUnit, HTML)", fmtMs(withFiles.wallMs), fmtMB(withFiles.maxRssBytes)],
  ]));
  say(`target: compare ≤ 2 × the floor: ${ratio.toFixed(2)}× ${ratio <= 2 ? "(met)" : "(NOT met)"}; peak RSS ≤ 400 MB: ${mb.toFixed(0)} MB ${mb <= 400 ? "(met)" : "(NOT met)"}; compare / lines only: ${(t(compares) / t(raws)).toFixed(2)}×`);
  for (const f of failures) say(`FAILED: ${f}`);
  return { ok: failures.length === 0 };
}
