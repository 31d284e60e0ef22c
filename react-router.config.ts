import type { Config } from "@react-router/dev/config";

export default {
  // Server-side rendering on: loaders and actions run on the server, pages arrive rendered.
  ssr: true,
  future: {
    // Every loader of one request receives the same Request object (not a copy per route): cheaper,
    // and the per-request memo of the session and membership lookups (session.server.ts,
    // permissions.server.ts) rests on it. A loader that needs the page's own URL takes the `url`
    // argument or strips `.data` and `_routes` (see returnPath in session.server.ts).
    v8_passThroughRequests: true,
  },
} satisfies Config;
