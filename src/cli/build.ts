// `strata build [DIR]`: compile every variety a lexicon folder declares (cached), run the lexicon
// through each, write TSV, JSON Lines, PLS, rejects and a summary under build/<lexicon>/<variety>/.

import { readFileSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";
import { Option, type Command } from "commander";
import { loadManifest } from "../lexicon/manifest.js";
import { runVarieties, ALL_FORMATS, type OutputFormat, type RunSummary, type VarietyRun } from "../lexicon/runner.js";
import { countInputRecords } from "../lexicon/reconcile.js";
import { InterpreterEngine } from "../lexicon/engine-interp.js";
import { checkAgainstInterpreter } from "../lexicon/check.js";
import { ChunkPool } from "../lexicon/chunks.js";
import { approxRows, workerCount, workersArg, WORKERS_FROM_ROWS, WORKERS_HELP } from "./workers.js";
import { differingSamples, narrowTable } from "../lexicon/samples.js";
import { buildRecord, varietyRecord, writeBuildRecord, type VarietyRecord } from "../regress/record.js";
import { checkBuildPins, readPins } from "../regress/pinned.js";
import { openBuild } from "../regress/folder.js";
import { openBuildOutput, type BuildOutput } from "../lexicon/buildout.js";
import { STRESS_REPORT, stressLine, stressTotal } from "../lexicon/hygiene.js";
import { PLS_PHONEMES, type PlsPhonemes } from "../lexicon/ipa-options.js";
import {
  openCache, cacheOptions, checkInputFolder, checkOutputPath, colours, commandLineError, commonOptions, ENGINE_KINDS, EXIT, examples, jsonOption,
  listOf, loadEngine, rootOption, packageRoot, plural, positiveInt, printDiagnostics, wholeNumber, type EngineKind,
} from "./common.js";

export interface BuildOptions {
  out?: string;
  allowRejects?: boolean;
  quiet?: boolean;
  /** Outputs to write (default: all). */
  format?: OutputFormat[];
  /** Build only this variety (by its name in varieties.json). */
  variety?: string;
  engine?: EngineKind;
  check?: number;
  cache?: boolean;
  maxStates?: number;
  samples?: number;
  /** Worker threads: "auto" or a whole number (0: none). */
  workers?: string | number;
  syllableBreaks?: boolean;
  cacheDir?: string;
  /** The summaries as one JSON document on stdout instead of the text report. */
  json?: boolean;
  /** Exit 4 when any stress problem is found (after writing every output). */
  strict?: boolean;
  /** Tie bars between the letters of one segment (t͡ʃ, a͡ɪ) in every IPA written. */
  tieBars?: boolean;
  /** What lexicon.pls phonemes hold: every narrow variant (default) or the broad form. */
  plsPhonemes?: PlsPhonemes;
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
  const quiet = o.quiet === true;
  const dir = dirArg ?? join(packageRoot(), "lexicons", "demo");
  const outArg = o.out ?? "build";
  const pathProblem = (dirArg !== undefined ? checkInputFolder(dirArg, [], "lexicon folder") : undefined) ?? checkOutputPath(outArg, ["-o", "--out"], "folder");
  if (pathProblem !== undefined) {
    printDiagnostics([pathProblem]);
    return EXIT.badInput;
  }
  const { manifest, diagnostics } = loadManifest(dir);
  printDiagnostics(diagnostics, { quiet });
  if (manifest === undefined) return EXIT.badInput;
  const pinned = readPins(dirname(manifest.file), manifest.varieties.map((v) => v.name));
  printDiagnostics(pinned.diagnostics);
  if (pinned.diagnostics.length > 0) return EXIT.badInput;
  const varieties = o.variety === undefined ? manifest.varieties : manifest.varieties.filter((v) => v.name === o.variety);
  if (varieties.length === 0) {
    printDiagnostics([commandLineError("cli/unknown-variety", `There is no variety '${o.variety}' in ${manifest.name}'s varieties.json; its varieties are ${manifest.varieties.map((v) => v.name).join(", ")}.`, o.variety, ["-d", "--variety"])]);
    return EXIT.badInput;
  }
  const formats = o.format ?? [...ALL_FORMATS];
  const engine = o.engine ?? "machine";
  const syllables = o.syllableBreaks ?? true;
  const outRoot = resolve(outArg);
  const opened = await openBuildOutput(join(outRoot, manifest.name), dirname(manifest.file));
  if (!opened.ok) {
    printDiagnostics(opened.diagnostics);
    return EXIT.badInput;
  }
  held.output = opened.output;
  const cache = openCache(o, join(outRoot, "cache"));
  printDiagnostics(cache.diagnostics, { quiet });
  const cacheDir = cache.dir;
  const tty = process.stderr.isTTY === true && !quiet && o.json !== true;
  const c = colours(process.stdout);
  // The lexicon's records, for the progress bar's total (on a terminal only): counted first, and
  // given to the reconciliation. Otherwise the reconciliation counts them itself, once per run, on
  // the thread that checks the written files (lexicon/check-written.ts). A file that cannot be read
  // is reported by the reader; the count is then not waited for.
  const inputRecords = tty ? countInputRecords(manifest.lexicon) : undefined;
  inputRecords?.catch(() => undefined);
  const threads = engine === "machine" && ChunkPool.script() !== undefined ? workerCount(o.workers, await approxRows(manifest.lexicon), WORKERS_FROM_ROWS.build) : 0;
  const total = inputRecords !== undefined ? await inputRecords.then((r) => r.count + 1, () => 0) : 0;
  held.workers = threads;
  let failed = false;
  let internal = false;
  let checksFailed = false;
  const summaries: RunSummary[] = [];
  const records: VarietyRecord[] = [];
  const report: unknown[] = [];
  // Every variety is compiled (or read from the cache) first; then varieties whose grammars read
  // pronunciations with the same inventory run together, over one read of the lexicon.
  type Ready = { variety: (typeof varieties)[number]; loaded: Extract<ReturnType<typeof loadEngine>, { engine: unknown }>; compileMs: number; summary?: RunSummary };
  const order: ({ variety: (typeof varieties)[number]; failedMs: number } | Ready)[] = [];
  const groups = new Map<string, Ready[]>();
  for (const variety of varieties) {
    const t0 = performance.now();
    const loaded = loadEngine(variety.grammar, { kind: engine, syllables, derivations: formats.includes("jsonl"), ties: o.tieBars === true, ...(cacheDir !== undefined ? { cacheDir } : {}), ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}) });
    printDiagnostics(loaded.diagnostics, { quiet });
    if (!("engine" in loaded)) {
      failed = true;
      order.push({ variety, failedMs: performance.now() - t0 });
      continue;
    }
    const record = varietyRecord(dirname(manifest.file), variety, loaded.grammar);
    records.push(record);
    const ready: Ready = { variety, loaded, compileMs: performance.now() - t0 };
    order.push(ready);
    const key = record.inventory.files.length > 0 ? record.inventory.sha256 : `variety ${variety.name}`;
    const group = groups.get(key) ?? [];
    if (group.length === 0) groups.set(key, group);
    group.push(ready);
  }
  for (const group of groups.values()) {
    const progress = tty ? (await import("cli-progress")).default : undefined;
    const bar = progress !== undefined ? new progress.SingleBar({ format: `${group.map((r) => r.variety.name).join(", ").padEnd(12)} {bar} {value}/{total} rows`, hideCursor: true }, progress.Presets.shades_classic) : undefined;
    bar?.start(Math.max(1, total - 1), 0);
    try {
      const runs: VarietyRun[] = group.map((r) => ({ engine: r.loaded.engine, outDir: join(outRoot, manifest.name, r.variety.name), variety: r.variety, assignsStress: r.loaded.grammar.steps.some((s) => s.kind === "stress"), ...(r.variety.overrides !== undefined ? { overrides: r.variety.overrides } : {}) }));
      // Each worker thread loads the machines as this thread did (from the cache just filled).
      const workerEngines = group.map((r) => ({ grammar: r.variety.grammar, ...(cacheDir !== undefined ? { cacheDir } : {}), ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}), syllables, derivations: formats.includes("jsonl"), ...(o.tieBars === true ? { ties: true } : {}) }));
      const done = await runVarieties(group[0]!.loaded.inventory, manifest.lexicon, runs, {
        formats,
        sourceRoot: dirname(manifest.file),
        ...(o.plsPhonemes !== undefined ? { plsPhonemes: o.plsPhonemes } : {}),
        ...(inputRecords !== undefined ? { inputRecords } : {}),
        ...(threads > 0 ? { workers: { count: threads, engines: workerEngines } } : {}),
        ...(bar !== undefined ? { onProgress: (n: number) => bar.update(n), progressEvery: 500 } : {}),
      });
      group.forEach((r, i) => (r.summary = done[i]));
    } finally {
      bar?.stop();
    }
  }
  for (const entry of order) {
    const variety = entry.variety;
    if ("failedMs" in entry) {
      held.output.record({ name: variety.name, status: "failed", compileMs: entry.failedMs, runMs: 0 });
      continue;
    }
    const { loaded, compileMs } = entry;
    const summary = entry.summary!;
    const outDir = join(outRoot, manifest.name, variety.name);
    summaries.push(summary);
    held.output.record({ name: variety.name, status: summary.reconciled ? "written" : "failed", compileMs, runMs: summary.seconds * 1000 });
    if (summary.outputErrors.some((d) => d.code === "run/unreconciled")) internal = true;
    // Problems with the lexicon file itself (every one, capped per file; the same for every variety,
    // so printed once) and outputs that could not be written are errors: printed even with --quiet.
    // Rejected rows are in rejects.csv.
    const fileProblems = summary.fileDiagnostics;
    if (!summary.reconciled || fileProblems.some((d) => d.severity === "error") || summary.outputErrors.length > 0) failed = true;
    printDiagnostics([...(summaries.length === 1 ? fileProblems : []), ...(summary.overrideDiagnostics ?? []), ...summary.outputErrors], { quiet });
    // Stress hygiene: one line per variety on stderr; --strict fails on any problem.
    if (summary.stress !== undefined) {
      if (!quiet) process.stderr.write(`strata: ${variety.name}: ${stressLine(summary.stress, STRESS_REPORT)}\n`);
      if (o.strict === true && stressTotal(summary.stress) > 0) checksFailed = true;
    }
    let check: { compared: number; mismatches: { line: number; word: string; machine: string; interpreter: string }[] } | undefined;
    if (o.check !== undefined) {
      const interp = new InterpreterEngine(loaded.grammar, loaded.inventory);
      const res = await checkAgainstInterpreter(loaded.engine, interp, loaded.inventory, manifest.lexicon, o.check);
      check = { compared: res.compared, mismatches: res.mismatches.map((m) => ({ line: m.line, word: m.word, machine: m.machine, interpreter: m.interpreter })) };
      if (res.mismatches.length > 0) checksFailed = true;
    }
    if (o.json === true) {
      report.push({ variety: summary.variety, out: relative(process.cwd(), outDir) || ".", rowsRead: summary.rowsRead, entriesWritten: summary.entriesWritten, rowsRejected: summary.rowsRejected, ...(summary.rowsReplaced !== undefined ? { rowsReplaced: summary.rowsReplaced } : {}), reconciled: summary.reconciled, words: summary.words, ...(summary.stress !== undefined ? { stress: summary.stress } : {}), entriesWithVariants: summary.entriesWithVariants, variantsTotal: summary.variantsTotal, changedBy: summary.changedBy, files: Object.keys(summary.files).sort(), ...(check !== undefined ? { check } : {}) });
    } else {
      if (!quiet) printSummary(summary, compileMs, outDir, varieties.length > 1 ? 0 : (o.samples ?? 6), await terminalWidth());
      if (check !== undefined) {
        const line = `check: ${plural(check.compared, "entry", "entries")} compared with the reference interpreter, ${check.mismatches.length} differ`;
        process.stdout.write((check.mismatches.length === 0 ? line : c.red(line)) + "\n");
        for (const m of check.mismatches.slice(0, 10)) process.stdout.write(`  line ${m.line} ${m.word}: machine ${m.machine} | interpreter ${m.interpreter}\n`);
      }
    }
  }
  // The build record (what produced the build) and the pinned expectations (lexicon/pinned.csv).
  if (!failed) {
    await writeBuildRecord(join(outRoot, manifest.name), buildRecord(manifest, records));
    if (pinned.pins.length > 0 && formats.includes("jsonl")) {
      const res = await checkBuildPins(openBuild(join(outRoot, manifest.name)), records.map((r) => r.name), pinned.pins);
      for (const f of res.failures) process.stderr.write(colours().red(f) + "\n");
      if (!quiet && o.json !== true) process.stdout.write(`pinned: ${res.checked - res.failures.length} of ${plural(res.checked, "expectation")} hold\n`);
      if (res.failures.length > 0) checksFailed = true;
    } else if (pinned.pins.length > 0 && !quiet) {
      process.stderr.write("strata: pinned.csv was not checked: it is checked against lexicon.jsonl, which --format left out.\n");
    }
  }
  if (o.json === true) process.stdout.write(JSON.stringify({ lexicon: manifest.name, varieties: report }, null, 2) + "\n");
  else if (!quiet && summaries.length > 1) printDiffering(summaries, o.samples ?? 6, await terminalWidth());
  const rejected = summaries.reduce((k, s) => k + s.rowsRejected, 0);
  if (rejected > 0) {
    const msg = `${plural(rejected, "row")} rejected (see rejects.csv in each variety's folder)`;
    if (o.allowRejects !== true) process.stderr.write(colours().red(`strata: ${msg}; rerun with --allow-rejects to accept them.`) + "\n");
    else if (!quiet) process.stderr.write(`strata: ${msg}, allowed by --allow-rejects.\n`);
  }
  if (internal) return EXIT.internal;
  if (failed) return EXIT.badInput;
  if (checksFailed) return EXIT.checksFailed;
  if (rejected > 0 && o.allowRejects !== true) return EXIT.rejects;
  return EXIT.ok;
}

