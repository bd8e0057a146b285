// `strata clusters FILE [-g DIR] [--min-count N]`: derives legal onsets and codas from the word-initial
// and word-final consonant clusters of a lexicon and prints them as grammar lines to paste and edit.

import { basename, join } from "node:path";
import type { Command } from "commander";
import { formatDiagnostic } from "../diagnostics.js";
import { loadGrammar } from "../grammar/index.js";
import { atLeast, countsComment, deriveClusters, grammarLine, type ClusterCount } from "../lexicon/clusters.js";
import { grammarPath, packageRoot, positiveInt } from "./common.js";

export interface ClustersOptions {
  /** Grammar folder or .strata file whose inventory splits the segments (default: the shipped en-us). */
  readonly grammar?: string;
  readonly dialect?: string;
  /** Drop clusters seen fewer times than this (default 1: keep all). */
  readonly minCount?: number;
  /** Lexicon source when the file is '-' (default: standard input). */
  readonly input?: NodeJS.ReadableStream;
}

export interface ClustersOutcome {
  readonly stdout: string;
  readonly stderr: string;
  /** 0 done (rejected rows are skipped and counted on stderr); 2 could not run. */
  readonly exitCode: number;
}

/** Derives the clusters and formats the grammar text without touching the process. */
export async function runClusters(file: string, opts: ClustersOptions = {}): Promise<ClustersOutcome> {
  const gpath = grammarPath(opts.grammar ?? join(packageRoot(), "lexicons", "en-us"), opts.dialect);
  const g = loadGrammar(gpath);
  if (g.grammar === undefined || g.inventory === undefined || g.diagnostics.some((d) => d.severity === "error")) {
    return { stdout: "", stderr: g.diagnostics.map((d) => formatDiagnostic(d) + "\n").join("") + "clusters: the grammar does not load\n", exitCode: 2 };
  }
  const fromStdin = file === "-";
  const d = fromStdin ? await deriveClusters(opts.input ?? process.stdin, g.inventory, { file: "<stdin>" }) : await deriveClusters(file, g.inventory);
  if (d.diagnostics.some((x) => x.severity === "error")) {
    return { stdout: "", stderr: d.diagnostics.map((x) => formatDiagnostic(x) + "\n").join("") + "clusters: the lexicon could not be read\n", exitCode: 2 };
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
  let stderr = `clusters: ${d.rows + d.rejects} rows read, ${d.rejects} rejected (see 'strata lint'); ${onsets.length} onsets, ${codas.length} codas`;
  stderr += dropped > 0 ? `, ${dropped} rarer than ${min} left out\n` : "\n";
  for (const x of d.diagnostics) stderr += formatDiagnostic(x) + "\n";
  return { stdout: out, stderr, exitCode: 0 };
}

/** Adds `strata clusters` to the program. */
export function registerClusters(program: Command): void {
  program
    .command("clusters")
    .description("derive legal onsets and codas from a lexicon's word-initial and word-final clusters, as grammar lines to edit")
    .argument("<file>", "lexicon CSV (word,pron,...); '-' for standard input")
    .option("-g, --grammar <dir>", "grammar whose inventory splits the segments, and whose declared lists are compared (default: the shipped en-us)")
    .option("-d, --dialect <variety>", "use <dir>/<variety>.strata instead of grammar.strata")
    .option("--min-count <n>", "leave out clusters seen fewer than n times", positiveInt("--min-count"))
    .action(async (file: string, o: { grammar?: string; dialect?: string; minCount?: number }) => {
      const outcome = await runClusters(file, o);
      if (outcome.stdout !== "") process.stdout.write(outcome.stdout);
      if (outcome.stderr !== "") process.stderr.write(outcome.stderr);
      process.exitCode = outcome.exitCode;
    });
}
