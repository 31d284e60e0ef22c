import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

// Browser tests: run by `npm test` against the built app it serves on 127.0.0.1:3100 (APP_URL).
// One file at a time: they share the server, the test database and the mail catcher.
export default defineConfig({
  resolve: {
    alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) },
  },
  test: {
    include: ["tests/e2e/**/*.test.ts"],
    environment: "node",
    fileParallelism: false,
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
