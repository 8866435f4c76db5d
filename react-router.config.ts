import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  future: {
    v8_middleware: true,
    // Each of these changes behaviour the app relies on (the server build's input, the request loaders see, data
    // URLs); they are taken one at a time with their tests, not switched on blindly. Stated, so builds stay quiet.
    v8_splitRouteModules: false,
    v8_viteEnvironmentApi: false,
    v8_passThroughRequests: false,
    v8_trailingSlashAwareDataRequests: false,
  },
} satisfies Config;
