// The command-line conventions (DEVELOPERS.md "Command-line conventions") held by every command:
// option errors in the one message style at the argument's column with exit 1, shared option names,
// examples in every --help, one way to name a variety, the exit-code table, no stack traces.

import { existsSync, mkdtempSync, readdirSync, readFileSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { cli, program } from "./helpers.js";
import { describeFailure, packageVersion } from "../../src/cli/program.js";
import { argPosition, setCommandLine } from "../../src/cli/cmdline.js";
import { resolveGrammar } from "../../src/cli/variety.js";
import { plural } from "../../src/cli/exit.js";
import { useColour } from "../../src/cli/output.js";

const ROOT = resolve(__dirname, "../..");
const EN_US = join(ROOT, "lexicons", "en-us");
const DEMO = join(ROOT, "lexicons", "demo");
const WORK = mkdtempSync(join(tmpdir(), "strata-conv-"));
const SHARED_CACHE = join(tmpdir(), "strata-test-cache");
let savedCache: string | undefined;
beforeAll(() => {
  savedCache = process.env["STRATA_CACHE_DIR"];
  process.env["STRATA_CACHE_DIR"] = SHARED_CACHE;
});
afterAll(() => {
  if (savedCache === undefined) delete process.env["STRATA_CACHE_DIR"];
  else process.env["STRATA_CACHE_DIR"] = savedCache;
});

function lexicon(text: string, name = "words.csv"): string {
  const p = join(WORK, `${Math.random().toString(36).slice(2)}-${name}`);
  writeFileSync(p, text);
  return p;
}

/** One diagnostic in the one style, about the command line, at `column`. */
function expectCommandLineError(stderr: string, column: number, code: string): void {
  const first = stderr.split("\n")[0]!;
  expect(first).toMatch(new RegExp(`^command line:1:${column}: error: [A-Z].*\\. \\[${code.replace("/", "\\/")}\\]$`, "u"));
  expect(stderr).not.toMatch(/^error: /m); // commander's own style
  expect(stderr).not.toMatch(/\n\s+at /); // no stack trace
  expect(stderr).toMatch(/\n\s+1 \| .*\n\s+\| *\^+/); // the command line and a caret
}

describe("option values are checked by the argument parser, reported at their column, exit 1", () => {
  it.each([
    [["build", "--samples", "abc"], 17, "cli/bad-option-value"],
    [["build", "--samples=-2"], 17, "cli/bad-option-value"],
    [["build", "--workers", "lots"], 17, "cli/bad-option-value"],
    [["build", "--format", "tsv,xml"], 16, "cli/bad-option-value"],
    [["build", "--engine", "fast"], 16, "cli/bad-option-value"],
    [["compile", "-g", "lexicons/en-us", "--max-states", "0"], 40, "cli/bad-option-value"],
    [["compile", "-g", "lexicons/en-us", "--max-states", "1.5"], 40, "cli/bad-option-value"],
    [["transcribe", "-g", "lexicons/en-us", "--max-states", "lots"], 43, "cli/bad-option-value"],
    [["transcribe", "--format", "xml"], 21, "cli/bad-option-value"],
    [["transcribe", "--format", "pls", "--lang", "en_US"], 32, "cli/bad-option-value"],
    [["graph", "--limit", "-3"], 15, "cli/bad-option-value"],
    [["init", "x", "--lang", "english language"], 15, "cli/bad-option-value"],
    [["transcribe", "--formt", "tsv"], 12, "cli/unknown-option"],
    [["transcirbe"], 1, "cli/unknown-command"],
    [["classes", "-g", "lexicons/en-us"], 27, "cli/missing-argument"],
    [["import"], 8, "cli/missing-mandatory-option-value"],
  ])("%j", async (args, column, code) => {
    const r = await cli(args);
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe("");
    expectCommandLineError(r.stderr, column, code);
  });

  it("an unknown option suggests the near one, as a sentence", async () => {
    const r = await cli(["transcribe", "--formt", "tsv"]);
    expect(r.stderr.split("\n")[0]).toBe("command line:1:12: error: Unknown option '--formt' (did you mean --format?). [cli/unknown-option]");
  });
});

describe("every command", () => {
  const commands = program().commands;
  const grammarCommands = ["transcribe", "compile", "graph", "classes", "lint", "clusters", "explain", "interactions"];

  it.each(commands.map((c) => [c.name(), c] as const))("%s: -q, --color/--no-color, and examples at the end of --help", (_name, c) => {
    const longs = c.options.map((o) => o.long);
    expect(longs).toEqual(expect.arrayContaining(["--quiet", "--color", "--no-color"]));
    expect(c.options.find((o) => o.long === "--quiet")!.short).toBe("-q");
    const help = c.helpInformation() + "";
    let after = "";
    const sink = vi.spyOn(process.stdout, "write").mockImplementation((s: string | Uint8Array) => ((after += String(s)), true));
    try {
      c.outputHelp();
    } finally {
      sink.mockRestore();
    }
    expect(help.length).toBeGreaterThan(0);
    expect(after.trimEnd()).toMatch(/\nExamples:\n(  \$ .*strata .*\n?)+$/);
  });

  it.each(grammarCommands)("%s takes -g/--grammar and -d/--variety, and the cache options when it loads a grammar", (name) => {
    const c = commands.find((x) => x.name() === name)!;
    const byLong = new Map(c.options.map((o) => [o.long, o]));
    expect(byLong.get("--grammar")?.short).toBe("-g");
    expect(byLong.get("--variety")?.short).toBe("-d");
    // (explain and interactions load the grammar themselves, without the cache: not yet wired.)
    if (!["classes", "explain", "interactions"].includes(name)) expect([...byLong.keys()]).toEqual(expect.arrayContaining(["--cache-dir", "--no-cache"]));
  });

  it("-o/--out means one thing: a file for one-file outputs, a folder for the commands that write several (build, varieties) and init's argument", () => {
    for (const c of commands) {
      const o = c.options.find((x) => x.long === "--out");
      if (o === undefined) continue;
      expect(o.short).toBe("-o");
      expect(o.flags).toBe(["build", "varieties"].includes(c.name()) ? "-o, --out <dir>" : "-o, --out <file>");
    }
    expect(commands.find((c) => c.name() === "import")!.options.some((o) => o.long === "--output")).toBe(false);
  });

  it("-v prints the version from package.json", async () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, "package.json"), "utf8")) as { version: string };
    expect(packageVersion()).toBe(pkg.version);
    const r = await cli(["-v"]);
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toBe(`${pkg.version}\n`);
  });
});

