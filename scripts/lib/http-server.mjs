// Rakeline's HTTP server for the built app: build/client's static files, everything else through React
// Router's request handler. It adds what react-router-serve could not:
//   - the socket's peer address in the load context (`context.peerAddress`), so rate limiting keys on the real
//     client (app/server/client-address.server.ts decides whether a forwarded header may name another one);
//   - a size cap on request bodies that are parsed in memory (forms, JSON, text) before any route reads them;
//     streamed uploads (multipart/form-data, application/octet-stream) are capped by the route that reads them;
//   - the security headers every response carries (pages get their nonce-based policy from app/entry.server.tsx).
// It keeps no state of its own between requests, so any number of these processes can serve one database.
import { createReadStream, statSync } from "node:fs";
import http from "node:http";
import path from "node:path";
import { createReadableStreamFromReadable, writeReadableStreamToWritable } from "@react-router/node";
import { createRequestHandler } from "react-router";

/** Bodies a route reads whole (forms, JSON, text) stop here: 1 MiB is far above any form of the app. */
export const MAX_PARSED_BODY_BYTES = 1024 * 1024;

/** Content types a route reads as a stream, with its own limit (uploads, the CAR.json file field). */
const STREAMED_TYPES = ["multipart/form-data", "application/octet-stream"];

const STATIC_TYPES = {
  ".js": "text/javascript; charset=utf-8",
  ".mjs": "text/javascript; charset=utf-8",
  ".css": "text/css; charset=utf-8",
  ".json": "application/json; charset=utf-8",
  ".map": "application/json; charset=utf-8",
  ".svg": "image/svg+xml",
  ".png": "image/png",
  ".ico": "image/x-icon",
  ".woff2": "font/woff2",
  ".woff": "font/woff",
  ".txt": "text/plain; charset=utf-8",
  ".wasm": "application/wasm",
};

/** Headers on every answer. Pages replace the Content-Security-Policy with their own (with a nonce). */
export function baselineHeaders({ https }) {
  return {
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "same-origin",
    "X-Frame-Options": "DENY",
    "Cross-Origin-Opener-Policy": "same-origin",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=(), payment=()",
    ...(https ? { "Strict-Transport-Security": "max-age=31536000" } : {}),
  };
}

/** Answers that are not pages (JSON, CSV, downloads, redirects): nothing may run or be framed. */
export const NON_PAGE_POLICY = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

function sendPlain(res, status, text, headers = {}) {
  if (res.headersSent) {
    res.destroy();
    return;
  }
  res.writeHead(status, { "Content-Type": "text/plain; charset=utf-8", "Content-Security-Policy": NON_PAGE_POLICY, ...headers });
  res.end(text);
}

/** build/client/<path> for GET/HEAD when such a file exists; false otherwise (the app answers). */
function serveStatic(req, res, clientDir, pathname) {
  if (req.method !== "GET" && req.method !== "HEAD") return false;
  let relative;
  try {
    relative = decodeURIComponent(pathname);
  } catch {
    return false;
  }
  if (relative.includes("\0")) return false;
  const file = path.join(clientDir, path.normalize(relative));
  if (!file.startsWith(clientDir + path.sep)) return false;
  let stat;
  try {
    stat = statSync(file);
  } catch {
    return false;
  }
  if (!stat.isFile()) return false;
  // Vite puts content-hashed files under /assets: they never change, so browsers may keep them for a year.
  const immutable = relative.startsWith("/assets/");
  res.writeHead(200, {
    "Content-Type": STATIC_TYPES[path.extname(file).toLowerCase()] ?? "application/octet-stream",
    "Content-Length": stat.size,
    "Cache-Control": immutable ? "public, max-age=31536000, immutable" : "public, max-age=3600",
    "Last-Modified": stat.mtime.toUTCString(),
  });
  if (req.method === "HEAD") res.end();
  else createReadStream(file).pipe(res);
  return true;
}

function isStreamedType(contentType) {
  const type = (contentType ?? "").split(";")[0].trim().toLowerCase();
  return STREAMED_TYPES.includes(type);
}

/** A body read whole, up to capBytes; null when it is larger (the rest is not kept). */
function readCapped(req, capBytes) {
  return new Promise((resolve, reject) => {
    const chunks = [];
    let seen = 0;
    let over = false;
    req.on("data", (chunk) => {
      seen += chunk.length;
      if (seen > capBytes) over = true;
      if (!over) chunks.push(chunk);
    });
    req.on("end", () => resolve(over ? null : Buffer.concat(chunks)));
    req.on("error", reject);
  });
}

function tooLargeMessage(capBytes) {
  return `The request is too large: a form or JSON body may be at most ${Math.round(capBytes / 1024)} KiB. Files go through the upload forms.`;
}

/**
 * The request listener. `build` is the imported server build; `clientDir` its static files; `https` whether
 * the public address is https (APP_URL), which adds HSTS.
 */
