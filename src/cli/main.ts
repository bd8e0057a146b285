#!/usr/bin/env node
// The `strata` command line: a thin commander layer; each command lives in its own file under cli/,
// the program around them (version, errors, exit codes) in program.ts.

import { createProgram, runProgram } from "./program.js";
import { registerClasses } from "./classes.js";
import { registerImport } from "./import.js";
import { registerBuild } from "./build.js";
import { registerTranscribe } from "./transcribe.js";
import { registerCompile } from "./compile.js";
import { registerGraph } from "./graph.js";
import { registerLint } from "./lint.js";
import { registerClusters } from "./clusters.js";
import { registerInit } from "./init.js";
import { registerCompare } from "./compare.js";
import { registerAccept } from "./accept.js";
import { registerExplain } from "./explain.js";
import { registerInteractions } from "./interactions.js";
import { registerVarieties } from "./varieties.js";

const program = createProgram();
registerInit(program);
registerClasses(program);
registerImport(program);
registerBuild(program);
registerTranscribe(program);
registerCompile(program);
registerGraph(program);
registerLint(program);
registerClusters(program);
registerCompare(program);
registerAccept(program);
registerExplain(program);
registerInteractions(program);
registerVarieties(program);

await runProgram(program, process.argv);