describe("-g PATH -d NAME: one way to name a variety", () => {
  it("a lexicon folder: the variety by its varieties.json name (default: the first), with its lang", () => {
    expect(resolveGrammar(DEMO, undefined)).toEqual({ path: join(EN_US, "grammar.strata"), variety: "general", lang: "en-US" });
    expect(resolveGrammar(DEMO, "careful")).toEqual({ path: join(EN_US, "careful.strata"), variety: "careful", lang: "en-US" });
  });

  it("a grammar folder: NAME.strata; 'general' and no -d are grammar.strata", () => {
    expect(resolveGrammar(EN_US, undefined)).toMatchObject({ path: join(EN_US, "grammar.strata"), variety: "general" });
    expect(resolveGrammar(EN_US, "general")).toMatchObject({ path: join(EN_US, "grammar.strata"), variety: "general" });
    expect(resolveGrammar(EN_US, "careful")).toMatchObject({ path: join(EN_US, "careful.strata"), variety: "careful" });
  });

  it("no -g: the current folder when it is a lexicon or grammar folder", () => {
    const cwd = vi.spyOn(process, "cwd").mockReturnValue(DEMO);
    try {
      expect(resolveGrammar(undefined, "careful")).toMatchObject({ path: join(EN_US, "careful.strata") });
    } finally {
      cwd.mockRestore();
    }
  });

  it("an unknown variety is an error at the -d argument, listing the known ones", () => {
    setCommandLine(["transcribe", "-g", DEMO, "-d", "casual", "x.csv"]);
    try {
      const r = resolveGrammar(DEMO, "casual");
      expect("diagnostics" in r).toBe(true);
      const d = (r as { diagnostics: { column: number; message: string; code: string }[] }).diagnostics[0]!;
      expect(d.code).toBe("cli/unknown-variety");
      expect(d.column).toBe(`transcribe -g ${DEMO} -d `.length + 1);
      expect(d.message).toContain("general, careful");
    } finally {
      setCommandLine([]);
    }
    expect((resolveGrammar(join(EN_US, "careful.strata"), "general") as { diagnostics: { code: string }[] }).diagnostics[0]!.code).toBe("cli/variety-with-file");
    expect((resolveGrammar(join(WORK, "nowhere"), undefined) as { diagnostics: { code: string }[] }).diagnostics[0]!.code).toBe("cli/no-such-path");
  });

  it("transcribe -d general works on a grammar folder (it failed before), and -d careful on the demo folder", async () => {
    const file = lexicon("word,pron\nwater,ˈwɔtɚ\n");
    const general = await cli(["transcribe", "-g", EN_US, "-d", "general", file]);
    expect(general.exitCode).toBe(0);
    expect(general.stdout.split("\n")[1]).toMatch(/^water#1\twater\tˈwɔ\.ɾɚ\t/u);
    const careful = await cli(["transcribe", "-g", DEMO, "-d", "careful", file]);
    expect(careful.exitCode).toBe(0);
    expect(careful.stdout.split("\n")[1]).toMatch(/^water#1\twater\tˈwɔ\.tɚ\t/u); // no flapping in careful speech
  });

  it("compile and graph take -d too", async () => {
    const c = await cli(["compile", "-g", DEMO, "-d", "careful", "--json", "-q"]);
    expect(c.exitCode).toBe(0);
    expect(JSON.parse(c.stdout).grammar).toBe(join(EN_US, "careful.strata"));
    const g = await cli(["graph", "-g", DEMO, "-d", "careful", "dark-l"]);
    expect(g.exitCode).toBe(0);
    expect(g.stdout).toMatch(/^digraph /);
    const missing = await cli(["graph", "-g", DEMO, "-d", "careful", "flapping"]);
    expect(missing.exitCode).toBe(1); // the careful grammar has no flapping rule
    expect(missing.stderr).toMatch(/^command line:1:\d+: error: There is no step 'flapping'/);
  });
});

describe("the compile cache is used by default", () => {
  it("a cache folder that cannot be used is a warning, and the command runs without a cache", async () => {
    const file = lexicon("word,pron\nkettle,ˈkɛtəl\n");
    const r = await cli(["transcribe", "-g", EN_US, "--cache-dir", join(file, "cache"), file]);
    expect(r.exitCode).toBe(0);
    expect(r.stderr).toMatch(/warning: The cache folder .* cannot be used .*continuing without a cache/);
    expect(r.stdout.split("\n")[1]).toMatch(/^kettle#1\tkettle\t/);
    const c = await cli(["compile", "-g", EN_US, "--cache-dir", join(file, "cache"), "--json"]);
    expect(c.exitCode).toBe(0);
    expect(JSON.parse(c.stdout).cache).toBe("off");
  });

  it("transcribe fills $STRATA_CACHE_DIR (or --cache-dir), and --no-cache writes nothing", async () => {
    const file = lexicon("word,pron\nkettle,ˈkɛtəl\n");
    const dir = join(WORK, "cache-env");
    process.env["STRATA_CACHE_DIR"] = dir;
    try {
      expect((await cli(["transcribe", "-g", EN_US, "-d", "careful", file])).exitCode).toBe(0);
      expect(readdirSync(dir).length).toBeGreaterThan(0);
      const none = join(WORK, "cache-none");
      expect((await cli(["transcribe", "-g", EN_US, "-d", "careful", "--no-cache", "--cache-dir", none, file])).exitCode).toBe(0);
      expect(existsSync(none)).toBe(false);
      const opt = join(WORK, "cache-opt");
      expect((await cli(["transcribe", "-g", EN_US, "-d", "careful", "--cache-dir", opt, file])).exitCode).toBe(0);
      expect(readdirSync(opt).length).toBeGreaterThan(0);
    } finally {
      process.env["STRATA_CACHE_DIR"] = SHARED_CACHE;
    }
  });
});

describe("paths on the command line", () => {
  it("a folder where a file is expected, or an output under a file: one positioned line, exit 1", async () => {
    const file = lexicon("word,pron\nkettle,ˈkɛtəl\n");
    const isDir = await cli(["transcribe", "-g", EN_US, WORK]);
    expect(isDir.exitCode).toBe(1);
    expectCommandLineError(isDir.stderr, `transcribe -g ${EN_US} `.length + 1, "cli/is-a-folder");
    const underFile = await cli(["transcribe", "-g", EN_US, file, "-o", join(file, "out.tsv")]);
    expect(underFile.exitCode).toBe(1);
    expect(underFile.stderr).toContain("[cli/output-under-file]");
    const outIsDir = await cli(["graph", "-g", EN_US, "dark-l", "-o", WORK]);
    expect(outIsDir.exitCode).toBe(1);
    expect(outIsDir.stderr).toContain("[cli/output-is-folder]");
    const buildOut = await cli(["build", DEMO, "-o", file, "-q"]);
    expect(buildOut.exitCode).toBe(1);
    expect(buildOut.stderr).toContain("[cli/output-is-file]");
    const lintDir = await cli(["lint", "-g", EN_US, WORK]);
    expect(lintDir.exitCode).toBe(1);
    expect(lintDir.stderr).toContain("[cli/is-a-folder]");
  });

  it("an output that is an input (also through a symbolic link) is refused and the input kept", async () => {
    const dict = lexicon("KEST  K EH1 S T\n", "d.dict");
    const before = readFileSync(dict, "utf8");
    const sameRejects = await cli(["import", "--arpabet", dict, "--rejects", dict, "-o", join(WORK, "o.csv")]);
    expect(sameRejects.exitCode).toBe(1);
    expectCommandLineError(sameRejects.stderr, `import --arpabet ${dict} --rejects `.length + 1, "cli/output-is-input");
    const link = join(WORK, "link.dict");
    symlinkSync(dict, link);
    const viaLink = await cli(["import", "--arpabet", dict, "-o", link]);
    expect(viaLink.exitCode).toBe(1);
    expect(viaLink.stderr).toContain("[cli/output-is-input]");
    expect(readFileSync(dict, "utf8")).toBe(before);
    const csv = lexicon("word,pron\nkettle,ˈkɛtəl\n");
    const t = await cli(["transcribe", "-g", EN_US, csv, "-o", csv]);
    expect(t.exitCode).toBe(1);
    expect(readFileSync(csv, "utf8")).toBe("word,pron\nkettle,ˈkɛtəl\n");
  });

  it("-o FILE: the same bytes as standard output, written whole; nothing on standard output", async () => {
    const csv = lexicon("word,pron\nkettle,ˈkɛtəl\npin,ˈpɪn\n");
    const toStdout = await cli(["transcribe", "-g", EN_US, csv, "--format", "pls", "--lang", "en-US"]);
    const out = join(WORK, "t.pls");
    const toFile = await cli(["transcribe", "-g", EN_US, csv, "--format", "pls", "--lang", "en-US", "-o", out]);
    expect(toFile.exitCode).toBe(0);
    expect(toFile.stdout).toBe("");
    expect(readFileSync(out, "utf8")).toBe(toStdout.stdout);
    const dot = join(WORK, "g.dot");
    expect((await cli(["graph", "-g", EN_US, "dark-l", "--out", dot])).exitCode).toBe(0);
    expect(readFileSync(dot, "utf8")).toMatch(/^digraph /);
  });

  it("import reads standard input for --arpabet -", async () => {
    const { Readable } = await import("node:stream");
    const { runImport } = await import("../../src/cli/import.js");
    const o = await runImport({ arpabet: "-", input: Readable.from(["KEST  K EH1 S T\n"]) });
    expect(o.exitCode).toBe(0);
    expect(o.stdout).toBe("word,pron,note\nKEST,k ˈɛ s t,\n");
  });
});

describe("messages", () => {
  it("colour: --color and --no-color, else a terminal without NO_COLOR", async () => {
    const ESC = "\u001b[";
    expect((await cli(["transcribe", "--format", "xml", "--color"])).stderr).toContain(ESC);
    expect((await cli(["transcribe", "--format", "xml", "--color", "--no-color"])).stderr).not.toContain(ESC);
    const saved = process.env["NO_COLOR"];
    try {
      process.env["NO_COLOR"] = "1";
      expect(useColour({ isTTY: true })).toBe(false);
      delete process.env["NO_COLOR"];
      expect(useColour({ isTTY: true })).toBe(true);
      expect(useColour({ isTTY: false })).toBe(false);
    } finally {
      if (saved === undefined) delete process.env["NO_COLOR"];
      else process.env["NO_COLOR"] = saved;
    }
  });

  it("counts agree in number", () => {
    expect(plural(1, "row")).toBe("1 row");
    expect(plural(2, "row")).toBe("2 rows");
    expect(plural(0, "error")).toBe("0 errors");
    expect(plural(1, "entry", "entries")).toBe("1 entry");
    expect(plural(12_345, "entry", "entries")).toBe("12,345 entries");
  });

  it("an internal error is one line asking for a report, exit 70; the stack only with STRATA_DEBUG=1", () => {
    const boom = new TypeError("cannot read properties of undefined");
    const saved = process.env["STRATA_DEBUG"];
    delete process.env["STRATA_DEBUG"];
    try {
      const f = describeFailure(boom);
      expect(f.exitCode).toBe(70);
      expect(f.text.trimEnd().split("\n")).toHaveLength(1);
      expect(f.text).toMatch(/^strata: internal error: cannot read properties of undefined \(this is a bug in Strata; please report it/);
      process.env["STRATA_DEBUG"] = "1";
      expect(describeFailure(boom).text).toContain("at ");
    } finally {
      if (saved === undefined) delete process.env["STRATA_DEBUG"];
      else process.env["STRATA_DEBUG"] = saved;
    }
  });

  it("a file-system error escaping a command is one positioned line, exit 1", () => {
    const e = Object.assign(new Error("ENOTDIR: not a directory, open '/x/y'"), { code: "ENOTDIR", path: "/x/y", syscall: "open" });
    const f = describeFailure(e);
    expect(f.exitCode).toBe(1);
    expect(f.text).toBe("/x/y:1:1: error: Cannot use '/x/y': part of the path is a file, not a folder. [cli/enotdir]\n");
  });

  it("the argument's column counts code points on the joined command line", () => {
    setCommandLine(["classes", "-g", "dír", "ŋ", "--out=x"]);
    try {
      expect(argPosition("dír", ["-g"])).toEqual({ column: 12, length: 3 });
      expect(argPosition("ŋ")).toEqual({ column: 16, length: 1 });
      expect(argPosition("x", ["-o", "--out"])).toEqual({ column: 24, length: 1 });
      expect(argPosition(undefined, ["--missing"])).toEqual({ column: 26, length: 1 }); // after the last argument
    } finally {
      setCommandLine([]);
    }
  });
});

