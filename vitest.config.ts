import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const alias = { "~": fileURLToPath(new URL("./app", import.meta.url)) };

// Three projects: pure unit tests, integration tests against the real PostgreSQL
// (one database per worker), and browser tests in Debian's Chromium.
export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          globalSetup: ["tests/support/global-setup.ts"],
          setupFiles: ["tests/support/worker-db.ts"],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          globalSetup: ["tests/support/global-setup.ts", "tests/support/e2e-server.ts"],
          testTimeout: 120_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
