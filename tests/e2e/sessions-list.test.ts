// Sessions list, venues and API tokens in Chromium (desktop and 390 px phone width, screenshots in
// .data/shots/), then the headless API through the served app with the token made on the account page:
// POST /api/sessions stores a session whose figures are the engine's, and the job worker that npm test
// runs beside the app re-checks it until it reads "checked".
import { mkdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { and, asc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { organization } from "~/db/schema/auth";
import { cars, setups } from "~/db/schema/garage";
import { db } from "~/server/db.server";
import { seedGarage } from "~/server/seed/garage.server";
import { seedSessions } from "~/server/seed/sessions.server";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

const ROOT = join(__dirname, "..", "..");
const SHOTS = join(ROOT, ".data", "shots");

async function shoot(b: OpenBrowser, name: string) {
  mkdirSync(SHOTS, { recursive: true });
  for (const width of [1280, 390]) {
    await b.page.setViewportSize({ width, height: 900 });
    await b.page.waitForTimeout(150);
    await b.page.screenshot({ path: join(SHOTS, `${name}-${width}.png`), fullPage: true });
  }
  await b.page.setViewportSize({ width: 1280, height: 800 });
}

describe("Sessions, venues and the headless API", () => {
  let browser: OpenBrowser;
  const pageErrors: string[] = [];
  let token = "";

  beforeAll(async () => {
    await seedUsers();
    await seedGarage();
    await seedSessions();
    browser = await openBrowser();
    browser.page.on("pageerror", (e) => pageErrors.push(e.message));
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", { headers: { origin: baseURL }, data: { email: "demo@harrowgate.example", password: DEMO_PASSWORD } });
    expect(signIn.status()).toBe(200);
  }, 180_000);

  afterAll(async () => {
    await browser?.close();
  });

  it("lists the demo sessions, sorts by ClA and filters by venue through the URL", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate", { waitUntil: "networkidle" });
    await page.getByRole("link", { name: "All sessions" }).waitFor();
    await shoot(browser, "dashboard-sessions");
    await page.goto("/t/harrowgate/sessions", { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Sessions" }).waitFor();
    const rows = page.locator('table[aria-label="Sessions"] tbody tr');
    expect(await rows.count()).toBeGreaterThanOrEqual(8);
    await shoot(browser, "sessions-list");
    await page.getByRole("link", { name: /ClA total/ }).click();
    await page.waitForURL(/sort=cla&dir=asc/);
    await page.getByLabel("Venue").selectOption({ label: "Coldwater Ridge hill-climb" });
    await page.getByRole("button", { name: "Filter" }).click();
    await page.waitForURL(/venue=/);
    await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(2);
    await expect.poll(() => page.locator('table[aria-label="Sessions"] tbody tr td:nth-child(2)').allTextContents()).toEqual(["Coldwater Ridge hill-climb", "Coldwater Ridge hill-climb"]);
    await page.getByRole("link", { name: "Venues" }).click();
    await page.getByRole("heading", { name: "Venues" }).waitFor();
    await shoot(browser, "venues");
    expect(pageErrors).toEqual([]);
  });

  it("makes an API token on the account page, shown once", async () => {
    const page = browser.page;
    await page.goto("/account", { waitUntil: "networkidle" });
    await page.getByLabel("Token name").fill("Pit laptop");
    await page.getByRole("button", { name: "Make token" }).click();
    token = (await page.getByTestId("new-api-token").textContent({ timeout: 15_000 }))!.trim();
    expect(token).toMatch(/^rkl_/);
    await shoot(browser, "account-tokens");
    await page.reload({ waitUntil: "networkidle" });
    expect(await page.getByTestId("new-api-token").count()).toBe(0);
    expect(await page.content()).not.toContain(token);
  });

  it("POST /api/sessions through the served app stores a session that the job worker then checks", async () => {
    const log = "sample-data/logs/marlin-kestrel-splitter";
    const [team] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, "harrowgate"));
    const [car] = await db.select({ id: cars.id }).from(cars).where(and(eq(cars.teamId, team.id), eq(cars.name, "Marlin SR2")));
    const [v1] = await db.select({ id: setups.id }).from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 1))).orderBy(asc(setups.createdAt));
    const form = new FormData();
    form.set("meta", JSON.stringify({ car: "Marlin SR2", setup: v1.id, map: JSON.parse(readFileSync(join(ROOT, `${log}.map.json`), "utf8")), date: "2026-05-24", venue: "Kestrel Bank Raceway", run: "Low splitter test" }));
    form.set("file", new File([readFileSync(join(ROOT, `${log}.csv`))], "marlin-kestrel-splitter.csv", { type: "text/csv" }));
    const noToken = await fetch(`${baseURL}/api/sessions`, { method: "POST", body: form });
    expect(noToken.status).toBe(401);
    const res = await fetch(`${baseURL}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${token}` }, body: form });
    const body = (await res.json()) as { id: string; url: string; summary?: { aero: { cla_total_m2: number } }; duplicate?: boolean };
    expect([201, 200]).toContain(res.status);
    expect(body.url).toBe(`${baseURL}/t/harrowgate/sessions/${body.id}`);
    const state = async () => {
      const list = (await (await fetch(`${baseURL}/api/sessions?from=2026-05-24&to=2026-05-24`, { headers: { authorization: `Bearer ${token}` } })).json()) as { sessions: Array<{ id: string; state: string; cla_total_m2: number }> };
      return list.sessions.find((s) => s.id === body.id)?.state;
    };
    await expect.poll(state, { timeout: 60_000, interval: 500 }).toBe("checked");
    const again = await fetch(`${baseURL}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${token}` }, body: form });
    expect(again.status).toBe(200);
    expect(((await again.json()) as { duplicate: boolean }).duplicate).toBe(true);
  });
});