/**
 * The width of a string in terminal columns (IPA combining marks take none), loaded only when a
 * report is printed: string-width sets up a grapheme segmenter and Unicode-property patterns when
 * imported (~15 ms of a quiet build's start), and the progress bar is likewise loaded only for one.
 */
const terminalWidth = async (): Promise<(s: string) => number> => (await import("string-width")).default;

/** Pads to a width in terminal columns. */
const padTo = (s: string, w: number, width: (s: string) => number): string => s + " ".repeat(Math.max(0, w - width(s)));

function printSummary(s: RunSummary, compileMs: number, outDir: string, samples: number, width: (s: string) => number): void {
  const c = colours(process.stdout);
  const rel = relative(process.cwd(), outDir) || ".";
  const w = (line: string) => process.stdout.write(line + "\n");
  w(c.bold(`${s.variety}`) + `  → ${rel}/`);
  const replaced = s.rowsReplaced !== undefined ? ` + replaced by overrides ${s.rowsReplaced}` : "";
  w(`  rows read ${s.rowsRead} = entries ${s.entriesWritten} + rejected ${s.rowsRejected}${replaced}${s.reconciled ? "" : c.red("  (does not reconcile!)")}`);
  w(`  ${plural(s.words, "word")}, ${plural(s.entriesWithVariants, "entry", "entries")} with variants (${plural(s.variantsTotal, "variant")} in all)`);
  w(`  compile ${compileMs.toFixed(0)} ms, run ${(s.seconds * 1000).toFixed(0)} ms`);
  const changed = s.changedBy.filter((x) => x.entries > 0).map((x) => `${x.step} ${x.entries}`);
  if (changed.length > 0) w(`  entries changed by: ${changed.join(", ")}`);
  w(`  files: ${Object.keys(s.files).sort().join(", ")}`);
  const tsv = s.files["lexicon.tsv"];
  if (tsv !== undefined && samples > 0) {
    const all = readFileSync(tsv, "utf8").split("\n");
    const lines = all.slice(1).filter((l) => l !== "");
    const step = Math.max(1, Math.floor(lines.length / samples));
    // The TSV's columns are named in its header; the sample shows word, broad → narrow.
    const header = all[0]!.split("\t");
    const col = (name: string, fallback: number): number => (header.indexOf(name) >= 0 ? header.indexOf(name) : fallback);
    const [iw, inarrow, ibroad] = [col("word", 0), col("narrow", 1), col("broad", 2)];
    for (let i = 0; i < lines.length && i / step < samples; i += step) {
      const f = lines[i]!.split("\t");
      w(`    ${padTo(f[iw] ?? "", 22, width)} ${padTo(f[ibroad] ?? "", 26, width)} → ${f[inarrow] ?? ""}`);
    }
  }
}

