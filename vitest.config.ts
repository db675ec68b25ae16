import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    // Clears test-artifacts/skipped.txt before the run and prints one line per skipped group after it.
    globalSetup: ["tests/support/global-setup.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    // Two cores on the reference machine: more workers only slow each other down.
    maxWorkers: 2,
    benchmark: { include: ["bench/**/*.bench.ts"] },
  },
});
