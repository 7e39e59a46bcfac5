import { defineConfig } from "vitest/config";

// Three layers: pure units, integration against a real PostgreSQL, and browser journeys.
// vite.config.ts is not used here: the React Router plugin only belongs in app builds.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    teardownTimeout: 30_000,
    projects: [
      {
        extends: true,
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          setupFiles: ["tests/integration/setup.ts"],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          globalSetup: ["tests/e2e/global-setup.ts"],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