/** With several varieties, the sample lines are entries whose narrow forms differ between them. */
function printDiffering(summaries: readonly RunSummary[], samples: number, width: (s: string) => number): void {
  const tables = summaries.flatMap((s) => (s.files["lexicon.tsv"] !== undefined ? [narrowTable(s.variety, readFileSync(s.files["lexicon.tsv"], "utf8"))] : []));
  if (samples === 0 || tables.length < 2) return;
  const d = differingSamples(tables, samples);
  const w = (line: string) => process.stdout.write(line + "\n");
  w(`where the varieties differ: ${d.differing} of ${plural(d.compared, "entry", "entries")}${d.samples.length > 0 ? ", for example" : ""}`);
  if (d.samples.length === 0) return;
  const cols = tables.map((t, i) => Math.max(width(t.variety), ...d.samples.map((x) => width(x.narrow[i] ?? ""))) + 2);
  w(`    ${padTo("", 22, width)} ${tables.map((t, i) => padTo(t.variety, cols[i]!, width)).join("").trimEnd()}`);
  for (const x of d.samples) w(`    ${padTo(x.word, 22, width)} ${x.narrow.map((n, i) => padTo(n ?? "", cols[i]!, width)).join("").trimEnd()}`);
}

interface BuildCliOptions extends Omit<BuildOptions, "workers"> {
  workers: string;
}

