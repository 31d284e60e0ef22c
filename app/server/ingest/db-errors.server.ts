/**
 * Telling "the database is down" from other failures, so a route can answer 503 with a clear message
 * (and the browser keeps the form) instead of a 500. Drizzle wraps mysql2's error; the code is on the
 * cause.
 */
const DOWN_CODES = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "EHOSTUNREACH",
  "PROTOCOL_CONNECTION_LOST",
  "PROTOCOL_SEQUENCE_TIMEOUT",
  "ER_CON_COUNT_ERROR",
  "ER_SERVER_SHUTDOWN",
  "ER_QUERY_INTERRUPTED",
  "POOL_CLOSED",
]);

function codesOf(error: unknown): string[] {
  const codes: string[] = [];
  let e = error as { code?: unknown; cause?: unknown; message?: unknown } | undefined;
  for (let depth = 0; e && depth < 5; depth++) {
    if (typeof e.code === "string") codes.push(e.code);
    if (typeof e.message === "string" && /Pool is closed|connection is in closed state|Can't add new command when connection is in closed state/i.test(e.message)) codes.push("POOL_CLOSED");
    e = e.cause as typeof e;
  }
  return codes;
}

export function isDatabaseDown(error: unknown): boolean {
  return codesOf(error).some((c) => DOWN_CODES.has(c));
}

export function isDuplicateKey(error: unknown): boolean {
  return codesOf(error).includes("ER_DUP_ENTRY");
}

export const DATABASE_DOWN_MESSAGE =
  "The database is not answering, so nothing was stored. Your file and the details you typed are still on this page: try again in a minute.";

/** For a script (the headless API), which has no page holding its input: send the same request again. */
export const DATABASE_DOWN_MESSAGE_API =
  "The database is not answering, so no session was stored. Send the same request again in a minute (a file already stored is used again, not stored twice).";

export function databaseDownResponse(message: string = DATABASE_DOWN_MESSAGE): Response {
  return Response.json({ error: message }, { status: 503, headers: { "Retry-After": "30" } });
}
