// Drop a log in Chromium, the way an engineer uses it after a stint: drop a committed sample export,
// confirm the Channel map the page proposes, fill the session details and store the session. The
// stored figures must be the CLI's for the same file, car file (the Garage's CAR.json export of the
// chosen setup version), map and options.
import { spawnSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { ChannelMap } from "~/engine/types";
import { seedGarage } from "~/server/seed/garage.server";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

const ROOT = join(__dirname, "..", "..");
const LOG = "sample-data/logs/marlin-kestrel-comma";
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

describe("Drop a log in the browser", () => {
  let browser: OpenBrowser;
  const pageErrors: string[] = [];
  let storedUrl = "";

  beforeAll(async () => {
    await seedUsers();
    await seedGarage();
    browser = await openBrowser();
    browser.page.on("pageerror", (e) => pageErrors.push(e.message));
    browser.page.on("console", (m) => { if (m.type() === "error") pageErrors.push(m.text()); });
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", {
      headers: { origin: baseURL },
      data: { email: "engineer@harrowgate.example", password: DEMO_PASSWORD },
    });
    expect(signIn.status()).toBe(200);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("drops a sample log, confirms the proposed map, fills the details and lands on the session with the CLI's figures", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Drop a log" }).waitFor();
    await shoot(browser, "drop-0-empty");
    await page.setInputFiles('[data-testid="drop-input"]', join(ROOT, `${LOG}.csv`));
    const map = JSON.parse(readFileSync(join(ROOT, `${LOG}.map.json`), "utf8")) as ChannelMap;
    // The generator's map.json says which column is which channel: the page must propose the same.
    await expect.poll(() => page.inputValue("#map-time-column"), { timeout: 30_000 }).toBe(map.time.column);
    for (const [channel, entry] of Object.entries(map)) {
      expect(await page.inputValue(`#map-${channel}-column`)).toBe(entry.column);
      expect(await page.inputValue(`#map-${channel}-unit`)).toBe(entry.unit);
    }
    await page.locator('[data-channel="speed"] canvas').first().waitFor();
    await page.waitForTimeout(800);
    await page.fill("#map-profile-name", "Marlin data box");
    await shoot(browser, "drop-1-map");
    await page.getByRole("button", { name: "Confirm map" }).click();
    await page.locator("#f-carId").selectOption({ label: "Marlin SR2" });
    const carId = await page.inputValue("#f-carId");
    // The first version of the baseline sheet holds the demo generator's car data (app/server/seed/garage.server.ts).
    const setupLabel = (await page.locator("#f-setupId option").allInnerTexts()).find((t) => /baseline · v1$/.test(t))!;
    await page.locator("#f-setupId").selectOption({ label: setupLabel });
    const setupId = await page.inputValue("#f-setupId");
    await page.locator("#f-venueId").selectOption({ label: "Another venue…" });
    await page.fill("#f-venueName", "Kestrel Bank Raceway");
    await page.fill("#f-run", "Practice 2");
    await page.fill("#f-air\\.temp_c", "20");
    await page.fill("#f-air\\.pressure_hpa", "1013.25");
    await page.fill("#f-fuel_l\\.start", "40");
    await page.fill("#f-fuel_l\\.end", "31.5");
    // A field the schema refuses gets its message beside it, and nothing is read or stored.
    await page.fill("#f-air\\.humidity_pct", "140");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.getByText("Humidity must be between 0 and 100 %.").waitFor();
    await shoot(browser, "drop-2-details");
    await page.fill("#f-air\\.humidity_pct", "");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.waitForURL(/\/t\/harrowgate\/sessions\/[0-9a-f-]{36}$/, { timeout: 60_000 });

    // The same file, car file (the Garage's CAR.json export of that setup version), map and options through the CLI.
    const carJson = await browser.context.request.get(`/api/t/harrowgate/cars/${carId}/setups/${setupId}/car.json`);
    expect(carJson.status()).toBe(200);
    const dir = join(SHOTS, "cli");
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, "car.json"), await carJson.text());
    // 40 L and 31.5 L at the car's 0.745 kg/L (the Garage's demo figure): 29.8 kg and 23.4675 kg (computed by us).
    const cli = spawnSync("npm", ["run", "--silent", "analyse", "--", `${LOG}.csv`, "--car", join(dir, "car.json"), "--map", `${LOG}.map.json`,
      "--air-temp-c", "20", "--air-pressure-hpa", "1013.25", "--fuel-start-kg", String(40 * 0.745), "--fuel-end-kg", String(31.5 * 0.745)], { cwd: ROOT, encoding: "utf8" });
    expect(cli.stderr).toBe("");
    const expected = JSON.parse(cli.stdout);
    const figure = async (name: string) => Number(await page.locator(`[data-figure="${name}"]`).first().getAttribute("data-value"));
    expect(await figure("cla_total_m2")).toBe(expected.aero.cla_total_m2);
    expect(await figure("cla_front_m2")).toBe(expected.aero.cla_front_m2);
    expect(await figure("cla_rear_m2")).toBe(expected.aero.cla_rear_m2);
    expect(await figure("balance_front_pct")).toBe(expected.aero.balance_front_pct);
    expect(["read", "checked"]).toContain(await page.getByTestId("session-state").getAttribute("data-state"));
    await shoot(browser, "drop-3-stored");
    storedUrl = new URL(page.url()).pathname;
    expect(pageErrors).toEqual([]);
  });

  it("proposes the saved Logger profile for the same header and offers the stored session for the same file", async () => {
    expect(storedUrl).not.toBe("");
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    await page.setInputFiles('[data-testid="drop-input"]', join(ROOT, `${LOG}.csv`));
    await page.getByText('Logger profile "Marlin data box", saved for this header').waitFor({ timeout: 30_000 });
    await page.getByText("This file is already stored in this team.").waitFor({ timeout: 30_000 });
    expect(await page.getByRole("link", { name: "Open the existing session" }).getAttribute("href")).toBe(storedUrl);
  });

  it("keeps the map and details through a failed upload and a 503, and stores after retries", async () => {
    const page = browser.page;
    const log = "sample-data/logs/vesper-kestrel-tab";
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    // The first upload and the first store meet a server whose database is down (the contract's 503).
    let failUpload = true, failStore = true;
    const down = { status: 503, contentType: "application/json", body: JSON.stringify({ error: "The database is not answering; try again in a minute." }) };
    await page.route("**/api/t/harrowgate/uploads", (route) => (failUpload ? ((failUpload = false), route.fulfill(down)) : route.continue()));
    await page.route("**/api/t/harrowgate/sessions", (route) => (failStore ? ((failStore = false), route.fulfill(down)) : route.continue()));
    await page.setInputFiles('[data-testid="drop-input"]', join(ROOT, `${log}.csv`));
    await page.getByText("Upload failed: The database is not answering; try again in a minute.").waitFor({ timeout: 30_000 });
    await page.getByRole("button", { name: "Retry upload" }).click();
    await page.getByText("Uploaded", { exact: true }).waitFor({ timeout: 30_000 });
    await expect.poll(() => page.inputValue("#map-time-column"), { timeout: 30_000 }).not.toBe("");
    await page.getByRole("button", { name: "Confirm map" }).click();
    await page.locator("#f-carId").selectOption({ label: "Vesper GT4-R" });
    await page.locator("#f-venueId").selectOption({ label: "Another venue…" });
    await page.fill("#f-venueName", "Kestrel Bank Raceway");
    await page.fill("#f-run", "Qualifying sim");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.getByText("The session was not stored: The database is not answering; try again in a minute.").waitFor({ timeout: 60_000 });
    expect(await page.inputValue("#f-run")).toBe("Qualifying sim");
    await shoot(browser, "drop-4-store-failed");
    await page.getByRole("button", { name: "Try storing again" }).click();
    await page.waitForURL(/\/t\/harrowgate\/sessions\/[0-9a-f-]{36}$/, { timeout: 60_000 });
    expect(new URL(page.url()).pathname).not.toBe(storedUrl);
  });

  it("says why a file that is not a text export cannot be read, and cancels a file", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    const dir = join(SHOTS, "cli");
    mkdirSync(dir, { recursive: true });
    const zip = join(dir, "logger-archive.csv");
    const bytes = Buffer.alloc(4096);
    bytes.set([80, 75, 3, 4]); // a ZIP signature (PKWARE APPNOTE) saved with a .csv name
    writeFileSync(zip, bytes);
    await page.setInputFiles('[data-testid="drop-input"]', zip);
    await page.getByText("This file cannot be read: the file is a ZIP archive, not a text export; unpack it and upload the CSV inside.").waitFor({ timeout: 30_000 });
    await shoot(browser, "drop-5-not-text");
    await page.getByRole("button", { name: "Cancel this file" }).click();
    await expect.poll(() => page.locator("[data-file]").count()).toBe(0);
  });

  it("takes several files at once, proposes a sign flip, stores one and moves on to the next", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    const a = "sample-data/logs/marlin-kestrel-semicolon", b = "sample-data/logs/vesper-coldwater-comma";
    await page.setInputFiles('[data-testid="drop-input"]', [join(ROOT, `${a}.csv`), join(ROOT, `${b}.csv`)]);
    await expect.poll(() => page.locator("[data-file]").count()).toBe(2);
    // This log's steering is logged with the other sign (its map.json inverts it); the column names cannot tell,
    // the sign check on the first minutes can (lat_accel, steer and yaw_rate against each other).
    const mapA = JSON.parse(readFileSync(join(ROOT, `${a}.map.json`), "utf8")) as ChannelMap;
    expect(mapA.steer.invert).toBe(true);
    const flip = page.getByRole("button", { name: "Flip steering-wheel angle" });
    await flip.waitFor({ timeout: 30_000 });
    await shoot(browser, "drop-6-proposal");
    await flip.click();
    expect(await page.isChecked("#map-steer-invert")).toBe(true);
    await expect.poll(() => flip.count(), { timeout: 30_000 }).toBe(0);
    await page.getByRole("button", { name: "Confirm map" }).click();
    await page.locator("#f-carId").selectOption({ label: "Marlin SR2" });
    await page.locator("#f-venueId").selectOption({ label: "Another venue…" });
    await page.fill("#f-venueName", "Kestrel Bank Raceway");
    await page.fill("#f-run", "Practice 3");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    // The other file is still waiting: the page stays, says the first is stored and opens the second.
    await page.getByRole("link", { name: "Open its Balance report" }).waitFor({ timeout: 60_000 });
    await expect.poll(() => page.locator('section[aria-label^="Session from"] h2').innerText()).toBe("vesper-coldwater-comma.csv");
    await expect.poll(() => page.inputValue("#map-time-column"), { timeout: 30_000 }).not.toBe("");
    await page.getByRole("button", { name: "Confirm map" }).click();
    // The details typed for the first file are kept for the next one; the car is changed.
    expect(await page.inputValue("#f-run")).toBe("Practice 3");
    await page.locator("#f-carId").selectOption({ label: "Vesper GT4-R" });
    await page.fill("#f-run", "Cold morning");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.waitForURL(/\/t\/harrowgate\/sessions\/[0-9a-f-]{36}$/, { timeout: 60_000 });
  });
});
