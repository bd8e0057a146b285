// End to end against the script it replaces: `strata transcribe` (TSV to stdout) and `strata build`
// (one variety, TSV + JSON Lines + PLS), both with cached machines, each timed as a whole child
// process beside the in-house script (bench/inhouse.ts: csv-parse plus a regular-expression cascade)
// on the same CSV, in turn (script, transcribe, build, script, …) so each ratio is taken pair by
// pair; beside them the same script made to write the build's three formats (bench/inhouse-formats.ts),
// the cost of writing records of that size before any of Strata's work; and the stages of one build
// measured one at a time in this process.

import { EntryKeys } from "../src/lexicon/keys.js";
import { readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { availableParallelism } from "node:os";
import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";
import type { Grammar } from "../src/grammar/index.js";
import type { Inventory } from "../src/inventory/types.js";
import { writeFileAtomic } from "../src/emit/atomic.js";
import { writePls, type PlsEntry } from "../src/emit/pls.js";
import { tsvHeader } from "../src/emit/tsv.js";
import { putTsvLine } from "../src/emit/tsv-batch.js";
import { ALL_NEEDS, NARROW_ONLY, type EntryResult } from "../src/lexicon/engine.js";
import { machineEngine } from "../src/lexicon/engine-machine.js";
import { PronReader } from "../src/lexicon/pron.js";
import { readLexicon, writeRejects, type LexiconRow } from "../src/lexicon/read.js";
import { countInputRecords, countWritten, reconcile } from "../src/lexicon/reconcile.js";
import { renderIpa, symbolView } from "../src/lexicon/render.js";
import { entryPhonemes } from "../src/lexicon/runner.js";
import { putJsonRecord } from "../src/emit/jsonl-bytes.js";
import { ByteChunks } from "../src/emit/bytes.js";
import { StressHygiene, STRESS_REPORT } from "../src/lexicon/hygiene.js";
import { reconcileStressReport } from "../src/lexicon/reconcile-stress.js";
import { fmt, fmtMB, fmtMs, median, runChild, strataCli, textTable, type ChildRun } from "./util.js";

export interface EndToEnd {
  readonly inhouseMs: number;
  /** The in-house script writing TSV, JSON Lines and PLS files (bench/inhouse-formats.ts). */
  readonly formatsMs: number;
  readonly formatsRss: number | null;
  readonly formatsCpuMs: number | null;
  /** Medians of the per-pair ratios: the three-format script ÷ the in-house script, the build ÷ the three-format script. */
  readonly formatsRatio: number;
  readonly buildOverFormats: number;
  readonly transcribeMs: number;
  readonly buildMs: number;
  readonly inhouseRss: number | null;
  readonly transcribeRss: number | null;
  readonly buildRss: number | null;
  /** Medians of the per-pair ratios. */
  readonly transcribeRatio: number;
  readonly buildRatio: number;
  /** The same ratios of CPU time (user + system; null when unknown): steadier on a shared machine. */
  readonly transcribeCpuRatio: number | null;
  readonly buildCpuRatio: number | null;
  readonly inhouseCpuMs: number | null;
  readonly transcribeCpuMs: number | null;
  readonly buildCpuMs: number | null;
  /** A build's CPU by thread (medians; null off Linux): see `threadSplit`. */
  readonly buildThreads: ThreadSplit | null;
  readonly stages: readonly Stage[];
  readonly failures: readonly string[];
}

/**
 * Where a child's CPU went: its main thread, and every other thread (V8's garbage-collection and
 * compiler threads, libuv's file-system threads, worker threads when there are any). `boundMs` is
 * a lower bound on the child's wall time for the same CPU work on this machine: the main thread's
 * work runs one step after another, and all of it cannot run faster than on every core at once, so
 * no schedule of this work finishes before max(main-thread CPU, all CPU ÷ cores).
 */
export interface ThreadSplit {
  readonly mainMs: number;
  readonly otherMs: number;
  readonly cores: number;
  readonly boundMs: number;
  /** Median over the pairs of runs of boundMs ÷ the in-house script's wall time. */
  readonly boundRatio: number;
}

/** The thread split of `runs` (null when a run lacks the main thread's CPU), the bound taken against `base` run by run. */
export function threadSplit(runs: readonly ChildRun[], base: readonly ChildRun[], cores: number): ThreadSplit | null {
  if (!runs.every((r) => r.cpuMs !== null && r.mainCpuMs !== null)) return null;
  const bound = (r: ChildRun): number => Math.max(r.mainCpuMs!, r.cpuMs! / cores);
  return {
    mainMs: median(runs.map((r) => r.mainCpuMs!)),
    otherMs: median(runs.map((r) => r.cpuMs! - r.mainCpuMs!)),
    cores,
    boundMs: median(runs.map(bound)),
    boundRatio: median(runs.map((r, k) => bound(r) / base[k]!.wallMs)),
  };
}

/** One stage of a build: wall time and CPU time (user + system) of this process while it ran. */
export interface Stage {
  readonly name: string;
  readonly ms: number;
  readonly cpu: number;
}

const say = (s = ""): void => void process.stdout.write(s + "\n");
const maxRss = (runs: readonly ChildRun[]): number | null => {
  const xs = runs.map((r) => r.maxRssBytes).filter((x): x is number => x !== null);
  return xs.length > 0 ? Math.max(...xs) : null;
};

export async function benchEndToEnd(o: {
  root: string; csv: string; lexiconDir: string; grammarPath: string; grammar: Grammar; inventory: Inventory;
  cacheDir: string; work: string; reps: number; entries: number;
}): Promise<EndToEnd> {
  const failures: string[] = [];
  const rssWrapper = join(o.root, "dist", "bench", "rss.js");
  const inhouse = join(o.root, "dist", "bench", "inhouse.js");
  const formats = join(o.root, "dist", "bench", "inhouse-formats.js");
  const formatsOut = join(o.work, "inhouse-formats");
  const cli = strataCli(o.root);
  const outRoot = join(o.work, "e2e-out");
  const inhouseOut = join(o.work, "inhouse.tsv");
  const transcribeOut = join(o.work, "transcribe.tsv");
  const runs = { inhouse: [] as ChildRun[], formats: [] as ChildRun[], transcribe: [] as ChildRun[], build: [] as ChildRun[] };
  rmSync(outRoot, { recursive: true, force: true });
  const transcribeArgs = ["transcribe", "-g", join(o.root, "lexicons", "en-us"), "--cache-dir", o.cacheDir, o.csv];
  const buildArgs = ["build", o.lexiconDir, "--out", outRoot, "--cache-dir", o.cacheDir, "--quiet"];
  // One untimed run of each fills the caches (machines, grammar) and the file system's.
  await runChild(rssWrapper, cli, buildArgs, { cwd: o.root });
  for (let k = 0; k < o.reps; k++) {
    runs.inhouse.push(await runChild(rssWrapper, inhouse, [o.csv], { cwd: o.root, stdoutFile: inhouseOut }));
    runs.formats.push(await runChild(rssWrapper, formats, [o.csv, formatsOut], { cwd: o.root }));
    runs.transcribe.push(await runChild(rssWrapper, cli, transcribeArgs, { cwd: o.root, stdoutFile: transcribeOut }));
    runs.build.push(await runChild(rssWrapper, cli, buildArgs, { cwd: o.root }));
  }
  for (const [what, rs] of Object.entries(runs)) {
    const bad = rs.find((r) => r.code !== 0);
    if (bad) failures.push(`${what} exited with ${bad.code}: ${bad.stderr.trim().split("\n").slice(0, 3).join(" | ")}`);
  }
  // Output checks: every entry written; transcribe's TSV is the build's TSV byte for byte.
  const lines = (p: string): number => readFileSync(p, "utf8").split("\n").length - 2;
  if (lines(inhouseOut) !== o.entries) failures.push(`the in-house script wrote ${lines(inhouseOut)} entries, not ${o.entries}`);
  const formatsTsv = join(formatsOut, "lexicon.tsv");
  if (lines(formatsTsv) !== o.entries) failures.push(`the three-format script wrote ${lines(formatsTsv)} entries, not ${o.entries}`);
  const built = join(outRoot, "cmu", "general", "lexicon.tsv");
  if (!readFileSync(built).equals(readFileSync(transcribeOut))) failures.push("strata transcribe's TSV differs from strata build's lexicon.tsv");
  for (const f of ["lexicon.jsonl", "lexicon.pls"]) {
    try {
      readFileSync(join(outRoot, "cmu", "general", f));
    } catch {
      failures.push(`strata build wrote no ${f}`);
    }
  }
  const pairRatio = (a: readonly ChildRun[], base = runs.inhouse): number => median(a.map((r, k) => r.wallMs / base[k]!.wallMs));
  const cpuRatio = (a: readonly ChildRun[]): number | null =>
    a.every((r, k) => r.cpuMs !== null && runs.inhouse[k]!.cpuMs !== null) ? median(a.map((r, k) => r.cpuMs! / runs.inhouse[k]!.cpuMs!)) : null;
  const cpu = (a: readonly ChildRun[]): number | null => (a.every((r) => r.cpuMs !== null) ? median(a.map((r) => r.cpuMs!)) : null);
  const res = {
    inhouseMs: median(runs.inhouse.map((r) => r.wallMs)),
    formatsMs: median(runs.formats.map((r) => r.wallMs)), formatsRss: maxRss(runs.formats), formatsCpuMs: cpu(runs.formats),
    formatsRatio: pairRatio(runs.formats), buildOverFormats: pairRatio(runs.build, runs.formats),
    transcribeMs: median(runs.transcribe.map((r) => r.wallMs)),
    buildMs: median(runs.build.map((r) => r.wallMs)),
    inhouseRss: maxRss(runs.inhouse), transcribeRss: maxRss(runs.transcribe), buildRss: maxRss(runs.build),
    transcribeRatio: pairRatio(runs.transcribe), buildRatio: pairRatio(runs.build),
    transcribeCpuRatio: cpuRatio(runs.transcribe), buildCpuRatio: cpuRatio(runs.build),
    inhouseCpuMs: cpu(runs.inhouse), transcribeCpuMs: cpu(runs.transcribe), buildCpuMs: cpu(runs.build),
    buildThreads: threadSplit(runs.build, runs.inhouse, availableParallelism()),
  };
  const cpuText = (ms: number | null, ratio: number | null): string => (ms === null ? "n/a" : `${fmtMs(ms)} (${ratio === null ? "n/a" : `${fmt(ratio, 2)}×`})`);
  say();
  say(`-- end to end against the in-house script (child processes, same CSV, in turn; median of ${o.reps}) --`);
  say(textTable(["", "wall", "÷ in-house (pairs)", "CPU (÷ in-house)", "peak RSS"], [
    ["in-house script: csv-parse + 5 regexes → TSV (stdout)", fmtMs(res.inhouseMs), "1.00×", cpuText(res.inhouseCpuMs, 1), fmtMB(res.inhouseRss)],
    ["the same script writing TSV + JSON Lines + PLS files", fmtMs(res.formatsMs), `${fmt(res.formatsRatio, 2)}×`, cpuText(res.formatsCpuMs, cpuRatio(runs.formats)), fmtMB(res.formatsRss)],
    ["strata transcribe → TSV (stdout), cached machines", fmtMs(res.transcribeMs), `${fmt(res.transcribeRatio, 2)}×`, cpuText(res.transcribeCpuMs, res.transcribeCpuRatio), fmtMB(res.transcribeRss)],
    ["strata build → TSV + JSON Lines + PLS, cached machines", fmtMs(res.buildMs), `${fmt(res.buildRatio, 2)}×`, cpuText(res.buildCpuMs, res.buildCpuRatio), fmtMB(res.buildRss)],
  ]));
  say(`strata build ÷ the three-format script (pairs): ${fmt(res.buildOverFormats, 2)}×`);

  const t = res.buildThreads;
  if (t !== null) {
    say();
    say(`-- the three-format build's CPU by thread (median of ${o.reps}; /proc, to 10 ms), and what that leaves on ${t.cores} cores --`);
    say(textTable(["", "CPU", "÷ in-house wall"], [
      ["main thread: reading, the engine, the writers, the reconciliation", fmtMs(t.mainMs), `${fmt(t.mainMs / res.inhouseMs, 2)}×`],
      ["other threads: V8's garbage collection and compiler, file system", fmtMs(t.otherMs), `${fmt(t.otherMs / res.inhouseMs, 2)}×`],
      [`lower bound on the wall for this CPU work: max(main thread, all ÷ ${t.cores} cores)`, fmtMs(t.boundMs), `${fmt(t.boundRatio, 2)}× (pairs)`],
    ]));
  }

  const stages = await buildStages(o, join(o.work, "stages"), failures);
  say();
  say("-- the stages of one build, one at a time (in process, whole dictionary, cached machines) --");
  printStages(stages);
  return { ...res, stages, failures };
}

/** The stage table: wall time, CPU time (steadier on a shared machine) and each stage's share of the wall time. */
export function printStages(stages: readonly Stage[]): void {
  const total = stages.reduce((s, x) => s + x.ms, 0);
  const cpu = stages.reduce((s, x) => s + x.cpu, 0);
  say(textTable(["stage", "time", "CPU", "share"], [
    ...stages.map((s) => [s.name, fmtMs(s.ms), fmtMs(s.cpu), `${fmt((100 * s.ms) / total, 0)}%`]),
    ["sum of the stages", fmtMs(total), fmtMs(cpu), ""],
  ]));
}

/**
 * Times each stage of a build on its own, in the order a build runs them: read and parse (the
 * reader less its tokenising), tokenise (a fresh memo), encode, the machines (narrow and broad),
 * render, per-step blame, variants (both by difference of whole engine runs), each writer
 * (formatting and writing its file whole), the stress checks, and the reconciliation that reads the
 * files back (in its parts).
 */
export async function buildStages(o: { csv: string; grammar: Grammar; inventory: Inventory; cacheDir: string }, outDir: string, failures: string[]): Promise<Stage[]> {
  const inv = o.inventory;
  const built = machineEngine(o.grammar, inv, { cacheDir: o.cacheDir });
  const engine = built.engine;
  if (engine === undefined) throw new Error("the en-us grammar does not compile");
  // Each stage starts after a full collection and a pause for V8's helper threads to finish sweeping
  // after it: the garbage of the stages before (the entries of the whole dictionary) is otherwise
  // collected in whichever stage comes next, and one run showed the TSV writer at 0.45 s against
  // 0.1 s in the next. Without the pause the sweeping ran into the next stage (CPU above its wall time).
  setFlagsFromString("--expose-gc");
  const collect = runInNewContext("gc") as () => void;
  const time = async <T>(fn: () => T | Promise<T>): Promise<{ ms: number; cpu: number; value: T }> => {
    collect();
    await new Promise((res) => setTimeout(res, 150));
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    const value = await fn();
    const c = process.cpuUsage(c0);
    return { ms: performance.now() - t0, cpu: (c.user + c.system) / 1000, value };
  };
  const reading = await time(async () => {
    const rows: LexiconRow[] = [];
    for await (const batch of readLexicon(o.csv, { inventory: inv }).batches()) for (const x of batch) if (x.kind === "row") rows.push(x);
    return rows;
  });
  const rows = reading.value;
  const tok = await time(() => {
    const fresh = new PronReader(inv);
    let n = 0;
    for (const r of rows) n += fresh.read(r.pron)?.symbols.length ?? 0;
    return n;
  });
  const enc = await time(() => rows.map((r) => engine.encode(r.symbols)));
  const encoded = enc.value.filter((e): e is { ids: number[]; bids: number[] } => e !== undefined);
  if (encoded.length !== rows.length) failures.push(`${rows.length - encoded.length} entries are outside the compiled alphabet`);
  const mach = await time(() => encoded.map((e) => {
    const out: number[] = [];
    const bout: number[] = [];
    engine.compiled.preferred.run(e.ids, out);
    engine.broad.preferred.run(e.bids, bout);
    return [out, bout] as const;
  }));
  const view = symbolView(engine.compiled.alphabet, inv);
  const bview = symbolView(engine.broad.alphabet, inv);
  const render = await time(() => mach.value.map(([a, b]) => renderIpa(a, view).length + renderIpa(b, bview).length));
  const narrowOnly = await time(() => encoded.map((e) => engine.transcribeIds(e.ids, e.bids, NARROW_ONLY)));
  const withRules = await time(() => encoded.map((e) => engine.transcribeIds(e.ids, e.bids, { rules: true, variants: false })));
  const all = await time(() => encoded.map((e) => engine.transcribeIds(e.ids, e.bids, ALL_NEEDS)));
  const keys = new EntryKeys();
  const results: EntryResult[] = all.value.map((t, k) => ({ kind: "entry", file: rows[k]!.file, line: rows[k]!.line, word: rows[k]!.word, key: keys.next(rows[k]!.word, rows[k]!.id), input: { pron: rows[k]!.pron, tags: rows[k]!.tags }, ...t! }));
  // Each writer as the build runs it: lines put into 1 MiB chunks (emit/bytes.ts), each chunk
  // written as soon as it is full and its buffer then filled again (emit/atomic.ts).
  function* streamed(put: (b: ByteChunks, r: EntryResult) => void, head = ""): Generator<Uint8Array> {
    const ready: Uint8Array[] = [];
    const b = new ByteChunks((c) => void ready.push(c));
    if (head !== "") b.push(head);
    for (const r of results) {
      put(b, r);
      if (ready.length > 0) yield* ready.splice(0);
    }
    b.flush();
    yield* ready.splice(0);
  }
  const tsv = await time(() => writeFileAtomic(join(outDir, "lexicon.tsv"), streamed((b, r) => void putTsvLine(b, r), tsvHeader())));
  const jsonl = await time(() => writeFileAtomic(join(outDir, "lexicon.jsonl"), streamed((b, r) => void putJsonRecord(b, r, r.file, r.line))));
  const pls = await time(async () => {
    const lexemes = new Map<string, PlsEntry & { phonemes: string[] }>();
    for (const r of results) {
      const lx = lexemes.get(r.word);
      if (lx === undefined) lexemes.set(r.word, { word: r.word, phonemes: entryPhonemes(r), preferred: 0 });
      else for (const p of entryPhonemes(r)) if (!lx.phonemes.includes(p)) lx.phonemes.push(p);
    }
    return writePls(join(outDir, "lexicon.pls"), lexemes.values(), { lang: "en-US" });
  });
  await writeRejects(join(outDir, "rejects.csv"), []);
  // The reconciliation as a build runs it, in its three parts: the input's records counted on their
  // own, the written files read back, and the two compared (reconcile.ts).
  const counting = await time(() => countInputRecords(o.csv));
  const readingBack = await time(() => countWritten({ tsv: join(outDir, "lexicon.tsv"), jsonl: join(outDir, "lexicon.jsonl"), pls: join(outDir, "lexicon.pls"), rejects: join(outDir, "rejects.csv") }));
  const reconciling = await time(() => reconcile(o.csv, counting.value, readingBack.value));
  if (reconciling.value.length > 0) failures.push(`the stage outputs do not reconcile: ${reconciling.value[0]!.message}`);
  // The stress checks of every entry written, and the stress report read back against the input (hygiene.ts, reconcile-stress.ts).
  const hygiene = new StressHygiene({ inventory: inv, assignsStress: engine.steps.includes("stress") });
  const checking = await time(() => rows.forEach((r, k) => hygiene.observe(r, results[k]!.key)));
  await writeFileAtomic(join(outDir, STRESS_REPORT), hygiene.report());
  const stressBack = await time(() => reconcileStressReport(o.csv, join(outDir, STRESS_REPORT), hygiene.total, [{ file: rows[0]?.file ?? "", input: counting.value }], []));
  if (stressBack.value.length > 0) failures.push(`the stress report does not reconcile: ${stressBack.value[0]!.message}`);
  rmSync(outDir, { recursive: true, force: true });
  return [
    { name: "read and parse (reader less tokenising)", ms: Math.max(0, reading.ms - tok.ms), cpu: Math.max(0, reading.cpu - tok.cpu) },
    { name: "tokenise (fresh memo)", ms: tok.ms, cpu: tok.cpu },
    { name: "encode (narrow and broad alphabets)", ms: enc.ms, cpu: enc.cpu },
    { name: "machines (composed preferred + prosody)", ms: mach.ms, cpu: mach.cpu },
    { name: "render IPA (narrow and broad)", ms: render.ms, cpu: render.cpu },
    { name: "per-step blame", ms: Math.max(0, withRules.ms - narrowOnly.ms), cpu: Math.max(0, withRules.cpu - narrowOnly.cpu) },
    { name: "variants (screen + enumeration)", ms: Math.max(0, all.ms - withRules.ms), cpu: Math.max(0, all.cpu - withRules.cpu) },
    { name: "TSV writer", ms: tsv.ms, cpu: tsv.cpu },
    { name: "JSON Lines writer", ms: jsonl.ms, cpu: jsonl.cpu },
    { name: "PLS writer", ms: pls.ms, cpu: pls.cpu },
    { name: "stress checks (every entry)", ms: checking.ms, cpu: checking.cpu },
    { name: "reconciliation: input records counted", ms: counting.ms, cpu: counting.cpu },
    { name: "reconciliation: outputs read back", ms: readingBack.ms, cpu: readingBack.cpu },
    { name: "reconciliation: compared line by line", ms: reconciling.ms, cpu: reconciling.cpu },
    { name: "reconciliation: stress report read back", ms: stressBack.ms, cpu: stressBack.cpu },
  ];
}
