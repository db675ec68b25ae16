import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    // Two cores on the reference machine: more workers only slow each other down.
    maxWorkers: 2,
    benchmark: { include: ["bench/**/*.bench.ts"] },
  },
});
