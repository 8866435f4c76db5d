/**
 * How the browser build groups modules into files (vite.config.ts). Left to itself the bundler makes one chunk per
 * distinct set of routes sharing a module: the pad needed 24 small files. Over HTTP/1.1 a browser opens six
 * connections to a host, so each further six files cost a whole round trip (562 ms on a crowded school network)
 * before the page can hydrate. Measured with bench/pageload.ts.
 *
 * So: everything the root layout and the client entry need statically (React, React Router, the shell), and what
 * every one of the first pages needs, is one file, loaded by every page anyway. Any other module those pages need
 * is grouped by which of them need it ("pad", "pad+practice", …), so each loads a handful of files and nothing it
 * does not use. Other modules (teachers' pages, lazily loaded ones) keep the bundler's own splitting.
 */

/** The pages a student opens first (route files under app/), each with its part of a chunk's name. */
export const FIRST_LOAD_PAGES: Readonly<Record<string, string>> = {
  "routes/live/play.tsx": "pad",
  "routes/live/join.tsx": "join",
  "routes/student/practice.tsx": "practice",
};

export const SHELL_CHUNK = "shell";

/** What the namer reads of the module graph: who imports a module statically, and whether it is an entry. */
export interface ModuleGraph {
  staticImporters(id: string): readonly string[];
  isEntry(id: string): boolean;
}

const normalize = (id: string) => id.replaceAll("\\", "/");

/**
 * A chunk name for module `id`, or null to leave it to the bundler. `appDir` is the app folder's absolute path.
 * Entries (route modules, the client entry) stay in their own files: the router fetches them by name.
 */
export function chunkGroupName(id: string, graph: ModuleGraph, appDir: string): string | null {
  if (graph.isEntry(id)) return null;
  const app = normalize(appDir).replace(/\/?$/, "/");
  const isShellRoot = (m: string) => m === `${app}root.tsx` || /\/entry\.client\.[jt]sx?$/.test(m);
  const pages = new Set<string>();
  // Every static importer up the graph; a module reached from the shell is needed on every page.
  const seen = new Set([id]);
  const queue = [id];
  while (queue.length > 0) {
    const current = queue.pop()!;
    const name = normalize(current);
    if (isShellRoot(name)) return SHELL_CHUNK;
    const page = name.startsWith(app) ? FIRST_LOAD_PAGES[name.slice(app.length)] : undefined;
    if (page) pages.add(page);
    for (const importer of graph.staticImporters(current)) {
      if (seen.has(importer)) continue;
      seen.add(importer);
      queue.push(importer);
    }
  }
  if (pages.size === 0) return null;
  // Needed by every first page: cheaper inside the file every page loads than as a file of its own.
  if (pages.size === Object.keys(FIRST_LOAD_PAGES).length) return SHELL_CHUNK;
  return [...pages].sort().join("+");
}
