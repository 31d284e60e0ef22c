// Browser-test harness: playwright-core driving Debian's Chromium (never a downloaded browser).
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { firstLink, waitForMailTo, type CaughtMail } from "../../server/helpers/mail";

/** The app under test: npm test serves the build here and sets APP_URL. */
export const baseURL = process.env.APP_URL ?? "http://127.0.0.1:3100";

export const CHROMIUM_PATH = "/usr/bin/chromium";

const CHROMIUM_ARGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export interface OpenBrowser {
  context: BrowserContext;
  page: Page;
  close(): Promise<void>;
}

/** Headless Chromium with a fresh profile directory (removed on close) and baseURL for relative goto(). */
export async function openBrowser(): Promise<OpenBrowser> {
  const userDataDir = mkdtempSync(path.join(os.tmpdir(), "rakeline-e2e-"));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    baseURL,
    viewport: { width: 1280, height: 800 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close();
      rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}

/** The latest mail to this address in the test catcher, waiting for it to arrive. */
export function latestMailTo(address: string, timeoutMs = 15_000): Promise<CaughtMail> {
  return waitForMailTo(address, timeoutMs);
}

/** The first link into the app found in the latest mail to this address (verification, reset, invitation). */
export async function latestLinkTo(address: string, timeoutMs = 15_000): Promise<string> {
  return firstLink(await latestMailTo(address, timeoutMs), baseURL);
}
