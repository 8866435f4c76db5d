import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Kept apart from vite.config.ts: the React Router plugin is for app builds, not for tests.
export default defineConfig({
  resolve: { alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) } },
  test: {
    include: ["app/**/*.test.ts", "app/**/*.test.tsx", "server/**/*.test.ts", "tests/integration/**/*.test.ts"],
    globalSetup: ["tests/setup/global.ts"],
    setupFiles: ["tests/setup/worker.ts"],
    // The server build is loaded by Node itself, as in production, so it shares react-router's
    // module instance with @react-router/express instead of getting a transformed copy.
    server: { deps: { external: [/\/build\/server\//] } },
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
