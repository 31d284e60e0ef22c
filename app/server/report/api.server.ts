/**
 * Answers of the report's data API: JSON errors, and ETag + Cache-Control so a repeat read of an
 * unchanged session costs a small query and a 304 (RFC 9110 §8.8.3 and §13.1.2; RFC 9111 §5.2.2).
 */
import { createHash } from "node:crypto";
import { env } from "~/server/env.server";

/** `private, no-cache`: only the caller's browser may keep it, and must ask again each time (a 304 when unchanged). */
export const CACHE_CONTROL = "private, no-cache";
const VARY = "Authorization, Cookie";

export function apiError(status: number, error: string): Response {
  return Response.json({ error }, { status, headers: { "Cache-Control": "no-store" } });
}

/** A weak validator over whatever decides the body (ids, update times, format). */
export function etagOf(...parts: (string | number | null | undefined)[]): string {
  return `W/"${createHash("sha256").update(parts.map((p) => String(p ?? "")).join("\u0000")).digest("base64url").slice(0, 27)}"`;
}

/** If-None-Match against an ETag (weak comparison, RFC 9110 §13.1.2; "*" matches any). */
export function notModified(request: Request, etag: string): boolean {
  const header = request.headers.get("if-none-match");
  if (!header) return false;
  if (header.trim() === "*") return true;
  const bare = etag.replace(/^W\//, "");
  return header.split(",").some((t) => t.trim().replace(/^W\//, "") === bare);
}

function headers(etag: string, contentType?: string): Headers {
  const h = new Headers({ ETag: etag, "Cache-Control": CACHE_CONTROL, Vary: VARY });
  if (contentType) h.set("Content-Type", contentType);
  return h;
}

export function notModifiedResponse(etag: string): Response {
  return new Response(null, { status: 304, headers: headers(etag) });
}

/** JSON with the validators, or 304 when the caller already holds this version. */
export async function cachedJson(request: Request, etag: string, body: () => unknown | Promise<unknown>): Promise<Response> {
  if (notModified(request, etag)) return notModifiedResponse(etag);
  return new Response(JSON.stringify(await body()), { status: 200, headers: headers(etag, "application/json; charset=utf-8") });
}

/** JSON already serialised (parts joined as they are), with the validators; the caller has checked If-None-Match. */
export function jsonTextResponse(etag: string, text: string): Response {
  return new Response(text, { status: 200, headers: headers(etag, "application/json; charset=utf-8") });
}

/** CSV as a download, with the validators. */
export async function cachedCsv(request: Request, etag: string, fileName: string, body: () => string | Promise<string>): Promise<Response> {
  if (notModified(request, etag)) return notModifiedResponse(etag);
  const h = headers(etag, "text/csv; charset=utf-8; header=present");
  h.set("Content-Disposition", `attachment; filename="${fileName}"`);
  return new Response(await body(), { status: 200, headers: h });
}

/** The Balance report page of a session. */
export function sessionUrl(request: Request, teamSlug: string, sessionId: string): string {
  return new URL(`/t/${encodeURIComponent(teamSlug)}/sessions/${encodeURIComponent(sessionId)}`, env.APP_URL).toString();
}
