import { defineConfig } from "vitest/config";
export default defineConfig({
  root: "/work/main",
  resolve: { alias: [{ find: /^~\/music\/(.*)$/, replacement: "/tmp/fcshim/music/$1.ts" }, { find: "~", replacement: "/work/main/app" }] },
  test: { include: ["app/game/**/*.test.ts"] },
});
