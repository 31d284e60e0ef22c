// Drives better-auth and our route modules with plain Requests, the way the server receives them.
import { auth } from "~/server/auth.server";

export const appUrl = (process.env.APP_URL ?? "http://127.0.0.1:3100").replace(/\/$/, "");

/** A browser's cookie store, reduced to what these tests need: name=value pairs set by responses. */
export class CookieJar {
  private readonly cookies = new Map<string, string>();
  store(response: Response): void {
    for (const line of response.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair.indexOf("=");
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      // RFC 6265 §5.3 step 11 (from memory): an already-expired cookie removes the stored one.
      if (value === "" || /max-age=0\b/i.test(line)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }
  header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }
  get size(): number {
    return this.cookies.size;
  }
}

function headersFor(jar: CookieJar | undefined, extra: Record<string, string> = {}): Headers {
  // better-auth refuses cookie-carrying POSTs without an Origin; a browser always sends one.
  const headers = new Headers({ origin: appUrl, ...extra });
  if (jar && jar.size) headers.set("cookie", jar.header());
  return headers;
}

export function getRequest(path: string, jar?: CookieJar): Request {
  return new Request(`${appUrl}${path}`, { headers: headersFor(jar) });
}

export function formRequest(path: string, fields: Record<string, string>, jar?: CookieJar): Request {
  return new Request(`${appUrl}${path}`, {
    method: "POST",
    headers: headersFor(jar, { "content-type": "application/x-www-form-urlencoded" }),
    body: new URLSearchParams(fields),
  });
}

/** better-auth's own HTTP endpoints, as the browser or a script calls them. */
export async function authCall(path: string, init: { method?: string; json?: unknown; jar?: CookieJar } = {}): Promise<Response> {
  const headers = headersFor(init.jar, init.json === undefined ? {} : { "content-type": "application/json" });
  const response = await auth.handler(
    new Request(`${appUrl}/api/auth${path}`, {
      method: init.method ?? (init.json === undefined ? "GET" : "POST"),
      headers,
      body: init.json === undefined ? undefined : JSON.stringify(init.json),
    }),
  );
  init.jar?.store(response);
  return response;
}

export type Outcome = { status: number; location: string | null; body: unknown; response: Response | null };

/**
 * What a loader or action produced, thrown or returned: a Response (redirects, JSON), React Router's
 * data(value, { status }), or a plain object (status 200).
 */
export async function outcome(run: () => unknown, jar?: CookieJar): Promise<Outcome> {
  let value: unknown;
  try {
    value = await run();
  } catch (thrown) {
    value = thrown;
  }
  if (value instanceof Response) {
    jar?.store(value);
    const isJson = value.headers.get("content-type")?.includes("json");
    return { status: value.status, location: value.headers.get("location"), body: isJson ? await value.json() : null, response: value };
  }
  const wrapped = value as { type?: string; data?: unknown; init?: ResponseInit | null };
  if (wrapped && wrapped.type === "DataWithResponseInit") {
    if (jar && wrapped.init?.headers) jar.store(new Response(null, { headers: wrapped.init.headers }));
    return { status: wrapped.init?.status ?? 200, location: null, body: wrapped.data, response: null };
  }
  if (value instanceof Error) throw value;
  return { status: 200, location: null, body: value, response: null };
}

/** Route-module arguments; our loaders and actions read only request and params. */
export function args(request: Request, params: Record<string, string> = {}) {
  return { request, params, context: {} } as never;
}
