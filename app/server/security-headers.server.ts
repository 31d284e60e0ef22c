import { randomBytes } from "node:crypto";

// The Content-Security-Policy of Rakeline's pages. Scripts run only from our own origin or inline with the
// response's nonce; Web Workers start from our origin or a blob: URL (the engine worker); uPlot draws
// into canvases and sets element styles from script (allowed), and style attributes written by React are
// allowed (style-src-attr); the bundled JetBrains Mono is served by us; nothing may frame a page.
// scripts/lib/http-server.mjs adds nosniff, Referrer-Policy, X-Frame-Options and (over HTTPS) HSTS to
// every answer, and a "nothing runs" policy to answers that are not pages.

export function newNonce(): string {
  return randomBytes(18).toString("base64");
}

export function pagePolicy(nonce: string, { https }: { https: boolean }): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    "style-src 'self'",
    "style-src-attr 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    "connect-src 'self'",
    "worker-src 'self' blob:",
    "manifest-src 'self'",
    "media-src 'none'",
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/** Headers a page carries beside the policy (the HTTP server adds them again for every other answer). */
export function pageSecurityHeaders(nonce: string, { https, dev }: { https: boolean; dev: boolean }): Record<string, string> {
  return {
    // The dev server injects inline scripts of its own without a nonce; there only framing is refused.
    "Content-Security-Policy": dev ? "frame-ancestors 'none'" : pagePolicy(nonce, { https }),
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "same-origin",
    "X-Frame-Options": "DENY",
  };
}
