// IPA writing options (issue 10, section 5): tie bars on affricates and diphthongs, PLS with the
// broad form, and PLS xml:lang from varieties.json or the grammar's `language` statement. PLS
// stays valid against the PLS 1.0 schema (W3C Recommendation 2008-10-14; tests/fixtures/pls/pls.xsd).

import { mkdtempSync, readFileSync, writeFileSync, copyFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { parseGrammarText } from "../../src/grammar/index.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { tokenise } from "../../src/inventory/index.js";
import { csvRecords } from "../../src/lexicon/reconcile.js";
import { plsSchemaErrors } from "./pls-schema.js";
import { cli } from "../cli/helpers.js";

const ROOT = resolve(__dirname, "../..");
const EN_US = join(ROOT, "lexicons", "en-us");
const GRAMMAR = join(EN_US, "grammar.strata");
const CACHE = join(tmpdir(), "strata-test-cache");
const inv = loadGrammar(GRAMMAR).inventory!;

// CMU Pronouncing Dictionary (npm cmu-pronouncing-dictionary 3.0.0), turned to IPA with lexicons/en-us/arpabet.csv:
// change CH EY1 N JH, judge JH AH1 JH, time T AY1 M, boy B OY1, town T AW1 N, mountain M AW1 N T AH0 N
const WORDS = "word,pron\nchange,tʃ ˈeɪ n dʒ\njudge,dʒ ˈʌ dʒ\ntime,t ˈaɪ m\nboy,b ˈɔɪ\ntown,t ˈaʊ n\nmountain,m ˈaʊ n t ə n\n";

function file(text: string): string {
  const dir = mkdtempSync(join(tmpdir(), "strata-ipaopt-"));
  const p = join(dir, "words.csv");
  writeFileSync(p, text);
  return p;
}

const tsvColumn = (tsv: string, name: string): string[] => {
  const [head, ...rows] = tsv.trimEnd().split("\n");
  const at = head!.split("\t").indexOf(name);
  return rows.map((r) => r.split("\t")[at]!);
};

/** The segments of a form as bundles (stress marks and breaks left out), for comparing tied and untied text. */
const segments = (ipa: string): string[] => {
  const t = tokenise(inv, ipa);
  if (!t.ok) throw new Error(`${ipa}: ${t.error.message}`);
  return t.tokens.flatMap((x) => (x.kind === "segment" ? [x.bundle.join("")] : []));
};

describe("tie bars", () => {
  it("transcribe --tie-bars ties affricates and diphthongs, in narrow and broad, and reads back as the same segments", async () => {
    const words = file(WORDS);
    const plain = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", words]);
    const tied = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", "--tie-bars", words]);
    expect(tied.exitCode).toBe(0);
    expect(tsvColumn(tied.stdout, "narrow")).toEqual(["ˈt͡ʃẽː͡ɪnd͡ʒ", "ˈd͡ʒʌːd͡ʒ", "ˈtʰã͡ɪm", "ˈbɔ͡ɪ", "ˈtʰã͡ʊn", "ˈmã͡ʊn.ʔn̩"]);
    expect(tsvColumn(tied.stdout, "broad")).toEqual(["ˈt͡ʃe͡ɪndʒ".replace("dʒ", "d͡ʒ"), "ˈd͡ʒʌd͡ʒ", "ˈta͡ɪm", "ˈbɔ͡ɪ", "ˈta͡ʊn", "ˈma͡ʊn.tən"]);
    // Without the option nothing changes; with it, the same segments.
    expect(tsvColumn(plain.stdout, "narrow")).toEqual(tsvColumn(tied.stdout, "narrow").map((s) => s.replace(/\u0361/g, "")));
    for (const col of ["narrow", "broad"]) {
      const a = tsvColumn(plain.stdout, col);
      tsvColumn(tied.stdout, col).forEach((t, i) => expect(segments(t)).toEqual(segments(a[i]!)));
    }
    const interp = await cli(["transcribe", "-g", GRAMMAR, "--engine", "interpreter", "-q", "--tie-bars", "--format", "jsonl", words]);
    const machine = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", "--tie-bars", "--format", "jsonl", words]);
    expect(interp.stdout.split("\n").map((l) => (l === "" ? l : JSON.parse(l).derivation))).toEqual(machine.stdout.split("\n").map((l) => (l === "" ? l : JSON.parse(l).derivation)));
  }, 120_000);

  it("build --tie-bars writes them in every output, PLS valid against the schema", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-ipaopt-lex-"));
    writeFileSync(join(dir, "lexicon.csv"), WORDS);
    writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
    const out = mkdtempSync(join(tmpdir(), "strata-ipaopt-out-"));
    const r = await cli(["build", dir, "-o", out, "--cache-dir", CACHE, "-q", "--tie-bars", "--workers", "0"]);
    expect(r.exitCode).toBe(0);
    const base = join(out, dir.split(/[\\/]/).pop()!, "general");
    expect(tsvColumn(readFileSync(join(base, "lexicon.tsv"), "utf8"), "narrow")[0]).toBe("ˈt͡ʃẽː͡ɪnd͡ʒ");
    const pls = readFileSync(join(base, "lexicon.pls"), "utf8");
    expect(pls).toContain("<phoneme>ˈd͡ʒʌːd͡ʒ</phoneme>");
    expect(plsSchemaErrors(pls)).toEqual([]);
  }, 120_000);
});

