// The Balance report in Chromium, at desk and phone width: the headline figures carry the summary of
// record's values (data-figure contract), the verdict and the side view are drawn.
import { mkdirSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
import { seedGarage } from "~/server/seed/garage.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";
import { demoMarlin, storeDemoSession } from "../server/report-support";

const SHOTS = ".data/screenshots";

describe("Balance report in the browser", () => {
  let browser: OpenBrowser;
  const pageErrors: string[] = [];
  let sessionId: string;
  let splitterId: string;
  let summary: Awaited<ReturnType<typeof storeDemoSession>>["summary"];

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    await seedUsers();
    await seedGarage();
    const m = await demoMarlin();
    ({ id: sessionId, summary } = await storeDemoSession("marlin-comma", { teamId: m.team.id, carId: m.car.id, setupId: m.setupIds[0], name: "Kestrel Bank FP1" }));
    splitterId = (await storeDemoSession("marlin-splitter", { teamId: m.team.id, carId: m.car.id, setupId: m.setupIds[1], name: "Low splitter", sessionDate: "2026-06-02" })).id;
    browser = await openBrowser();
    browser.page.on("pageerror", (e) => pageErrors.push(e.message));
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", { headers: { origin: baseURL }, data: { email: "analyst@harrowgate.example", password: DEMO_PASSWORD } });
    expect(signIn.status()).toBe(200);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("shows the headline figures of the summary of record, the verdict and the side view", async () => {
    const page = browser.page;
    await page.goto(`/t/harrowgate/sessions/${sessionId}`, { waitUntil: "networkidle" });
    expect(pageErrors.join("\n")).toBe("");
    const value = async (figure: string) => Number(await page.locator(`[data-figure="${figure}"]`).getAttribute("data-value"));
    expect(await value("cla_total_m2")).toBe(summary.aero.cla_total_m2);
    expect(await value("cla_front_m2")).toBe(summary.aero.cla_front_m2);
    expect(await value("cla_rear_m2")).toBe(summary.aero.cla_rear_m2);
    expect(await value("balance_front_pct")).toBe(summary.aero.balance_front_pct);
    expect(await page.getByTestId("session-state").first().getAttribute("data-state")).toBe("checked");
    expect(await page.getByTestId("verdict").innerText()).toMatch(/balance|Balance/);
    expect(await page.locator('[data-chart="side-view"] [data-symbol="cop"]').count()).toBeGreaterThan(1);
    // Charts: a canvas with something drawn on it in each, and the draw time of the largest.
    await page.waitForFunction(() => document.querySelectorAll('[data-testid="report-charts"] figure[data-drawn="yes"]').length >= 8, null, { timeout: 15_000 });
    const charts = await page.$$eval('[data-testid="report-charts"] figure[data-drawn="yes"]', (figs) =>
      figs.map((f) => {
        const canvas = f.querySelector("canvas")!;
        const px = canvas.getContext("2d")!.getImageData(0, 0, canvas.width, canvas.height).data;
        let inked = 0;
        for (let i = 3; i < px.length; i += 4) if (px[i] > 0) inked++;
        return { title: f.getAttribute("data-chart-title"), inked, area: canvas.width * canvas.height, drawMs: Number(f.getAttribute("data-draw-ms")) };
      }),
    );
    for (const c of charts) expect(c.inked, c.title!).toBeGreaterThan(200);
    const largest = charts.reduce((a, b) => (b.area > a.area ? b : a));
    console.log(`[report] largest chart "${largest.title}" (${largest.area} px): drawn ${largest.drawMs.toFixed(1)} ms after its data arrived`);
    // PNG of a chart: a download whose bytes start with the PNG signature (ISO/IEC 15948 §5.2).
    const [download] = await Promise.all([page.waitForEvent("download"), page.locator('figure[data-chart-title="Balance against speed (95 % whiskers)"] button', { hasText: "Save PNG" }).click()]);
    expect(download.suggestedFilename()).toMatch(/^balance-.+\.png$/);
    const { readFileSync } = await import("node:fs");
    const bytes = readFileSync((await download.path())!);
    expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    // A note on a band, added without a reload, is listed at once.
    await page.selectOption('select[name="band"]', "160-200");
    await page.fill('input[name="body"]', "Front locking into the hairpin");
    await page.getByRole("button", { name: "Add note" }).click();
    await page.getByTestId("notes").getByText("Front locking into the hairpin").waitFor();
    await page.screenshot({ path: `${SHOTS}/report-1280.png`, fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    // At phone width every chart shrinks to the page (the ResizeObserver resizes the canvas).
    await page.waitForFunction(() => [...document.querySelectorAll('[data-testid="report-charts"] canvas')].every((c) => c.getBoundingClientRect().right <= 390));
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: `${SHOTS}/report-390-top.png` });
    await page.screenshot({ path: `${SHOTS}/report-390.png`, fullPage: true });
    await page.setViewportSize({ width: 1280, height: 800 });
    expect(pageErrors.join("\n")).toBe("");
  });

  it("compares two sessions from different days: deltas flagged clear, setup changes listed, the overlay drawn", async () => {
    const page = browser.page;
    await page.goto(`/t/harrowgate/compare?ids=${sessionId},${splitterId}`, { waitUntil: "networkidle" });
    expect(pageErrors.join("\n")).toBe("");
    await page.waitForSelector('figure[data-drawn="yes"] canvas');
    expect(await page.locator('[data-testid="pivot"] td[data-clear="yes"]').count()).toBeGreaterThan(0);
    expect(await page.getByTestId("setup-changes").innerText()).toMatch(/Rear wing angle/);
    expect(await page.getByTestId("comparison").innerText()).toContain("Front locking into the hairpin");
    await page.screenshot({ path: `${SHOTS}/compare-1280.png`, fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.screenshot({ path: `${SHOTS}/compare-390.png`, fullPage: true });
    await page.setViewportSize({ width: 1280, height: 800 });
    // The picker: unticking one session and comparing again navigates without a full reload.
    await page.goto(`/t/harrowgate/compare`, { waitUntil: "networkidle" });
    await page.locator(`input[name="ids"][value="${sessionId}"]`).check();
    await page.locator(`input[name="ids"][value="${splitterId}"]`).check();
    await page.getByRole("button", { name: "Compare selected" }).click();
    await page.waitForSelector('[data-testid="comparison"]');
    expect(page.url()).toContain(sessionId);
    expect(pageErrors.join("\n")).toBe("");
  });

  it("prints on one A4 page", async () => {
    const page = browser.page;
    await page.goto(`/t/harrowgate/sessions/${sessionId}`, { waitUntil: "networkidle" });
    await page.emulateMedia({ media: "print" });
    const pdf = await page.pdf({ format: "A4", printBackground: true, preferCSSPageSize: true, path: `${SHOTS}/report-print.pdf` });
    await page.emulateMedia({ media: "screen" });
    // Each page of a PDF is one "/Type /Page" object (ISO 32000-1 §7.7.3.3); "/Type /Pages" is the tree.
    const pages = pdf.toString("latin1").match(/\/Type\s*\/Page(?!s)/g) ?? [];
    expect(pages.length).toBe(1);
  });
});
