// The served app (scripts/serve.mjs) against the probe's findings that need a real browser or a real socket:
// framing by a foreign page, the Content-Security-Policy of every main page, body caps before parsing, and a
// cross-port form that used to create a car.
import http from "node:http";
import net from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, DEMO_TEAM, seedUsers } from "~/server/seed/users.server";
import { seedGarage } from "~/server/seed/garage.server";
import { pool } from "~/server/db.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

const team = DEMO_TEAM.slug;

/** A page from another origin (another port of the same host), as an attacker would serve it. */
async function foreignSite(html: string): Promise<{ url: string; close(): Promise<void> }> {
  const server = http.createServer((_req, res) => {
    res.writeHead(200, { "Content-Type": "text/html; charset=utf-8" });
    res.end(html);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as net.AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/`,
    close: () =>
      new Promise((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

/** Raw HTTP/1.1 over a socket: what a script (not a browser) can send. */
function rawRequest(text: string): Promise<string> {
  const { hostname, port } = new URL(baseURL);
  return new Promise((resolve, reject) => {
    const socket = net.connect(Number(port), hostname, () => socket.write(text));
    let answer = "";
    socket.on("data", (chunk) => (answer += chunk.toString("latin1")));
    socket.on("end", () => resolve(answer));
    socket.on("error", (error) => (answer ? resolve(answer) : reject(error)));
    socket.setTimeout(20_000, () => socket.destroy(new Error("no answer")));
  });
}

describe("security in the served app", () => {
  let browser: OpenBrowser;
  const violations: string[] = [];

  beforeAll(async () => {
    await seedUsers();
    await seedGarage();
    browser = await openBrowser();
    browser.page.on("console", (message) => {
      if (/Content Security Policy|Refused to/i.test(message.text())) violations.push(`${browser.page.url()}: ${message.text()}`);
    });
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", {
      headers: { origin: baseURL },
      data: { email: "demo@harrowgate.example", password: DEMO_PASSWORD },
    });
    expect(signIn.status()).toBe(200);
  });

  afterAll(async () => {
    await browser?.close();
    await pool.end();
  });

  it("sends a nonce-based policy with every page, and the page's scripts carry that nonce", async () => {
    const response = await browser.page.goto(`/t/${team}/settings`);
    const headers = response!.headers();
    const policy = headers["content-security-policy"];
    const nonce = /'nonce-([^']+)'/.exec(policy)?.[1];
    expect(nonce).toBeTruthy();
    // CSP Level 3 §6.4.2 frame-ancestors 'none': no page may embed this one.
    expect(policy).toContain("frame-ancestors 'none'");
    expect(policy).toContain("worker-src 'self' blob:");
    expect(policy).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    // WHATWG Fetch §3.6 (X-Content-Type-Options) and W3C Referrer Policy §3.
    expect(headers["x-content-type-options"]).toBe("nosniff");
    expect(headers["referrer-policy"]).toBe("same-origin");
    const html = await response!.text();
    const inlineScripts = [...html.matchAll(/<script(?![^>]*\bsrc=)([^>]*)>/g)].map((m) => m[1]);
    expect(inlineScripts.length).toBeGreaterThan(0);
    for (const attributes of inlineScripts) expect(attributes).toContain(`nonce="${nonce}"`);
    // A second answer gets a fresh nonce.
    const again = await browser.context.request.get(`/t/${team}/settings`);
    expect(again.headers()["content-security-policy"]).not.toContain(nonce!);
  });

  it("does not render the signed-in settings page inside a foreign page's frame", async () => {
    const site = await foreignSite(`<!doctype html><title>elsewhere</title><iframe id="f" src="${baseURL}/t/${team}/settings" width="800" height="600"></iframe>`);
    try {
      await browser.page.goto(site.url);
      await browser.page.waitForLoadState("load");
      const frame = browser.page.frames().find((f) => f !== browser.page.mainFrame());
      // Chromium replaces a frame refused by frame-ancestors with its own error page; none of our text is in it.
      const text = frame ? await frame.evaluate(() => document.body?.innerText ?? "").catch(() => "") : "";
      expect(text).not.toMatch(/Members|Team ·/);
      expect(frame?.url() ?? "").not.toBe(`${baseURL}/t/${team}/settings`);
    } finally {
      await site.close();
    }
  });

  it("runs the main pages with no policy violation", async () => {
    violations.length = 0;
    const cars = (await (await browser.context.request.get(`/api/t/${team}/cars`)).json()) as { cars: Array<{ id: string }> };
    const pages = ["/", `/t/${team}`, `/t/${team}/garage`, `/t/${team}/garage/${cars.cars[0].id}`, `/t/${team}/garage/new`, `/t/${team}/settings`, "/account", "/teams/new"];
    for (const path of pages) {
      await browser.page.goto(path, { waitUntil: "networkidle" });
      // The page hydrated (React Router's client took over), so its module scripts ran under the policy.
      await browser.page.waitForFunction(() => "__reactRouterRouteModules" in window);
    }
    expect(violations).toEqual([]);
  });

  it("refuses an oversized form body before reading it, with and without Content-Length", async () => {
    const big = `email=${"a".repeat(2 * 1024 * 1024)}&password=x`;
    const declared = await fetch(`${baseURL}/sign-in`, {
      method: "POST",
      headers: { origin: baseURL, "content-type": "application/x-www-form-urlencoded" },
      body: big,
    });
    // RFC 9110 §15.5.14: 413 Content Too Large.
    expect(declared.status).toBe(413);
    expect(await declared.text()).toMatch(/too large: a form or JSON body may be at most 1024 KiB/);
    const { host } = new URL(baseURL);
    const chunk = "a".repeat(64 * 1024);
    const chunks = Array.from({ length: 20 }, () => `${chunk.length.toString(16)}\r\n${chunk}\r\n`).join("");
    const chunked = await rawRequest(
      `POST /sign-in HTTP/1.1\r\nHost: ${host}\r\nOrigin: ${baseURL}\r\nContent-Type: application/x-www-form-urlencoded\r\nTransfer-Encoding: chunked\r\nConnection: close\r\n\r\n${chunks}0\r\n\r\n`,
    );
    expect(chunked).toMatch(/^HTTP\/1\.1 413/);
  });

  it("answers a malformed Host header with 400 and keeps serving", async () => {
    const answer = await rawRequest("GET / HTTP/1.1\r\nHost: bad host\r\nConnection: close\r\n\r\n");
    expect(answer).toMatch(/^HTTP\/1\.1 400/);
    expect((await fetch(`${baseURL}/`)).status).toBe(200);
  });

  it("creates no car when a page on another port posts the probe's form with the engineer's cookies", async () => {
    const count = async () => ((await (await browser.context.request.get(`/api/t/${team}/cars`)).json()) as { cars: unknown[] }).cars.length;
    const before = await count();
    const carFile = JSON.stringify({ name: "Forged", wheelbase_mm: 2400, mass_kg: 600, static_front_weight_pct: 45, cog_height_mm: 400, steering_ratio: 12, front: { spring_rate_n_per_mm: 100, motion_ratio: 0.9 }, rear: { spring_rate_n_per_mm: 100, motion_ratio: 0.9 } });
    const [head, tail] = [carFile.slice(0, -1), carFile.slice(-1)];
    // text/plain forms send "name=value": the name carries the JSON, the value closes it.
    const site = await foreignSite(`<!doctype html><form id="f" method="post" enctype="text/plain" action="${baseURL}/api/t/${team}/cars/import">
      <input type="hidden" name='${head.replace(/'/g, "&#39;")}' value='${tail}'></form><script>document.getElementById("f").submit()</script>`);
    try {
      const answered = browser.page.waitForResponse((r) => r.url().includes("/cars/import"));
      await browser.page.goto(site.url);
      const response = await answered;
      // RFC 9110 §15.5.4: 403 Forbidden.
      expect(response.status()).toBe(403);
      expect(await count()).toBe(before);
    } finally {
      await site.close();
    }
  });
});
