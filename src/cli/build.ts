// `strata build [DIR]`: compile every variety a lexicon folder declares (cached), run the lexicon
// through each, write TSV, JSON Lines, PLS, rejects and a summary under build/<lexicon>/<variety>/.

import { createReadStream, readFileSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";
import type { Command } from "commander";
import cliProgress from "cli-progress";
import pc from "picocolors";
import { loadManifest } from "../lexicon/manifest.js";
import { runLexicon, ALL_FORMATS, type OutputFormat, type RunSummary } from "../lexicon/runner.js";
import { loadEngine, packageRoot, printDiagnostics, positiveInt, type EngineKind } from "./common.js";
import { InterpreterEngine } from "../lexicon/engine-interp.js";
import { checkAgainstInterpreter } from "../lexicon/check.js";
import { WorkerPool } from "../lexicon/pool.js";
import { availableParallelism } from "node:os";
import { openBuildOutput, type BuildOutput } from "../lexicon/buildout.js";
import { probeCacheDir } from "../compile/cache.js";

interface BuildOptions {
  out: string;
  allowRejects: boolean;
  quiet: boolean;
  format?: string[];
  engine: EngineKind;
  check?: number;
  cache: boolean;
  maxStates?: number;
  samples: number;
  workers: string;
  syllableBreaks: boolean;
  cacheDir?: string;
}

/** Lexicons at least this long are spread over worker threads when --workers is auto. */
const WORKERS_FROM_ROWS = 20_000;

/** Counts data lines cheaply (for the progress bar's total). */
async function countLines(path: string): Promise<number> {
  let n = 0;
  for await (const chunk of createReadStream(path)) {
    const b = chunk as Buffer;
    for (let i = 0; i < b.length; i++) if (b[i] === 10) n++;
  }
  return n;
}

export async function runBuild(dirArg: string | undefined, o: BuildOptions): Promise<number> {
  // The output folder's lock and run record are released and written however the build ends.
  const held: { output?: BuildOutput; workers: number } = { workers: 0 };
  try {
    return await buildLocked(dirArg, o, held);
  } finally {
    if (held.output !== undefined) printDiagnostics(await held.output.close(held.workers));
  }
}

async function buildLocked(dirArg: string | undefined, o: BuildOptions, held: { output?: BuildOutput; workers: number }): Promise<number> {
  const dir = dirArg ?? join(packageRoot(), "lexicons", "demo");
  const { manifest, diagnostics } = loadManifest(dir);
  printDiagnostics(diagnostics);
  if (manifest === undefined) return 1;
  const formats = (o.format ?? [...ALL_FORMATS]) as OutputFormat[];
  for (const f of formats) {
    if (!ALL_FORMATS.includes(f)) {
      process.stderr.write(`strata: unknown --format '${f}' (choose from ${ALL_FORMATS.join(", ")})\n`);
      return 2;
    }
  }
  const outRoot = resolve(o.out);
  const opened = await openBuildOutput(join(outRoot, manifest.name), dirname(manifest.file));
  if (!opened.ok) {
    printDiagnostics(opened.diagnostics);
    return 1;
  }
  held.output = opened.output;
  const cache = o.cache ? probeCacheDir(resolve(o.cacheDir ?? join(outRoot, "cache"))) : undefined;
  if (cache !== undefined) printDiagnostics(cache.diagnostics.filter(() => !o.quiet));
  const cacheDir = cache?.dir;
  const tty = process.stderr.isTTY === true && !o.quiet;
  const lines = await countLines(manifest.lexicon);
  const total = tty ? lines : 0;
  // Worker threads besides the main thread (which reads, tokenises and writes): auto leaves one
  // core to the main thread (on 2 cores: one worker; peak memory grows by ~150 MB per worker).
  const wanted = o.workers === "auto" ? (lines >= WORKERS_FROM_ROWS ? Math.max(1, Math.min(8, availableParallelism() - 1)) : 0) : Number(o.workers);
  if (!Number.isInteger(wanted) || wanted < 0) {
    process.stderr.write(`strata: --workers must be 'auto' or a whole number (0: no worker threads)\n`);
    return 2;
  }
  const threads = o.engine === "machine" && WorkerPool.script() !== undefined ? wanted : 0;
  held.workers = threads;
  let failed = false;
  let internal = false;
  let rejected = false;
  const summaries: RunSummary[] = [];
  for (const variety of manifest.varieties) {
    const t0 = performance.now();
    const loaded = loadEngine(variety.grammar, { kind: o.engine, syllables: o.syllableBreaks, ...(cacheDir !== undefined ? { cacheDir } : {}), ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}) });
    printDiagnostics(loaded.diagnostics.filter((d) => d.severity === "error" || !o.quiet));
    if (!("engine" in loaded)) {
      failed = true;
      held.output.record({ name: variety.name, status: "failed", compileMs: performance.now() - t0, runMs: 0 });
      continue;
    }
    const compileMs = performance.now() - t0;
    const outDir = join(outRoot, manifest.name, variety.name);
    const bar = tty ? new cliProgress.SingleBar({ format: `${variety.name.padEnd(12)} {bar} {value}/{total} rows`, hideCursor: true }, cliProgress.Presets.shades_classic) : undefined;
    bar?.start(Math.max(1, total - 1), 0);
    let summary: RunSummary;
    let pool: WorkerPool | undefined;
    try {
      if (threads > 0) {
        pool = await WorkerPool.start(threads, { grammar: variety.grammar, ...(cacheDir !== undefined ? { cacheDir } : {}), ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}), blame: true, syllables: o.syllableBreaks });
      }
      summary = await runLexicon(loaded.engine, loaded.inventory, manifest.lexicon, outDir, variety, {
        formats,
        sourceRoot: dirname(manifest.file),
        ...(pool !== undefined ? { pool } : {}),
        ...(bar !== undefined ? { onProgress: (n: number) => bar.update(n), progressEvery: 500 } : {}),
      });
    } finally {
      bar?.stop();
      await pool?.close();
    }
    summaries.push(summary);
    held.output.record({ name: variety.name, status: summary.reconciled ? "written" : "failed", compileMs, runMs: summary.seconds * 1000 });
    if (summary.outputErrors.some((d) => d.code === "run/unreconciled")) internal = true;
    // The lexicon file's own problems (all of them, capped per file): the same for every variety, so printed once.
    const fileErrors = summary.fileDiagnostics.filter((d) => d.severity === "error");
    if (!summary.reconciled || fileErrors.length > 0 || summary.outputErrors.length > 0) failed = true;
    printDiagnostics([...(summaries.length === 1 ? summary.fileDiagnostics.filter((d) => d.severity === "error" || !o.quiet) : []), ...summary.outputErrors]);
    if (summary.rowsRejected > 0) rejected = true;
    if (!o.quiet) printSummary(summary, compileMs, outDir, o.samples);
    if (o.check !== undefined) {
      const interp = new InterpreterEngine(loaded.grammar, loaded.inventory);
      const res = await checkAgainstInterpreter(loaded.engine, interp, loaded.inventory, manifest.lexicon, o.check);
      const line = `check: ${res.compared} entries compared with the reference interpreter, ${res.mismatches.length} differ`;
      process.stdout.write((res.mismatches.length === 0 ? line : pc.red(line)) + "\n");
      for (const m of res.mismatches.slice(0, 10)) process.stdout.write(`  line ${m.line} ${m.word}: machine ${m.machine} | interpreter ${m.interpreter}\n`);
      if (res.mismatches.length > 0) failed = true;
    }
  }
  if (rejected) {
    const n = summaries.reduce((k, s) => k + s.rowsRejected, 0);
    const msg = `${n} row(s) rejected (see rejects.csv in each variety's folder)`;
    if (!o.allowRejects) {
      process.stderr.write(pc.red(`strata: ${msg}; rerun with --allow-rejects to accept them`) + "\n");
      return internal ? 70 : failed ? 1 : 3;
    }
    if (!o.quiet) process.stderr.write(`strata: ${msg}, allowed by --allow-rejects\n`);
  }
  return internal ? 70 : failed ? 1 : 0;
}

