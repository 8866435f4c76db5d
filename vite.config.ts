import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { fileURLToPath } from "node:url";
import { defineConfig } from "vite";

export default defineConfig(({ isSsrBuild }) => ({
  resolve: { alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) } },
  // The production server imports the request handler factory from the server build.
  build: isSsrBuild ? { rollupOptions: { input: "./server/app.ts" } } : undefined,
  plugins: [tailwindcss(), reactRouter()],
}));
