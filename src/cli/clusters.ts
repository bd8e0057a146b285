// `strata clusters FILE [-g DIR] [--min-count N]`: derives legal onsets and codas from the word-initial
// and word-final consonant clusters of a lexicon and prints them as grammar lines to paste and edit.

import { basename } from "node:path";
import type { Command } from "commander";
import { atLeast, countsComment, deriveClusters, grammarLine, type ClusterCount } from "../lexicon/clusters.js";
import {
  openCache, cacheOptions, checkInputFile, checkNotAnInput, checkOutputPath, commonOptions, EXIT, examples, grammarOptions, jsonOption, loadChecked,
  outOption, plural, positiveInt, printOutcome, renderDiagnostics, resolveGrammar, shippedGrammar, useColour, type CommandOutcome,
} from "./common.js";

export interface ClustersOptions {
  /** Grammar folder or .strata file whose inventory splits the segments (default: the shipped en-us). */
  readonly grammar?: string;
  /** The variety, by its name in varieties.json. */
  readonly variety?: string;
  /** No summary line on standard error. */
  readonly quiet?: boolean;
  /** The clusters and counts as JSON instead of grammar lines. */
  readonly json?: boolean;
  /** Exit 0 even when rows were rejected. */
  readonly allowRejects?: boolean;
  readonly cache?: boolean;
  readonly cacheDir?: string;
  /** Drop clusters seen fewer times than this (default 1: keep all). */
  readonly minCount?: number;
  /** Lexicon source when the file is '-' (default: standard input). */
  readonly input?: NodeJS.ReadableStream;
}

/** Exit 0 done; 3 done, but rows were rejected (skipped; see 'strata lint'); 1 could not run. */
export type ClustersOutcome = CommandOutcome;

/** Derives the clusters and formats the grammar text without touching the process. */
export async function runClusters(file: string, opts: ClustersOptions = {}): Promise<ClustersOutcome> {
  const render = (ds: Parameters<typeof renderDiagnostics>[0]): string => renderDiagnostics(ds, useColour());
  const resolved = resolveGrammar(opts.grammar, opts.variety, shippedGrammar());
  if ("diagnostics" in resolved) return { stdout: "", stderr: render(resolved.diagnostics), exitCode: EXIT.badInput };
  const gpath = resolved.path;
  const cache = openCache(opts);
  const g = loadChecked(gpath, cache.dir);
  if (g.grammar === undefined || g.inventory === undefined || g.diagnostics.some((d) => d.severity === "error")) {
    return { stdout: "", stderr: render(g.diagnostics) + "clusters: the grammar does not load.\n", exitCode: EXIT.badInput };
  }
  const fromStdin = file === "-";
  if (!fromStdin) {
    const bad = checkInputFile(file, [], "lexicon");
    if (bad !== undefined) return { stdout: "", stderr: render([bad]), exitCode: EXIT.badInput };
  }
  const d = fromStdin ? await deriveClusters(opts.input ?? process.stdin, g.inventory, { file: "<stdin>" }) : await deriveClusters(file, g.inventory);
  if (d.diagnostics.some((x) => x.severity === "error")) {
    return { stdout: "", stderr: render(d.diagnostics) + "clusters: the lexicon could not be read.\n", exitCode: EXIT.badInput };
  }
  const r = d.counter.result({ onsets: g.grammar.onsets, codas: g.grammar.codas });
  const min = opts.minCount ?? 1;
  const onsets = atLeast(r.onsets, min);
  const codas = atLeast(r.codas, min);
  const compared = g.grammar.onsets !== null || g.grammar.codas !== null;
  const name = fromStdin ? "<stdin>" : basename(file);

  let out = `-- Onsets and codas derived by 'strata clusters' from ${name}: the consonants before the first\n`;
  out += `-- nucleus and after the last nucleus of each word (${r.words} words of ${d.rows} rows; ${r.skipped} without a nucleus skipped).\n`;
  out += `-- Counts are occurrences${min > 1 ? `; clusters seen fewer than ${min} times are left out` : ""}.\n`;
  out += `-- Edit before use: rare clusters are often loanwords or names, and medial clusters may need\n`;
  out += `-- onsets or codas that no word edge shows.\n`;
  if (compared) out += `-- '*' marks a cluster that ${basename(gpath)} does not declare yet.\n`;
  out += countsComment(`onsets (${onsets.length}):`, onsets);
  out += countsComment(`codas (${codas.length}):`, codas);
  const unwritable = [...onsets, ...codas].filter((c) => !c.writable);
  if (unwritable.length > 0) {
    out += `-- left out of the lines below: these read back as other segments when written together: ${unwritable.map((c) => c.segments.join(" + ")).join(", ")}\n`;
  }
  const texts = (cs: readonly ClusterCount[]): string[] => cs.filter((c) => c.writable).map((c) => c.text);
  out += grammarLine("onsets", texts(onsets));
  out += grammarLine("codas", texts(codas));

  const dropped = r.onsets.length - onsets.length + r.codas.length - codas.length;
  let stderr = "";
  if (opts.quiet !== true) {
    stderr += `clusters: ${plural(d.rows + d.rejects, "row")} read, ${d.rejects} rejected (see 'strata lint'); ${plural(onsets.length, "onset")}, ${plural(codas.length, "coda")}`;
    stderr += dropped > 0 ? `, ${dropped} rarer than ${min} left out\n` : "\n";
  }
  stderr += render(opts.quiet === true ? d.diagnostics.filter((x) => x.severity === "error") : [...cache.diagnostics, ...d.diagnostics]);
  const exitCode = d.rejects > 0 && opts.allowRejects !== true ? EXIT.rejects : EXIT.ok;
  if (opts.json === true) {
    const json = (cs: readonly ClusterCount[]) => cs.map((c) => ({ cluster: c.text, segments: c.segments, count: c.count, writable: c.writable }));
    const doc = { file: name, grammar: gpath, rows: d.rows, rejects: d.rejects, words: r.words, skipped: r.skipped, minCount: min, onsets: json(onsets), codas: json(codas) };
    return { stdout: JSON.stringify(doc, null, 2) + "\n", stderr, exitCode };
  }
  return { stdout: out, stderr, exitCode };
}

