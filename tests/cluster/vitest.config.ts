import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// The cluster tests (tests/cluster) start redis-server, nginx and Fretcall nodes of their own: one
// file at a time, with bounded waits, after the build (tests/run-all.sh).
export default defineConfig({
  resolve: { alias: { "~": fileURLToPath(new URL("../../app", import.meta.url)) } },
  test: {
    include: ["tests/cluster/**/*.test.ts"],
    root: fileURLToPath(new URL("../..", import.meta.url)),
    fileParallelism: false,
    testTimeout: 180_000,
    hookTimeout: 600_000,
  },
});