describe("PLS with the broad form", () => {
  it("build --pls-phonemes broad writes one phoneme per pronunciation, the TSV's broad column; reconciled and schema-valid", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-ipaopt-lex-"));
    // two pronunciations of one word: two phonemes in one lexeme
    writeFileSync(join(dir, "lexicon.csv"), WORDS + "time,t ˈaɪ m z\n");
    writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
    const out = mkdtempSync(join(tmpdir(), "strata-ipaopt-out-"));
    const r = await cli(["build", dir, "-o", out, "--cache-dir", CACHE, "-q", "--pls-phonemes", "broad", "--workers", "0"]);
    expect(r.exitCode).toBe(0);
    const base = join(out, dir.split(/[\\/]/).pop()!, "general");
    const pls = readFileSync(join(base, "lexicon.pls"), "utf8");
    expect(plsSchemaErrors(pls)).toEqual([]);
    const phonemes = [...pls.matchAll(/<phoneme[^>]*>([^<]*)<\/phoneme>/g)].map((m) => m[1]);
    const broad = tsvColumn(readFileSync(join(base, "lexicon.tsv"), "utf8"), "broad");
    expect(phonemes.sort()).toEqual([...broad].sort());
    expect(pls).not.toContain("ʰ");
    expect(JSON.parse(readFileSync(join(base, "summary.json"), "utf8")).reconciled).toBe(true);
  }, 120_000);

  it("transcribe --format pls --pls-phonemes broad, and a value not offered is a command-line error", async () => {
    const words = file(WORDS);
    const r = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", "--format", "pls", "--pls-phonemes", "broad", words]);
    expect(r.exitCode).toBe(0);
    expect(plsSchemaErrors(r.stdout)).toEqual([]);
    expect(r.stdout).toContain("<phoneme>ˈma͡ʊn.tən</phoneme>".replace("\u0361", ""));
    const bad = await cli(["transcribe", "-g", GRAMMAR, "--pls-phonemes", "wide", words]);
    expect(bad.exitCode).toBe(1);
    expect(bad.stderr).toMatch(/^command line:1:\d+: error: .*\[cli\//);
  }, 120_000);
});

describe("the PLS language tag", () => {
  it("transcribe takes it from the grammar's language statement (en-us declares en-US), --lang and varieties.json first", async () => {
    const words = file(WORDS);
    const fromGrammar = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", "--format", "pls", words]);
    expect(fromGrammar.stdout).toContain('xml:lang="en-US"');
    expect(plsSchemaErrors(fromGrammar.stdout)).toEqual([]);
    const given = await cli(["transcribe", "-g", GRAMMAR, "--cache-dir", CACHE, "-q", "--format", "pls", "--lang", "en-GB", words]);
    expect(given.stdout).toContain('xml:lang="en-GB"');
  }, 120_000);

  it("a grammar without one writes und; one that is not BCP 47 is an error at the statement when PLS is written", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-ipaopt-g-"));
    for (const f of ["segments.csv", "diacritics.csv"]) copyFileSync(join(EN_US, f), join(dir, f));
    const grammar = (extra: string): string => {
      const p = join(dir, `g${Math.random().toString(36).slice(2)}.strata`);
      writeFileSync(p, `inventory "segments.csv"\n${extra}syllabify\nstress from right 2\n`);
      return p;
    };
    const words = file("word,pron\nfish,ˈfɪʃ\n");
    const none = await cli(["transcribe", "-g", grammar(""), "--no-cache", "-q", "--format", "pls", words]);
    expect(none.stdout).toContain('xml:lang="und"');
    const badPath = grammar('language "en US"\n');
    const bad = await cli(["transcribe", "-g", badPath, "--no-cache", "-q", "--format", "pls", words]);
    expect(bad.exitCode).toBe(1);
    expect(bad.stderr).toContain(`${badPath}:2:10: error: The language tag 'en US' is not a well-formed BCP 47 tag (such as en-US). [grammar/bad-language]`);
    expect((await cli(["transcribe", "-g", badPath, "--no-cache", "-q", words])).exitCode).toBe(0);
  }, 120_000);

  it("the statement is declared once, with a quoted tag", () => {
    const p = (text: string) => parseGrammarText(text, "g.strata");
    expect(p('language "fr-CA"\n').grammar.language?.tag).toBe("fr-CA");
    expect(p('language "fr"\nlanguage "de"\n').diagnostics.map((d) => `${d.line}:${d.column} ${d.code}`)).toEqual(["2:10 grammar/duplicate-declaration"]);
    expect(p('language ""\n').diagnostics.map((d) => d.code)).toEqual(["grammar/empty-language"]);
    expect(p("language fr\n").diagnostics.map((d) => d.code)).toEqual(["grammar/syntax"]);
  });
});

