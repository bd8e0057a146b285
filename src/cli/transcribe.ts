// `strata transcribe [-g PATH] [-d VARIETY] [--format tsv|jsonl|pls] [FILE|-]`: a lexicon CSV in,
// narrow transcriptions out on stdout as rows arrive (for pipelines); rejects reported on stderr.

import { Option, type Command } from "commander";
import { formatDiagnostic } from "../diagnostics.js";
import { checkEntry, isWellFormedLanguageTag, PlsError, plsChunks, type PlsEntry } from "../emit/pls.js";
import { formatTsvEntry, tsvHeader } from "../emit/tsv.js";
import { readLexicon, rejectDiagnostic } from "../lexicon/read.js";
import { entryJsonLine, entryOf, isRejected, narrowForms, transcription } from "../lexicon/runner.js";
import { pickLanguage, plsPhonemes, PLS_PHONEMES, type PlsPhonemes } from "../lexicon/ipa-options.js";
import { EntryKeys, keyOf } from "../lexicon/keys.js";
import { Channel } from "../lexicon/channel.js";
import { InvalidArgumentError } from "commander";
import {
  openCache, cacheOptions, checkInputFile, checkNotAnInput, checkOutputPath, commandLineError, commonOptions, ENGINE_KINDS, EXIT, examples,
  grammarOptions, loadEngine, outOption, printDiagnostics, resolveGrammar, type EngineKind,
} from "./common.js";
import { BufferedWriter } from "../emit/buffered.js";
import { putTsvEntry } from "../emit/tsv-batch.js";
import { putNarrowTsv } from "../lexicon/narrow-tsv.js";
import { ALL_NEEDS, NARROW_ONLY, type Needs } from "../lexicon/engine.js";
import { StressHygiene } from "../lexicon/hygiene.js";
import { ChunkPool } from "../lexicon/chunks.js";
import { transcribeChunked, transcribeEnd } from "./transcribe-chunked.js";
import { approxRows, workerCount, workersArg, WORKERS_FROM_ROWS, WORKERS_HELP } from "./workers.js";

export const TRANSCRIBE_FORMATS = ["tsv", "jsonl", "pls"] as const;

export interface TranscribeOptions {
  grammar?: string;
  variety?: string;
  format?: (typeof TRANSCRIBE_FORMATS)[number];
  /** xml:lang for PLS (default: the variety's lang in varieties.json, else the grammar's `language`, else `und`). */
  lang?: string;
  allowRejects?: boolean;
  engine?: EngineKind;
  cache?: boolean;
  cacheDir?: string;
  maxStates?: number;
  syllableBreaks?: boolean;
  out?: string;
  quiet?: boolean;
  /** Standard input when the file is `-` or absent (default: process.stdin). */
  input?: NodeJS.ReadableStream;
  /** Exit 4 when any stress problem is found (after writing the output). */
  strict?: boolean;
  /** Tie bars between the letters of one segment (t͡ʃ, a͡ɪ). */
  tieBars?: boolean;
  /** What PLS phonemes hold: the narrow forms (default) or the broad form. */
  plsPhonemes?: PlsPhonemes;
  /** Where to write the stress problems as CSV (lexicon/hygiene.ts); none when absent. */
  stressReport?: string;
  /** Worker threads sharing the work (TSV and JSON Lines from a file): a number, or "auto" (default). */
  workers?: string | number;
}

/** A BCP 47 tag for `--lang` (RFC 5646 well-formedness, as PLS xml:lang needs). */
function languageTag(value: string): string {
  if (!isWellFormedLanguageTag(value)) throw new InvalidArgumentError("It must be a well-formed BCP 47 language tag such as en-US.");
  return value;
}

