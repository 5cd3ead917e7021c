import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Kept apart from vite.config.ts: the React Router plugin builds the app and must not run under Vitest.
const resolve = { alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) } };

export default defineConfig({
  resolve,
  test: {
    // Two cores: more workers only queue on PostgreSQL and Chromium.
    maxWorkers: 2,
    projects: [
      {
        resolve,
        test: {
          name: "unit",
          include: ["app/**/*.test.{ts,tsx}", "emails/**/*.test.{ts,tsx}", "scripts/**/*.test.ts", "seeds/**/*.test.ts"],
          environment: "node",
          // The Monte Carlo checks take a second or two alone and several times that beside the other suites.
          testTimeout: 20_000,
        },
      },
      {
        resolve,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.{ts,tsx}"],
          globalSetup: ["tests/support/global-setup.ts"],
          setupFiles: ["tests/support/integration-setup.ts"],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve,
        test: {
          name: "browser",
          include: ["tests/browser/**/*.test.ts"],
          globalSetup: ["tests/support/global-setup.ts", "tests/support/browser-global-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          // One Chromium at a time: each is heavy on two cores, and the suite shares one app server.
          fileParallelism: false,
        },
      },
      {
        resolve,
        test: {
          // The production build run as a deployment runs it; scripts/test.ts builds it just before.
          name: "production",
          include: ["tests/production/**/*.test.ts"],
          globalSetup: ["tests/support/global-setup.ts"],
          setupFiles: ["tests/support/integration-setup.ts"],
          provide: { emptyDatabase: true },
          testTimeout: 30_000,
          hookTimeout: 120_000,
        },
      },
      {
        resolve,
        test: {
          // The production build behind PgBouncer in transaction mode, two of each process; after the production check.
          name: "scale",
          include: ["tests/scale/**/*.test.ts"],
          globalSetup: ["tests/support/global-setup.ts"],
          // Each wait inside has its own bound, shorter than these.
          testTimeout: 200_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
