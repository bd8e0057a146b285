// Four varieties of the whole CMU dictionary against one (issue: varieties that share a prefix of
// steps should not redo it). The lexicon folder build/bench/cmu4/ holds the bench's CMU CSV and
// four en-us grammars over one copy of the en-us files: general and careful as shipped, and two
// small edits — "no-nasal-flap" (general without the nasal-flap steps) and "careful-flap" (careful
// with flapping and the glottal stop after its other rules). Timed as whole child processes, in turn: `strata build` of
// the four, and of general alone (-d general), with cached machines and all three formats.

import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fmt, fmtMB, fmtMs, median, runChild, strataCli, textTable, type ChildRun } from "./util.js";

export const FOUR = ["general", "careful", "no-nasal-flap", "careful-flap"] as const;

/** Grammar files of the four varieties (the en-us files are copied beside them). */
const GRAMMARS: Readonly<Record<(typeof FOUR)[number], string>> = {
  general: "grammar.strata",
  careful: "careful.strata",
  "no-nasal-flap": "no-nasal-flap.strata",
  "careful-flap": "careful-flap.strata",
};

/**
 * Writes the four grammars into `grammars` (a copy of the en-us files and the two edits); returns
 * each variety's grammar file name there.
 */
export function writeFourGrammars(root: string, grammars: string): Readonly<Record<(typeof FOUR)[number], string>> {
  mkdirSync(grammars, { recursive: true });
  const enUs = join(root, "lexicons", "en-us");
  for (const f of readdirSync(enUs)) if (f.endsWith(".strata") || f.endsWith(".csv")) copyFileSync(join(enUs, f), join(grammars, f));
  const generalText = readFileSync(join(enUs, "grammar.strata"), "utf8");
  const careful = readFileSync(join(enUs, "careful.strata"), "utf8");
  if (!/^include "nasal-flap.strata"$/m.test(generalText) || !/^include "coarticulation.strata"$/m.test(careful)) {
    throw new Error("lexicons/en-us/grammar.strata or careful.strata no longer include the files the bench's varieties edit");
  }
  writeFileSync(join(grammars, "no-nasal-flap.strata"), "-- General American without the nasal flap (a bench variety).\n" + generalText.replace(/^include "nasal-flap.strata"\n?/m, ""));
  writeFileSync(join(grammars, "careful-flap.strata"), "-- Careful speech with flapping and the glottal stop after its other rules (a bench variety).\n" + careful.replace(/^include "coarticulation.strata"$/m, 'include "coarticulation.strata"\ninclude "reductions.strata"'));
  return GRAMMARS;
}

/** Writes `dir` (default build/bench/cmu4/): lexicon.csv copied from `csv`, grammars/, varieties.json; returns the folder. */
export function writeFourVarieties(root: string, csv: string, dir = join(root, "build", "bench", "cmu4")): string {
  rmSync(dir, { recursive: true, force: true });
  writeFourGrammars(root, join(dir, "grammars"));
  copyFileSync(csv, join(dir, "lexicon.csv"));
  const varieties = FOUR.map((name) => ({ name, lang: "en-US", grammar: `grammars/${GRAMMARS[name]}` }));
  writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties }, null, 2) + "\n");
  return dir;
}

export interface FourVarieties {
  readonly oneMs: number;
  readonly fourMs: number;
  readonly oneRss: number | null;
  readonly fourRss: number | null;
  /** Median of the per-pair ratios (four ÷ one). */
  readonly ratio: number;
  /** The same of CPU time (user + system), null when unknown. */
  readonly cpuRatio: number | null;
  /** Four varieties with V8's young generation capped at 4 MB (`--max-semi-space-size=4`): median wall, peak RSS. */
  readonly cappedMs: number;
  readonly cappedRss: number | null;
  /** Median peak RSS capped ÷ uncapped (null when unknown): near 1 unless entries outlive their row (see below). */
  readonly cappedRssRatio: number | null;
  readonly failures: readonly string[];
}

/**
 * The young generation capped at 4 MB makes V8's collections of it frequent, as they are for a
 * moment at start-up. Objects that a build holds longer than their row (a batch's entries) are then
 * alive at nearly every one, V8's allocation-site pretenuring judges their allocation sites
 * long-lived, and it puts every later entry in the old generation: the build grows by about 40%
 * and slows. It did that now and then without the cap (before the batch work went row by row);
 * with the cap it does it every time, so the peak RSS ratio shows a change that brings it back.
 */
const CAPPED_YOUNG = "--max-semi-space-size=4";

const say = (s = ""): void => void process.stdout.write(s + "\n");

