import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { fileURLToPath } from "node:url";
import { defineConfig, type Plugin } from "vite";
import { chunkGroupName } from "./server/chunk-groups.ts";

const appDir = fileURLToPath(new URL("./app", import.meta.url));

/**
 * The chunk groups below place each module once, without pulling its dependencies along, which the bundler allows
 * only if an entry may gain exports. React Router asks for "exports-only" for the browser build; a route module with
 * an extra export is harmless, as the router reads only the exports it knows.
 */
const entriesMayGainExports: Plugin = {
  name: "fretcall:entries-may-gain-exports",
  enforce: "post",
  configEnvironment(name, config) {
    if (name !== "client") return;
    for (const options of [config.build?.rollupOptions, config.build?.rolldownOptions]) {
      if (options) options.preserveEntrySignatures = "allow-extension";
    }
  },
};

export default defineConfig(({ isSsrBuild }) => ({
  resolve: { alias: { "~": appDir } },
  build: isSsrBuild
    ? // The production server imports the request handler factory from the server build.
      { rollupOptions: { input: "./server/app.ts" } }
    : // One chunk is bigger than Vite's 500 kB: VexFlow with its two music fonts inline (app/components/tuneRender.ts),
      // fetched only where a whole tune is engraved, never on a first load. The limit sits just above it so any other
      // chunk that grows that large still warns.
      {
        chunkSizeWarningLimit: 760,
        rolldownOptions: {
          output: {
            codeSplitting: {
              groups: [
                {
                  debugName: "first-load pages",
                  name: (id, ctx) =>
                    chunkGroupName(
                      id,
                      {
                        staticImporters: (m) => ctx.getModuleInfo(m)?.importers ?? [],
                        isEntry: (m) => ctx.getModuleInfo(m)?.isEntry ?? false,
                      },
                      appDir,
                    ),
                  // A group's dependencies have their own group (needed by the same pages or more), so no cycles.
                  includeDependenciesRecursively: false,
                },
              ],
            },
          },
        },
      },
  plugins: [tailwindcss(), reactRouter(), entriesMayGainExports],
}));