export function registerBuild(program: Command): void {
  const cmd = program
    .command("build")
    .description("compile a lexicon folder's varieties (cached) and write TSV, JSON Lines and PLS for each under build/<lexicon>/<variety>/")
    .argument("[dir]", "lexicon folder holding varieties.json (default: the shipped demo)")
    .option("-o, --out <dir>", "output root folder", "build")
    .option("-d, --variety <name>", "build only this variety (its name in varieties.json)")
    .option("--format <formats>", `outputs to write, comma-separated or repeated (${ALL_FORMATS.join(", ")}; default: all)`, listOf(ALL_FORMATS))
    .option("--allow-rejects", "exit 0 even when some rows were rejected")
    .option("--strict", `exit 4 when an entry has a stress problem (listed in each variety's ${STRESS_REPORT}); every output is still written`)
    .addOption(new Option("--engine <kind>", "compiled machines, or the slow reference interpreter").choices(ENGINE_KINDS).default("machine"))
    .option("--check <n>", "also compare the first N entries with the reference interpreter (exit 4 when they differ)", positiveInt)
    .option("--no-syllable-breaks", "write no '.' between syllables (stress marks stay)")
    .option("--tie-bars", "write tie bars on affricates and diphthongs (t͡ʃ, d͡ʒ, a͡ɪ) in every output, for consumers that parse IPA")
    .addOption(new Option("--pls-phonemes <form>", "what lexicon.pls phonemes hold: every narrow variant, or the broad form alone (for engines with limited IPA)").choices(PLS_PHONEMES).default("narrow"))
    .option("--workers <n>", WORKERS_HELP, workersArg, "auto")
    .option("--samples <n>", "sample lines to print: entries whose narrow forms differ between the varieties (per variety when only one is built)", wholeNumber, 6);
  jsonOption(cmd, "print the summaries as one JSON document instead of the report");
  cmd.addOption(rootOption());
  cacheOptions(cmd);
  commonOptions(cmd);
  examples(cmd, [
    ["strata build", "the shipped demo → build/demo/<variety>/"],
    ["strata build lexicons/demo -d careful --format tsv,pls", "one variety, two outputs"],
    ["strata build my-voice -o out --allow-rejects -q", "errors only; rejects do not fail the run"],
    ["strata build my-voice --strict", "exit 4 when stress.csv lists any stress problem"],
    ["strata build my-voice --pls-phonemes broad --tie-bars", "broad forms in PLS; tie bars everywhere"],
  ]);
  cmd.action(async (dir: string | undefined, opts: BuildCliOptions) => {
    process.exitCode = await runBuild(dir, opts);
  });
}
