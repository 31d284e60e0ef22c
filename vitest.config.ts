import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

// Kept apart from vite.config.ts: the React Router plugin must not run under vitest.
export default defineConfig({
  resolve: {
    alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    exclude: ["tests/e2e/**", "node_modules/**"],
    environment: "node",
    testTimeout: 30_000,
    hookTimeout: 60_000,
    // Integration tests share one database; files run one at a time to keep them independent.
    fileParallelism: false,
    // ...and each starts from an empty database (tests/setup/fresh-database.ts).
    setupFiles: ["tests/setup/fresh-database.ts"],
  },
});