/** The most of a refused body (by its Content-Length) read and dropped rather than cut off. */
const MAX_LINGER_BYTES = 64 * 1024 * 1024;

export function createAppListener({ build, clientDir, mode = "production", https = false, maxParsedBodyBytes = MAX_PARSED_BODY_BYTES }) {
  const handle = createRequestHandler(build, mode);
  const baseline = baselineHeaders({ https });
  const root = path.resolve(clientDir);

  return async function listener(req, res) {
    for (const [name, value] of Object.entries(baseline)) res.setHeader(name, value);
    let url;
    try {
      // A Host header that is not a host (or a path that is not a path) is the client's mistake, not a 500.
      url = new URL(req.url ?? "/", `http://${req.headers.host ?? "localhost"}`);
      if (!req.url?.startsWith("/")) throw new Error("not a path");
    } catch {
      sendPlain(res, 400, "Bad request: the Host header or the request target is malformed.");
      return;
    }
    if (serveStatic(req, res, root, url.pathname)) return;

    const method = req.method ?? "GET";
    const hasBody = method !== "GET" && method !== "HEAD";
    let capBytes = null;
    if (hasBody && !isStreamedType(req.headers["content-type"])) {
      capBytes = maxParsedBodyBytes;
      const declared = Number(req.headers["content-length"]);
      if (Number.isFinite(declared) && declared > capBytes) {
        // Refused before a byte of the body is parsed. A body of a sane size is read and dropped, so the
        // client, still sending, sees the 413 and not a reset connection (RFC 9112 §9.6, tear-down);
        // beyond that, the connection is closed at once.
        const linger = declared <= MAX_LINGER_BYTES;
        sendPlain(res, 413, tooLargeMessage(capBytes), linger ? {} : { Connection: "close" });
        req.resume();
        return;
      }
    }

    const controller = new AbortController();
    res.on("close", () => {
      if (!res.writableFinished) controller.abort();
    });
    const headers = new Headers();
    for (let i = 0; i < req.rawHeaders.length; i += 2) headers.append(req.rawHeaders[i], req.rawHeaders[i + 1]);
    const init = { method, headers, signal: controller.signal };
    if (hasBody && capBytes !== null) {
      // Read whole here (at most the cap), so a body sent without Content-Length is held to the same limit.
      const body = await readCapped(req, capBytes);
      if (body === null) {
        sendPlain(res, 413, tooLargeMessage(capBytes), { Connection: "close" });
        return;
      }
      init.body = body;
    } else if (hasBody) {
      init.body = createReadableStreamFromReadable(req);
      init.duplex = "half";
    }
    const request = new Request(url, init);
    const context = { peerAddress: req.socket.remoteAddress ?? null };

    let response;
    try {
      response = await handle(request, context);
    } catch (error) {
      console.error(error);
      sendPlain(res, 500, "Internal server error.");
      return;
    }
    const out = [];
    for (const [name, value] of response.headers) {
      if (name === "set-cookie") continue;
      out.push(name, value);
    }
    for (const cookie of response.headers.getSetCookie()) out.push("Set-Cookie", cookie);
    if (!response.headers.has("content-security-policy")) out.push("Content-Security-Policy", NON_PAGE_POLICY);
    res.writeHead(response.status, out);
    if (response.body && method !== "HEAD") {
      try {
        await writeReadableStreamToWritable(response.body, res);
      } catch {
        // The client went away mid-answer; nothing more to do.
      }
    } else {
      res.end();
    }
  };
}

/**
 * Listen on host:port. Resolves with the http.Server once listening. SIGTERM/SIGINT stop accepting, let the
 * requests in flight finish (up to `drainMs`), then exit.
 */
export async function startHttpServer({ listener, host, port, drainMs = 10_000, onClose }) {
  let closing = false;
  const server = http.createServer({ requestTimeout: 60 * 60 * 1000, headersTimeout: 60_000 }, (req, res) => {
    // While draining, a kept-alive connection carries this one request and closes: the client's next
    // request goes to a server that is taking requests (another instance, or this one once restarted).
    if (closing) res.setHeader("Connection", "close");
    listener(req, res).catch((error) => {
      console.error(error);
      sendPlain(res, 500, "Internal server error.");
    });
  });
  server.keepAliveTimeout = 5_000;
  await new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const stop = (signal) => {
    if (closing) return;
    closing = true;
    console.log(`[rakeline] ${signal}: the app server stops taking requests and finishes those in flight`);
    server.close(async () => {
      await onClose?.();
      process.exit(0);
    });
    server.closeIdleConnections();
    setTimeout(() => {
      server.closeAllConnections();
      process.exit(0);
    }, drainMs).unref();
  };
  process.once("SIGTERM", () => stop("SIGTERM"));
  process.once("SIGINT", () => stop("SIGINT"));
  return server;
}