function printSummary(s: RunSummary, compileMs: number, outDir: string, samples: number): void {
  const rel = relative(process.cwd(), outDir) || ".";
  const w = (line: string) => process.stdout.write(line + "\n");
  w(pc.bold(`${s.variety}`) + `  → ${rel}/`);
  w(`  rows read ${s.rowsRead} = entries ${s.entriesWritten} + rejected ${s.rowsRejected}${s.reconciled ? "" : pc.red("  (does not reconcile!)")}`);
  w(`  words ${s.words}, entries with variants ${s.entriesWithVariants} (${s.variantsTotal} variants in all)`);
  w(`  compile ${compileMs.toFixed(0)} ms, run ${(s.seconds * 1000).toFixed(0)} ms`);
  const changed = s.changedBy.filter((c) => c.entries > 0).map((c) => `${c.step} ${c.entries}`);
  if (changed.length > 0) w(`  entries changed by: ${changed.join(", ")}`);
  w(`  files: ${Object.keys(s.files).sort().join(", ")}`);
  const tsv = s.files["lexicon.tsv"];
  if (tsv !== undefined && samples > 0) {
    const lines = readFileSync(tsv, "utf8").split("\n").slice(1).filter((l) => l !== "");
    const step = Math.max(1, Math.floor(lines.length / samples));
    for (let i = 0; i < lines.length && i / step < samples; i += step) {
      const [word, narrow, broad] = lines[i]!.split("\t");
      w(`    ${word!.padEnd(22)} ${(broad ?? "").padEnd(26)} → ${narrow}`);
    }
  }
}

export function registerBuild(program: Command): void {
  program
    .command("build")
    .description("compile a lexicon folder's varieties (cached) and write TSV, JSON Lines and PLS for each under build/<lexicon>/<variety>/")
    .argument("[dir]", "lexicon folder holding varieties.json (default: the shipped demo)")
    .option("-o, --out <dir>", "output root", "build")
    .option("--format <formats...>", `outputs to write (${ALL_FORMATS.join(" ")})`)
    .option("--allow-rejects", "exit 0 even when some rows were rejected", false)
    .option("-q, --quiet", "no progress bar, no summary", false)
    .option("--engine <kind>", "machine (compiled transducers) or interpreter (the slow reference)", "machine")
    .option("--check <n>", "also compare the first N entries with the reference interpreter", positiveInt("--check"))
    .option("--no-cache", "do not read or write compiled machines")
    .option("--cache-dir <dir>", "where compiled machines are cached (default: <out>/cache)")
    .option("--max-states <n>", "largest composed block before the cascade splits", positiveInt("--max-states"))
    .option("--no-syllable-breaks", "write no '.' between syllables (stress marks stay)")
    .option("--workers <n>", "worker threads running the machines beside the main thread: a number (0: none), or auto (one less than the cores, for lexicons of 20,000 rows or more)", "auto")
    .option("--samples <n>", "sample lines to print per variety", (v) => Number(v), 6)
    .action(async (dir: string | undefined, opts: BuildOptions) => {
      if (opts.engine !== "machine" && opts.engine !== "interpreter") {
        process.stderr.write(`strata: --engine must be 'machine' or 'interpreter'\n`);
        process.exitCode = 2;
        return;
      }
      process.exitCode = await runBuild(dir, opts);
    });
}
