// Smoke test of the served build: the landing page renders and everything it loads comes from our own host.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

describe("landing page in Chromium", () => {
  let browser: OpenBrowser;
  const requested: string[] = [];

  beforeAll(async () => {
    browser = await openBrowser();
    browser.context.on("request", (request) => requested.push(request.url()));
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("renders / and loads no resource from another host", async () => {
    const response = await browser.page.goto("/", { waitUntil: "networkidle" });
    // RFC 9110 §15.3.1: 200 OK is the answer to a successful GET.
    expect(response?.status()).toBe(200);
    await expect(browser.page.locator("h1").first().textContent()).resolves.toMatch(/\S/);

    // Ask for the bundled mono face, so the font request (if any) is part of what we check.
    // CSS Font Loading Module Level 3 §4.1: document.fonts.load() resolves with the matching FontFaces.
    const loadedFaces = await browser.page.evaluate(async () => (await document.fonts.load('16px "JetBrains Mono"')).length);
    expect(loadedFaces).toBeGreaterThan(0);
    await browser.page.waitForLoadState("networkidle");

    // WHATWG URL Standard: `hostname` is the host without the port; data:/blob: URLs have none and never leave the page.
    const appHost = new URL(baseURL).hostname;
    const external = requested.filter((url) => {
      const parsed = new URL(url);
      return (parsed.protocol === "http:" || parsed.protocol === "https:" || parsed.protocol === "ws:" || parsed.protocol === "wss:")
        && parsed.hostname !== appHost;
    });
    expect(requested.length).toBeGreaterThan(0);
    expect(external).toEqual([]);
    expect(appHost).toBe("127.0.0.1");
  });
});