export async function benchFourVarieties(o: { root: string; csv: string; cacheDir: string; work: string; reps: number }): Promise<FourVarieties> {
  const failures: string[] = [];
  const dir = writeFourVarieties(o.root, o.csv);
  const rssWrapper = join(o.root, "dist", "bench", "rss.js");
  const cli = strataCli(o.root);
  const out1 = join(o.work, "four-out-1");
  const out4 = join(o.work, "four-out-4");
  const args = (out: string, one: boolean): string[] => ["build", dir, "--out", out, "--cache-dir", o.cacheDir, "--quiet", ...(one ? ["-d", "general"] : [])];
  // One untimed run fills the caches (the four grammars' machines).
  const warm = await runChild(rssWrapper, cli, args(out4, false), { cwd: o.root });
  if (warm.code !== 0) failures.push(`strata build of four varieties exited with ${warm.code}: ${warm.stderr.trim().split("\n").slice(0, 3).join(" | ")}`);
  const one: ChildRun[] = [];
  const four: ChildRun[] = [];
  for (let k = 0; k < o.reps && failures.length === 0; k++) {
    one.push(await runChild(rssWrapper, cli, args(out1, true), { cwd: o.root }));
    four.push(await runChild(rssWrapper, cli, args(out4, false), { cwd: o.root }));
  }
  const capped: ChildRun[] = [];
  const cappedEnv = { NODE_OPTIONS: `${process.env["NODE_OPTIONS"] ?? ""} ${CAPPED_YOUNG}`.trim() };
  for (let k = 0; k < o.reps && failures.length === 0; k++) capped.push(await runChild(rssWrapper, cli, args(out4, false), { cwd: o.root, env: cappedEnv }));
  for (const r of [...one, ...four, ...capped]) if (r.code !== 0) failures.push(`strata build exited with ${r.code}: ${r.stderr.trim().split("\n").slice(0, 3).join(" | ")}`);
  // Output check: the general variety is the same bytes built alone and built with the others.
  for (const f of ["lexicon.tsv", "lexicon.jsonl", "lexicon.pls", "summary.json"]) {
    const a = join(out1, "cmu4", "general", f);
    const b = join(out4, "cmu4", "general", f);
    if (!existsSync(a) || !existsSync(b) || !readFileSync(a).equals(readFileSync(b))) failures.push(`general/${f} differs between the one-variety and the four-variety build`);
  }
  const rss = (rs: readonly ChildRun[]): number | null => (rs.some((r) => r.maxRssBytes !== null) ? Math.max(...rs.map((r) => r.maxRssBytes ?? 0)) : null);
  const res: FourVarieties = {
    oneMs: median(one.map((r) => r.wallMs)),
    fourMs: median(four.map((r) => r.wallMs)),
    oneRss: rss(one),
    fourRss: rss(four),
    ratio: median(four.map((r, k) => r.wallMs / one[k]!.wallMs)),
    cpuRatio: four.every((r, k) => r.cpuMs !== null && one[k]!.cpuMs !== null) ? median(four.map((r, k) => r.cpuMs! / one[k]!.cpuMs!)) : null,
    cappedMs: capped.length > 0 ? median(capped.map((r) => r.wallMs)) : NaN,
    cappedRss: rss(capped),
    cappedRssRatio: capped.length > 0 && [...capped, ...four].every((r) => r.maxRssBytes !== null)
      ? median(capped.map((r) => r.maxRssBytes!)) / median(four.map((r) => r.maxRssBytes!)) : null,
    failures,
  };
  say();
  say(`-- four varieties against one (child processes, whole dictionary, TSV + JSON Lines + PLS, cached machines; median of ${o.reps}) --`);
  const cpu = (rs: readonly ChildRun[]): string => (rs.every((r) => r.cpuMs !== null) ? fmtMs(median(rs.map((r) => r.cpuMs!))) : "n/a");
  say(textTable(["", "wall", "÷ one variety (pairs)", "CPU", "CPU ÷ one variety", "peak RSS"], [
    ["strata build -d general (one variety)", fmtMs(res.oneMs), "1.00×", cpu(one), "1.00×", fmtMB(res.oneRss)],
    [`strata build, four varieties (${FOUR.join(", ")})`, fmtMs(res.fourMs), `${fmt(res.ratio, 2)}×`, cpu(four), res.cpuRatio === null ? "n/a" : `${fmt(res.cpuRatio, 2)}×`, fmtMB(res.fourRss)],
    [`the same, young generation capped (${CAPPED_YOUNG})`, fmtMs(res.cappedMs), "", cpu(capped), "", fmtMB(res.cappedRss)],
  ]));
  say("shared: the lexicon is read, parsed, tokenised and counted once for the four; each of the other three takes over general's walk through the steps it shares with general (the per-step blame and derivation); an entry a variety transcribes as the one before it reuses that one's TSV and JSON Lines lines.");
  return res;
}