/** Adds `strata clusters` to the program. */
export function registerClusters(program: Command): void {
  const cmd = program
    .command("clusters")
    .description("derive legal onsets and codas from a lexicon's word-initial and word-final clusters, as grammar lines to edit")
    .argument("<file>", "lexicon CSV (word,pron,...); '-' for standard input");
  grammarOptions(cmd, "grammar whose inventory splits the segments, and whose declared lists are compared (default: the current folder, else the shipped en-us)");
  cmd
    .option("--min-count <n>", "leave out clusters seen fewer than n times", positiveInt)
    .option("--allow-rejects", "exit 0 even when some rows were rejected");
  jsonOption(cmd, "print the clusters and their counts as JSON");
  outOption(cmd, "file", "write the grammar lines to this file (whole) instead of standard output");
  cacheOptions(cmd, false);
  commonOptions(cmd);
  examples(cmd, [
    ["strata clusters lexicons/demo/lexicon.csv", "onsets/codas lines under the shipped en-us inventory"],
    ["strata clusters my.csv -g my-voice -d general --min-count 3 -o clusters.strata", "a variety's inventory, rare clusters left out, to a file"],
  ]);
  cmd.action(async (file: string, o: { grammar?: string; variety?: string; minCount?: number; allowRejects?: boolean; json?: boolean; out?: string; quiet?: boolean; cache: boolean; cacheDir?: string }) => {
    if (o.out !== undefined) {
      const bad = checkOutputPath(o.out, ["-o", "--out"], "file") ?? checkNotAnInput({ value: o.out, flags: ["-o", "--out"] }, [file]);
      if (bad !== undefined) return printOutcome({ stdout: "", stderr: renderDiagnostics([bad], useColour()), exitCode: EXIT.badInput });
    }
    const outcome = await runClusters(file, {
      quiet: o.quiet === true, json: o.json === true, allowRejects: o.allowRejects === true, cache: o.cache,
      ...(o.grammar !== undefined ? { grammar: o.grammar } : {}),
      ...(o.variety !== undefined ? { variety: o.variety } : {}),
      ...(o.minCount !== undefined ? { minCount: o.minCount } : {}),
      ...(o.cacheDir !== undefined ? { cacheDir: o.cacheDir } : {}),
    });
    await printOutcome(outcome, o.out);
  });
}
