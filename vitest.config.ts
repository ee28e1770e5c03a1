import { defineConfig } from "vitest/config";
import path from "node:path";

const alias = { "@": path.resolve(import.meta.dirname) };

// Pure tests run in parallel; tests that touch the shared test database or the browser run
// one file at a time so that timing-sensitive checks do not compete for the two cores.
export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: "unit",
          include: ["tests/**/*.test.ts"],
          exclude: ["tests/**/*.db.test.ts", "tests/**/*.browser.test.ts"],
          testTimeout: 30_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/**/*.db.test.ts", "tests/**/*.browser.test.ts"],
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 180_000,
          globalSetup: ["tests/helpers/global-setup.ts"],
        },
      },
    ],
  },
});
