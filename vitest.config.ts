import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Unit tests (pure code, no services) and integration tests (real MariaDB, SMTP sink, Redis REST
// stand-in, started by scripts/test.ts) share one config; the browser tests live in tests/browser and
// run against `next start`.
export default defineConfig({
  resolve: {
    alias: {
      "@": fileURLToPath(new URL("./", import.meta.url)),
      "server-only": fileURLToPath(new URL("./tests/support/server-only-stub.ts", import.meta.url)),
    },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    // The compute worker thread is a bundle of lib/ (built once per run, about a quarter of a second).
    globalSetup: ["tests/support/compute-worker.setup.ts"],
    testTimeout: 30_000,
    hookTimeout: 120_000,
    pool: "forks",
    fileParallelism: true,
    maxWorkers: 2,
  },
});