describe("the stress report and the options agree", () => {
  it("stress.csv is the same with and without tie bars (it reports the entries as written)", async () => {
    const dir = mkdtempSync(join(tmpdir(), "strata-ipaopt-lex-"));
    writeFileSync(join(dir, "lexicon.csv"), "word,pron\nbaseball,bˈeɪsbˈɔl\n");
    writeFileSync(join(dir, "varieties.json"), JSON.stringify({ lexicon: "lexicon.csv", varieties: [{ name: "general", lang: "en-US", grammar: GRAMMAR }] }));
    const a = mkdtempSync(join(tmpdir(), "strata-ipaopt-out-"));
    const b = mkdtempSync(join(tmpdir(), "strata-ipaopt-out-"));
    await cli(["build", dir, "-o", a, "--cache-dir", CACHE, "-q", "--workers", "0"]);
    await cli(["build", dir, "-o", b, "--cache-dir", CACHE, "-q", "--workers", "0", "--tie-bars"]);
    const name = dir.split(/[\\/]/).pop()!;
    const ra = readFileSync(join(a, name, "general", "stress.csv"), "utf8");
    expect(csvRecords(ra)).toHaveLength(2);
    expect(readFileSync(join(b, name, "general", "stress.csv"), "utf8")).toBe(ra);
  }, 120_000);
});

describe("the language of a variety file", () => {
  it("is the base grammar's, unless the variety declares its own", async () => {
    const { tempTree, TOY_SEGMENTS, TOY_DIACRITICS } = await import("../grammar/helpers.js");
    const root = tempTree({
      ".strata-root": "",
      "g/segments.csv": TOY_SEGMENTS,
      "g/diacritics.csv": TOY_DIACRITICS,
      "g/grammar.strata": 'inventory "segments.csv"\nlanguage "en-US"\nsyllabify\n',
      "g/same.strata": 'base "grammar.strata"\n',
      "g/own.strata": 'base "grammar.strata"\nlanguage "en-CA"\n',
    });
    expect(loadGrammar(join(root, "g", "same.strata")).grammar?.language?.tag).toBe("en-US");
    expect(loadGrammar(join(root, "g", "own.strata")).grammar?.language?.tag).toBe("en-CA");
  });
});
