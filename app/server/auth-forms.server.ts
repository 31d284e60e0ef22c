import { redirect, type AppLoadContext } from "react-router";
import { auth, invalidateResetTokens } from "./auth.server";
import { CLIENT_ADDRESS_HEADER, clientAddressOf } from "./client-address.server";
import { env } from "./env.server";
import { withAuthCookies } from "./session.server";

// The sign-in family of forms. Each form action calls better-auth's HTTP endpoint with the browser's
// own headers, so its rate limiter and Origin/CSRF checks apply to the forms exactly as to /api/auth.
// The rate limiter keys on the client address resolved from the socket (client-address.server.ts), never
// on a header the client chose. Each answer is either a redirect carrying better-auth's cookies, or a
// specific message for the form.

/** Who is calling: the action's request and its load context (which holds the socket's peer address). */
export type Caller = { request: Request; context?: AppLoadContext };

const FORWARDED = ["cookie", "origin", "referer", "user-agent", "sec-fetch-site", "sec-fetch-mode", "sec-fetch-dest"];
const appUrl = env.APP_URL.replace(/\/$/, "");

function callAuth({ request, context }: Caller, path: string, body: unknown): Promise<Response> {
  const headers = new Headers({ "content-type": "application/json" });
  for (const name of FORWARDED) {
    const value = request.headers.get(name);
    if (value) headers.set(name, value);
  }
  const client = clientAddressOf(request, context);
  if (client) headers.set(CLIENT_ADDRESS_HEADER, client);
  return auth.handler(new Request(`${appUrl}/api/auth${path}`, { method: "POST", headers, body: JSON.stringify(body) }));
}

type AuthFailure = { status: number; code: string; message: string };
export type FormResult = { ok: true; response: Response } | { ok: false; formError: string; status: number };

async function failureOf(response: Response): Promise<AuthFailure> {
  const body = (await response.json().catch(() => ({}))) as { code?: string; message?: string };
  return { status: response.status, code: body.code ?? "", message: body.message ?? response.statusText };
}

const TOO_MANY = "Too many attempts from here. Wait a minute, then try again.";

/** Messages for what better-auth refuses, in our words; never the same text for different causes. */
function describe(f: AuthFailure): string {
  if (f.status === 429) return TOO_MANY;
  switch (f.code) {
    case "INVALID_EMAIL_OR_PASSWORD":
      return "Wrong password, or no account uses this e-mail address. Check both, or reset your password.";
    case "EMAIL_NOT_VERIFIED":
      return "This e-mail address is not confirmed yet. We have sent a new confirmation link to it: open it, then sign in.";
    case "INVALID_PASSWORD":
      return "The current password is wrong.";
    case "PASSWORD_TOO_SHORT":
      return "The password is too short.";
    case "PASSWORD_TOO_LONG":
      return "The password is too long.";
    case "INVALID_TOKEN":
      return "This reset link is invalid or has expired. Request a new one.";
    case "INVALID_EMAIL":
      return "That is not a valid e-mail address.";
    default:
      return f.message || "The request was refused.";
  }
}

export function verifyCallback(next: string | undefined): string {
  return next ? `/verify?next=${encodeURIComponent(next)}` : "/verify";
}

export async function signUp(caller: Caller, input: { name: string; email: string; password: string; next?: string }): Promise<FormResult> {
  const response = await callAuth(caller, "/sign-up/email", {
    name: input.name,
    email: input.email,
    password: input.password,
    callbackURL: verifyCallback(input.next),
  });
  if (!response.ok) {
    const f = await failureOf(response);
    return { ok: false, formError: describe(f), status: f.status === 429 ? 429 : 400 };
  }
  return { ok: true, response };
}

export async function signIn(caller: Caller, input: { email: string; password: string }, next: string): Promise<FormResult> {
  const response = await callAuth(caller, "/sign-in/email", { email: input.email, password: input.password, callbackURL: verifyCallback(next) });
  if (!response.ok) {
    const f = await failureOf(response);
    return { ok: false, formError: describe(f), status: f.status === 429 ? 429 : 400 };
  }
  return { ok: true, response: withAuthCookies(response, redirect(next)) };
}

export async function signOut(caller: Caller): Promise<Response> {
  const response = await callAuth(caller, "/sign-out", {});
  return withAuthCookies(response, redirect("/"));
}

/**
 * Starts a reset and answers at once, the same way whether or not the address has an account: the
 * lookup, the token and the mail happen after the answer, so its timing says nothing. (A request refused
 * by the rate limiter simply sends nothing.)
 */
export function requestPasswordReset(caller: Caller, email: string): void {
  callAuth(caller, "/request-password-reset", { email, redirectTo: "/reset-password" })
    .then(async (response) => {
      if (!response.ok && response.status !== 429) console.error(`password reset request failed: ${response.status} ${await response.text()}`);
    })
    .catch((error) => console.error("password reset request failed:", error));
}

export async function resetPassword(caller: Caller, token: string, newPassword: string): Promise<FormResult> {
  const response = await callAuth(caller, "/reset-password", { token, newPassword });
  if (!response.ok) {
    const f = await failureOf(response);
    return { ok: false, formError: describe(f), status: f.status === 429 ? 429 : 400 };
  }
  return { ok: true, response: redirect("/sign-in?reset=1") };
}

export async function changePassword(caller: Caller, userId: string, currentPassword: string, newPassword: string): Promise<FormResult> {
  const response = await callAuth(caller, "/change-password", { currentPassword, newPassword, revokeOtherSessions: true });
  if (!response.ok) {
    const f = await failureOf(response);
    return { ok: false, formError: describe(f), status: f.status === 429 ? 429 : 400 };
  }
  // A reset link mailed before the change must not undo it.
  await invalidateResetTokens(userId);
  return { ok: true, response };
}

export async function updateName(request: Request, name: string): Promise<void> {
  await auth.api.updateUser({ body: { name }, headers: request.headers });
}

/** Whether a password-reset token is stored and not expired (better-auth's own lookup, so its storage rules apply). */
export async function resetTokenIsLive(token: string): Promise<boolean> {
  if (token.length > 200 || !/^[A-Za-z0-9_-]+$/.test(token)) return false;
  const context = await auth.$context;
  const row = await context.internalAdapter.findVerificationValue(`reset-password:${token}`);
  return Boolean(row && new Date(row.expiresAt).getTime() > Date.now());
}
