// Test runner settings: tests live in tests/ and mirror src/. Every property test runs with one
// fast-check seed per run, printed first (fixed under CI; STRATA_FC_SEED replays one).
import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    globalSetup: ["tests/support/fc-global-setup.ts"],
    setupFiles: ["tests/support/fc-setup.ts"],
  },
});