export async function runTranscribe(file: string | undefined, o: TranscribeOptions): Promise<number> {
  const format = o.format ?? "tsv";
  const fromStdin = file === undefined || file === "-";
  const resolved = resolveGrammar(o.grammar, o.variety);
  if ("diagnostics" in resolved) {
    printDiagnostics(resolved.diagnostics);
    return EXIT.badInput;
  }
  const manifestLang = o.lang ?? resolved.lang;
  const paths =
    (fromStdin ? undefined : checkInputFile(file, [], "lexicon")) ??
    (o.out !== undefined ? checkOutputPath(o.out, ["-o", "--out"], "file") ?? checkNotAnInput({ value: o.out, flags: ["-o", "--out"] }, fromStdin ? [] : [file]) : undefined) ??
    (o.stressReport !== undefined ? checkOutputPath(o.stressReport, ["--stress-report"], "file") ?? checkNotAnInput({ value: o.stressReport, flags: ["--stress-report"] }, [...(fromStdin ? [] : [file]), ...(o.out !== undefined ? [o.out] : [])]) : undefined) ??
    (manifestLang !== undefined && !isWellFormedLanguageTag(manifestLang) ? commandLineError("cli/bad-language-tag", `The variety's language tag '${manifestLang}' is not a well-formed BCP 47 tag; give --lang.`, o.variety, ["-d", "--variety"]) : undefined);
  if (paths !== undefined) {
    printDiagnostics([paths]);
    return EXIT.badInput;
  }
  const cache = openCache(o);
  printDiagnostics(cache.diagnostics, { quiet: o.quiet === true });
  const cacheDir = cache.dir;
  const loaded = loadEngine(resolved.path, {
    kind: o.engine ?? "machine",
    ...(cacheDir !== undefined ? { cacheDir } : {}),
    ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}),
    // The per-step machines give JSON Lines its rules and let PLS skip enumerating most variants.
    blame: format !== "tsv",
    syllables: o.syllableBreaks ?? true,
    ties: o.tieBars === true,
  });
  printDiagnostics(loaded.diagnostics, { quiet: o.quiet === true });
  if (!("engine" in loaded)) return EXIT.badInput;
  // PLS xml:lang: --lang, the variety's lang in varieties.json, the grammar's `language`, else und.
  const chosen = pickLanguage(manifestLang, loaded.grammar, format === "pls");
  if ("diagnostic" in chosen) {
    printDiagnostics([chosen.diagnostic]);
    return EXIT.badInput;
  }
  const lang = chosen.lang;
  // TSV and JSON Lines from a file can be spread over worker threads, a chunk of the file each
  // (lexicon/chunks.ts); standard input and PLS (grouped as rows stream) stay on this thread.
  const threads = !fromStdin && format !== "pls" && o.engine !== "interpreter" && ChunkPool.script() !== undefined ? workerCount(o.workers, await approxRows(file), format === "tsv" ? WORKERS_FROM_ROWS.transcribeTsv : WORKERS_FROM_ROWS.build) : 0;
  if (threads > 0 && format !== "pls") {
    return transcribeChunked(file!, threads, {
      grammar: resolved.path, ...(cacheDir !== undefined ? { cacheDir } : {}), ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}),
      blame: format !== "tsv", syllables: o.syllableBreaks ?? true, ...(o.tieBars === true ? { ties: true } : {}),
    }, format, loaded.grammar.steps.some((s) => s.kind === "stress"), o, { engine: loaded.engine, inventory: loaded.inventory });
  }
  const sourceName = fromStdin ? "<stdin>" : file;
  const reader = readLexicon(fromStdin ? (o.input ?? process.stdin) : file, { inventory: loaded.inventory, file: sourceName });

  // Output: standard output as rows arrive, or (with -o) a file written whole at the end.
  // Standard output goes in large chunks (back-pressure respected), flushed after each input batch.
  const chunks: string[] = [];
  const stdout = o.out !== undefined && o.out !== "-" ? undefined : new BufferedWriter(process.stdout);
  const write = (text: string): Promise<void> | undefined => (stdout !== undefined ? stdout.write(text) : void chunks.push(text));

  let rejects = 0;
  let entries = 0;
  const reject = (d: Parameters<typeof printDiagnostics>[0][number]): void => {
    rejects++;
    process.stderr.write(formatDiagnostic(d) + "\n");
  };
  // PLS: one lexeme per word; rows of a word that follow each other are grouped as they stream.
  // Each row is checked as a PLS entry first (characters XML forbids, …): a row that cannot be
  // written is a reject, so the document on stdout is never left half-written.
  const pls = format === "pls" ? new Channel<PlsEntry>() : undefined;
  const plsWriter = pls !== undefined ? (async () => {
    for await (const chunk of plsChunks(pls, { lang, file: "<stdout>" })) await write(chunk);
  })() : undefined;
  let pending: { word: string; phonemes: string[]; line: number; file: string } | undefined;
  const flush = (): void => {
    if (pending !== undefined && pls !== undefined) pls.push({ word: pending.word, phonemes: pending.phonemes, preferred: 0, source: { file: pending.file, line: pending.line, column: 1 } });
    pending = undefined;
  };
  // Only what the format prints: TSV neither variants nor blame, PLS the variants, JSON Lines both.
  const needs: Needs = format === "tsv" ? NARROW_ONLY : format === "pls" ? (o.plsPhonemes === "broad" ? NARROW_ONLY : { variants: true, rules: false }) : ALL_NEEDS;
  if (format === "tsv") await write(tsvHeader());
  const keys = new EntryKeys();
  // Stress hygiene of every entry written (the checks strata lint makes; lexicon/hygiene.ts).
  // The report's lines are kept only for --stress-report; otherwise the findings are only counted.
  const hygiene = new StressHygiene({ inventory: loaded.inventory, assignsStress: loaded.grammar.steps.some((s) => s.kind === "stress") }, undefined, o.stressReport !== undefined);
  try {
    for await (const batch of reader.batches()) {
      for (const item of batch) {
        if (item.kind === "reject") {
          reject(rejectDiagnostic(item));
          continue;
        }
        const n = keys.count(item.word);
        if (format === "tsv") {
          // To standard output the line goes straight into the byte chunks: the usual row from the
          // machines' outputs (lexicon/narrow-tsv.ts), any other from its forms (emit/tsv-batch.ts).
          let w: Promise<void> | undefined;
          if (stdout !== undefined && putNarrowTsv(stdout.bytes, loaded.engine, item, n)) w = stdout.settle();
          else {
            const t = narrowForms(loaded.engine, item);
            if ("kind" in t) {
              reject(rejectDiagnostic(t));
              continue;
            }
            if (stdout !== undefined) {
              putTsvEntry(stdout.bytes, item.id, n, item.word, t.narrow, t.broad);
              w = stdout.settle();
            } else w = write(formatTsvEntry({ key: keyOf(item.word, item.id, n), word: item.word, narrow: t.narrow, broad: t.broad }));
          }
          if (w !== undefined) await w;
          hygiene.observe(item, () => keyOf(item.word, item.id, n));
          entries++;
          continue;
        }
        const t = transcription(loaded.engine, item, needs);
        if (isRejected(t)) {
          reject(rejectDiagnostic(t));
          continue;
        }
        const r = entryOf(item, keyOf(item.word, item.id, n), t);
        if (format === "jsonl") {
          const w = write(entryJsonLine(r));
          if (w !== undefined) await w;
        } else {
          const mine = plsPhonemes(r, o.plsPhonemes);
          try {
            checkEntry({ word: r.word, phonemes: mine, preferred: 0, source: { file: r.file, line: r.line, column: 1 } }, 0, r.file);
          } catch (err) {
            if (!(err instanceof PlsError)) throw err;
            reject(err.diagnostic);
            continue;
          }
          if (pending !== undefined && pending.word === r.word) {
            for (const p of mine) if (!pending.phonemes.includes(p)) pending.phonemes.push(p);
          } else {
            flush();
            pending = { word: r.word, phonemes: mine, line: r.line, file: r.file };
          }
        }
        hygiene.observe(item, r.key);
        entries++;
      }
      // A batch is what the input had ready: write its lines now, so a pipeline sees them as rows arrive.
      const w = stdout?.flush();
      if (w !== undefined) await w;
    }
    flush();
    pls?.close();
    await plsWriter;
    await stdout?.flush();
  } catch (err) {
    pls?.fail(err);
    await plsWriter?.catch(() => undefined);
    throw err;
  }
  return transcribeEnd(o, { diagnostics: reader.diagnostics, dataLines: reader.stats.dataLines, entries, rejects, stress: hygiene, out: chunks });
}

