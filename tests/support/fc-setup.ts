// vitest setup file (runs before each test file): the run's seed becomes fast-check's global seed,
// so every fc.assert / fc.check uses it unless a test passes its own.

import { inject } from "vitest";
import fc from "fast-check";
import { adoptSeed } from "./fc-seed.js";

const seed = inject("fcSeed");
adoptSeed(seed);
fc.configureGlobal({ ...fc.readConfigureGlobal(), seed });
