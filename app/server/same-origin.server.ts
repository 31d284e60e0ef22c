import { env } from "./env.server";
import { failure } from "./session.server";

// Cross-site request forgery: a state-changing request that carries our cookies must come from our own
// pages. React Router checks Origin for page actions; resource routes (/api/...) get no such check, and a
// form on another port of the same host is "same site", so SameSite=Lax cookies ride along. Every
// cookie-authenticated, state-changing request therefore passes here (requireUser calls it).

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
const appOrigin = new URL(env.APP_URL).origin;

/** Why the request may not change anything on behalf of its cookies, or null when it may. */
export function crossSiteProblem(request: Request): string | null {
  if (SAFE_METHODS.has(request.method.toUpperCase())) return null;
  // A bearer token is sent deliberately by a script; a browser never adds one to a forged form.
  if (/^Bearer\s+\S/i.test(request.headers.get("authorization") ?? "")) return null;
  const origin = request.headers.get("origin");
  if (origin && origin !== "null") {
    return origin === appOrigin || origin === new URL(request.url).origin
      ? null
      : `This request came from ${origin}, not from Rakeline's own pages, so it was refused.`;
  }
  if (origin === "null") return "This request came from a page without an origin, so it was refused.";
  // No Origin header: trust the browser's Fetch Metadata when present.
  const site = request.headers.get("sec-fetch-site");
  if (site === "same-origin" || site === "none") return null;
  if (site) return "This request came from another site, so it was refused.";
  // A cross-origin page cannot send a JSON body without a CORS preflight, which Rakeline never grants.
  const type = (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (type === "application/json") return null;
  return "This request has no Origin header. Send it from Rakeline's pages, as JSON, or with an API token.";
}

/** Throws 403 (JSON on /api/ routes) when the request is a cross-site write; see crossSiteProblem. */
export function requireSameOrigin(request: Request): void {
  const problem = crossSiteProblem(request);
  if (problem) throw failure(request, 403, problem);
}