export function registerTranscribe(program: Command): void {
  const cmd = program
    .command("transcribe")
    .description("stream a lexicon CSV through a grammar; narrow transcriptions on stdout as rows arrive")
    .argument("[file]", "lexicon CSV (word,pron,...); '-' or nothing for standard input");
  grammarOptions(cmd);
  cmd
    .addOption(new Option("--format <format>", "what to write").choices(TRANSCRIBE_FORMATS).default("tsv"))
    .option("--lang <tag>", "BCP 47 tag for PLS xml:lang (default: the variety's lang in varieties.json, else the grammar's language statement, else und)", languageTag)
    .addOption(new Option("--pls-phonemes <form>", "what PLS phonemes hold: every narrow variant, or the broad form alone (for engines with limited IPA)").choices(PLS_PHONEMES).default("narrow"))
    .option("--tie-bars", "write tie bars on affricates and diphthongs (t͡ʃ, d͡ʒ, a͡ɪ) for consumers that parse IPA")
    .option("--allow-rejects", "exit 0 even when some rows were rejected")
    .option("--strict", "exit 4 when an entry has a stress problem (the checks of strata lint); the output is still written")
    .option("--stress-report <file>", "write the stress problems as CSV, one line each (file, line, column, key, word, severity, code, message)")
    .addOption(new Option("--engine <kind>", "compiled machines, or the slow reference interpreter").choices(ENGINE_KINDS).default("machine"))
    .option("--no-syllable-breaks", "write no '.' between syllables (stress marks stay)")
    .option("--workers <n>", WORKERS_HELP + "; TSV and JSON Lines from a file only", workersArg, "auto");
  outOption(cmd, "file");
  cacheOptions(cmd);
  commonOptions(cmd);
  examples(cmd, [
    ["strata transcribe -g lexicons/en-us lexicons/demo/lexicon.csv", "TSV on standard output"],
    ["strata transcribe -g lexicons/demo -d careful --format pls -o careful.pls words.csv", "a variety's PLS, written whole"],
    ["printf 'word,pron\\nkettle,ˈkɛtəl\\n' | strata transcribe -g lexicons/en-us --format jsonl", "from standard input"],
    ["strata transcribe -g lexicons/en-us --strict --stress-report stress.csv words.csv", "exit 4 on stress problems, listed in stress.csv"],
    ["strata transcribe -g lexicons/en-us --format pls --pls-phonemes broad --tie-bars words.csv", "PLS with broad forms and tie bars"],
  ]);
  cmd.action(async (file: string | undefined, o: TranscribeOptions) => {
    process.exitCode = await runTranscribe(file, o);
  });
}
