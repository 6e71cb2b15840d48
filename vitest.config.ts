import { defineConfig } from "vitest/config";

// Three projects: the pure engine (parallel), the API against a real PostgreSQL (one file at a time),
// and browser tests driving Debian's Chromium against a running server (one file at a time).
export default defineConfig({
  test: {
    globalSetup: ["tests/setup/global-setup.ts"],
    hookTimeout: 60_000,
    testTimeout: 30_000,
    projects: [
      { extends: true, test: { name: "engine", include: ["tests/engine/**/*.test.ts"] } },
      { extends: true, test: { name: "client", include: ["tests/client/**/*.test.{ts,tsx}"] } },
      { extends: true, test: { name: "api", include: ["tests/api/**/*.test.ts"], fileParallelism: false } },
      { extends: true, test: { name: "browser", include: ["tests/browser/**/*.test.ts"], fileParallelism: false, testTimeout: 60_000 } },
    ],
  },
});
