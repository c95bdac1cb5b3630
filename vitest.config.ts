import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const alias = {
  "@shared": fileURLToPath(new URL("./shared", import.meta.url)),
  "@db": fileURLToPath(new URL("./db", import.meta.url)),
};

// Three projects: pure unit tests, API tests against a real PostgreSQL (DATABASE_URL set by
// scripts/test.ts), and browser journeys driving Debian's chromium.
export default defineConfig({
  resolve: { alias },
  test: {
    reporters: ["default", "./tests/support/summary-reporter.ts"],
    projects: [
      { resolve: { alias }, test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" } },
      {
        resolve: { alias },
        test: {
          name: "api",
          include: ["tests/api/**/*.test.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 30000,
          hookTimeout: 60000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 90000,
          hookTimeout: 120000,
        },
      },
    ],
  },
});
