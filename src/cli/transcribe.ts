// `strata transcribe -g DIR [-d VARIETY] [--format tsv|jsonl|pls] [FILE|-]`: a lexicon CSV in,
// narrow transcriptions out on stdout as rows arrive (for pipelines); rejects reported on stderr.

import type { Command } from "commander";
import { formatDiagnostic } from "../diagnostics.js";
import { plsChunks, type PlsEntry } from "../emit/pls.js";
import { formatTsvEntry, tsvHeader } from "../emit/tsv.js";
import { readLexicon, rejectDiagnostic } from "../lexicon/read.js";
import { entryJsonLine, entryPhonemes, transcribeRow } from "../lexicon/runner.js";
import { grammarPath, loadEngine, positiveInt, printDiagnostics, type EngineKind } from "./common.js";
import { Channel } from "../lexicon/channel.js";
import { BufferedWriter } from "../emit/buffered.js";
import { ALL_NEEDS, NARROW_ONLY, type Needs } from "../lexicon/engine.js";

interface TranscribeOptions {
  grammar: string;
  dialect?: string;
  format: string;
  lang: string;
  allowRejects: boolean;
  engine: EngineKind;
  cacheDir?: string;
  maxStates?: number;
  syllableBreaks: boolean;
}

/** Stdout in large chunks (back-pressure respected); flushed before the command returns. */
const stdout = new BufferedWriter(process.stdout);
const write = (text: string): Promise<void> | undefined => stdout.write(text);

export async function runTranscribe(file: string | undefined, o: TranscribeOptions): Promise<number> {
  if (!["tsv", "jsonl", "pls"].includes(o.format)) {
    process.stderr.write(`strata: --format must be tsv, jsonl or pls, not '${o.format}'\n`);
    return 2;
  }
  const loaded = loadEngine(grammarPath(o.grammar, o.dialect), {
    kind: o.engine,
    ...(o.cacheDir !== undefined ? { cacheDir: o.cacheDir } : {}),
    ...(o.maxStates !== undefined ? { maxStates: o.maxStates } : {}),
    // The per-step machines give JSON Lines its rules and let PLS skip enumerating most variants.
    blame: o.format !== "tsv",
    syllables: o.syllableBreaks,
  });
  printDiagnostics(loaded.diagnostics);
  if (!("engine" in loaded)) return 1;
  const source = file === undefined || file === "-" ? process.stdin : file;
  const reader = readLexicon(source, { inventory: loaded.inventory, file: file === undefined || file === "-" ? "<stdin>" : file });
  let rejects = 0;
  let entries = 0;
  // PLS: one lexeme per word; rows of a word that follow each other are grouped as they stream.
  const pls = o.format === "pls" ? new Channel<PlsEntry>() : undefined;
  const plsWriter = pls !== undefined ? (async () => {
    for await (const chunk of plsChunks(pls, { lang: o.lang, file: "<stdout>" })) await write(chunk);
  })() : undefined;
  let pending: { word: string; phonemes: string[]; line: number; file: string } | undefined;
  const flush = (): void => {
    if (pending !== undefined && pls !== undefined) pls.push({ word: pending.word, phonemes: pending.phonemes, preferred: 0, source: { file: pending.file, line: pending.line, column: 1 } });
    pending = undefined;
  };
  // Only what the format prints: TSV neither variants nor blame, PLS the variants, JSON Lines both.
  const needs: Needs = o.format === "tsv" ? NARROW_ONLY : o.format === "pls" ? { variants: true, rules: false } : ALL_NEEDS;
  if (o.format === "tsv") await write(tsvHeader());
  try {
    for await (const batch of reader.batches()) {
      for (const item of batch) {
        const r = item.kind === "row" ? transcribeRow(loaded.engine, item, needs) : item;
        if (r.kind === "reject") {
          rejects++;
          process.stderr.write(formatDiagnostic(rejectDiagnostic(r)) + "\n");
          continue;
        }
        entries++;
        if (o.format === "tsv" || o.format === "jsonl") {
          const w = write(o.format === "tsv" ? formatTsvEntry({ word: r.word, narrow: r.narrow, broad: r.broad }) : entryJsonLine(r));
          if (w !== undefined) await w;
        }
        else {
          const mine = entryPhonemes(r);
          if (pending !== undefined && pending.word === r.word) {
            for (const p of mine) if (!pending.phonemes.includes(p)) pending.phonemes.push(p);
          } else {
            flush();
            pending = { word: r.word, phonemes: mine, line: r.line, file: r.file };
          }
        }
      }
      // A batch is what the input had ready: write its lines now, so a pipeline sees them as rows arrive.
      const w = stdout.flush();
      if (w !== undefined) await w;
    }
    flush();
    pls?.close();
    await plsWriter;
    await stdout.flush();
  } catch (err) {
    pls?.fail(err);
    await plsWriter?.catch(() => undefined);
    throw err;
  }
  printDiagnostics(reader.diagnostics);
  const stats = reader.stats;
  process.stderr.write(`strata: ${stats.dataLines} rows read = ${entries} written + ${rejects} rejected\n`);
  if (reader.diagnostics.some((d) => d.severity === "error")) return 1;
  if (rejects > 0 && !o.allowRejects) return 3;
  return 0;
}

export function registerTranscribe(program: Command): void {
  program
    .command("transcribe")
    .description("stream a lexicon CSV through a grammar; narrow transcriptions on stdout")
    .argument("[file]", "lexicon CSV (word,pron,...); '-' or nothing for standard input")
    .requiredOption("-g, --grammar <dir>", "grammar folder (grammar.strata inside) or a .strata file")
    .option("-d, --dialect <variety>", "use <dir>/<variety>.strata instead of grammar.strata")
    .option("--format <format>", "tsv, jsonl or pls", "tsv")
    .option("--lang <tag>", "BCP 47 tag for PLS xml:lang", "und")
    .option("--allow-rejects", "exit 0 even when some rows were rejected", false)
    .option("--engine <kind>", "machine or interpreter", "machine")
    .option("--no-syllable-breaks", "write no '.' between syllables (stress marks stay)")
    .option("--cache-dir <dir>", "read and write compiled machines here")
    .option("--max-states <n>", "largest composed block before the cascade splits", positiveInt("--max-states"))
    .action(async (file: string | undefined, opts: TranscribeOptions) => {
      process.exitCode = await runTranscribe(file, opts);
    });
}
