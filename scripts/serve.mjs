// Serve the built app (build/) on HOST:PORT with Rakeline's own HTTP server (scripts/lib/http-server.mjs):
// static files, React Router's request handler, the client's socket address for rate limiting, body caps and
// security headers. `npm start` and `npm test` run this after `react-router build`; so can a process manager.
import path from "node:path";
import { pathToFileURL } from "node:url";
import { repoRoot } from "./lib/env.mjs";
import { createAppListener, startHttpServer } from "./lib/http-server.mjs";

const host = process.env.HOST || "127.0.0.1";
const port = Number(process.env.PORT || 3000);
const build = await import(pathToFileURL(path.join(repoRoot, "build", "server", "index.js")).href);
const listener = createAppListener({
  build,
  clientDir: path.join(repoRoot, "build", "client"),
  // React Router shows error details only outside production, as react-router-serve did.
  mode: process.env.NODE_ENV === "production" ? "production" : "development",
  https: (process.env.APP_URL ?? "").startsWith("https://"),
});
await startHttpServer({ listener, host, port });
console.log(`[rakeline] app server listening on http://${host.includes(":") ? `[${host}]` : host}:${port} (pid ${process.pid})`);
