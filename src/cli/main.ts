#!/usr/bin/env node
// The `strata` command line: a thin commander layer; each command lives in its own file under cli/,
// the program around them (version, errors, exit codes) in program.ts.

import "./v8-settings.js"; // first: V8 settings before the command runs
import type { Command } from "commander";
import { createProgram, runProgram } from "./program.js";

/**
 * Each command's module, loaded on demand: a run of one command loads only that command's code
 * (loading every command's rooms cost `strata transcribe` about 0.2 s of CPU before its first row).
 * Help, the version and an unknown command load them all, in this order.
 */
const COMMANDS: Readonly<Record<string, () => Promise<(program: Command) => void>>> = {
  init: async () => (await import("./init.js")).registerInit,
  classes: async () => (await import("./classes.js")).registerClasses,
  import: async () => (await import("./import.js")).registerImport,
  build: async () => (await import("./build.js")).registerBuild,
  transcribe: async () => (await import("./transcribe.js")).registerTranscribe,
  compile: async () => (await import("./compile.js")).registerCompile,
  graph: async () => (await import("./graph.js")).registerGraph,
  lint: async () => (await import("./lint.js")).registerLint,
  clusters: async () => (await import("./clusters.js")).registerClusters,
  compare: async () => (await import("./compare.js")).registerCompare,
  accept: async () => (await import("./accept.js")).registerAccept,
  explain: async () => (await import("./explain.js")).registerExplain,
  interactions: async () => (await import("./interactions.js")).registerInteractions,
  varieties: async () => (await import("./varieties.js")).registerVarieties,
};

const program = createProgram();
const named = process.argv[2];
const wanted = named !== undefined && Object.hasOwn(COMMANDS, named) ? [COMMANDS[named]!] : Object.values(COMMANDS);
for (const register of await Promise.all(wanted.map((load) => load()))) register(program);

await runProgram(program, process.argv);
