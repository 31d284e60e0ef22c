import { data, redirect } from "react-router";
import { auth } from "./auth.server";

export type SignedIn = NonNullable<Awaited<ReturnType<typeof auth.api.getSession>>>;
export type SessionUser = SignedIn["user"];

// One session lookup per request: a page's loaders (layout and child, each calling requireMember)
// receive the same Request, so they share the answer instead of asking the database again.
const signedInOf = new WeakMap<Request, Promise<SignedIn | null>>();

export function getSignedIn(request: Request): Promise<SignedIn | null> {
  let pending = signedInOf.get(request);
  if (!pending) {
    pending = auth.api.getSession({ headers: request.headers });
    signedInOf.set(request, pending);
  }
  return pending;
}

/** The path (and query) of the request, without React Router's `.data` suffix: where to come back to. */
export function returnPath(request: Request): string {
  const url = new URL(request.url);
  url.searchParams.delete("_routes");
  const path = url.pathname.replace(/\.data$/, "").replace(/^\/_root$/, "/") || "/";
  return path + (url.search || "");
}

export function isResourceRequest(request: Request): boolean {
  return new URL(request.url).pathname.startsWith("/api/");
}

/**
 * What to throw for 401, 403 and 404: resource routes (/api/...) get JSON `{ error }`; pages get a
 * redirect to sign-in (401) or `data(message, { status })` for their error boundary.
 */
export function failure(request: Request, status: 401 | 403 | 404, message: string) {
  if (isResourceRequest(request)) return Response.json({ error: message }, { status });
  if (status === 401) return redirect(`/sign-in?next=${encodeURIComponent(returnPath(request))}`);
  return data(message, { status });
}

/** Copies better-auth's Set-Cookie headers onto a response we return (sign-in, sign-out, verify). */
export function withAuthCookies(from: Response, to: Response): Response {
  for (const cookie of from.headers.getSetCookie()) to.headers.append("Set-Cookie", cookie);
  return to;
}
