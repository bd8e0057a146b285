// V8 settings the command line makes before its command runs (main.ts imports this module first).
//
// Allocation-site pretenuring off. V8 watches the objects made at each allocation site (an object or
// array literal in a function); when nearly all of a site's objects survive two collections of the
// young generation in a row, it decides the site makes long-lived objects and allocates every later
// one of them straight in the old generation, and it never takes that back. Strata's runs make
// objects that die with their row (entries, symbols, lines), and start-up (reading the machine caches:
// external memory) brings young-generation collections close together while a batch of rows is alive:
// sites judged long-lived there filled the old generation with dead rows for the rest of the run.
// Measured on a four-variety build of the CMU dictionary (2 cores): from the bundle, 11.0–11.7 s and
// 640–660 MB peak in 3 of 3 runs, with 40 sites judged long-lived (--trace-pretenuring); with this
// setting 7.5–7.7 s and 410–455 MB, and none (tsc's modules: 7.6–7.8 s, 434–449 MB). A one-variety
// build and a cold compile ran the same with and without it (farm-bench, 5 pairs; 3 runs each).
// Being a process-wide V8 flag, it holds for the worker threads too.

import { setFlagsFromString } from "node:v8";

setFlagsFromString("--no-allocation-site-pretenuring");
