// The Balance report in Chromium, at desk and phone width: the headline figures carry the summary of
// record's values (data-figure contract), the verdict and the side view are drawn.
import { mkdirSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
import { seedGarage } from "~/server/seed/garage.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";
import { demoMarlin, storeDemoSession } from "../server/report-support";
import { REANALYSIS_QUEUED_DETAIL } from "~/lib/sessions/status-words";

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
  it("an engineer saves a comparison and makes a Brief link to it; the link opens signed out with both sessions' headlines and the overlay drawn", async () => {
    const page = browser.page;
    const engineer = await browser.context.request.post("/api/auth/sign-in/email", { headers: { origin: baseURL }, data: { email: "engineer@harrowgate.example", password: DEMO_PASSWORD } });
    expect(engineer.status()).toBe(200);
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`/t/harrowgate/compare?ids=${sessionId},${splitterId}`, { waitUntil: "networkidle" });
    await page.fill('input[name="name"]', "Splitter against wing");
    await page.getByRole("button", { name: "Save comparison" }).click();
    await page.getByText("Saved as “Splitter against wing”.").waitFor();
    await page.reload({ waitUntil: "networkidle" });
    await page.getByRole("link", { name: "Brief link for Splitter against wing" }).click();
    await page.waitForURL(/\/t\/harrowgate\/briefs\?comparison=/);
    expect(await page.locator('select[name="subject"]').inputValue()).toMatch(/^comparison:/);
    await page.fill('textarea[name="note"]', "Turn 7 in both runs.");
    await page.getByRole("button", { name: "Make the link" }).click();
    const link = await page.getByTestId("brief-link").innerText();
    expect(link).toMatch(/\/brief\/[A-Za-z0-9_-]{43}$/);
    // Opened by someone who is not signed in: a fresh context without the team's cookies.
    const outsider = await browser.context.browser()!.newContext({ baseURL });
    const driverPage = await outsider.newPage();
    const errors: string[] = [];
    driverPage.on("pageerror", (e) => errors.push(e.message));
    const opened = await driverPage.goto(new URL(link).pathname, { waitUntil: "networkidle" });
    expect(opened?.status()).toBe(200);
    expect(opened?.headers()["x-robots-tag"]).toBe("noindex, nofollow");
    expect(await driverPage.getByTestId("brief-comparison-name").innerText()).toBe("Splitter against wing");
    expect(await driverPage.getByTestId("brief-headline").count()).toBe(2);
    expect(await driverPage.getByText("Turn 7 in both runs.").count()).toBe(1);
    await driverPage.waitForSelector('figure[data-drawn="yes"] canvas');
    for (const write of ["Re-analyse", "Delete session…", "Add note", "Save comparison"]) expect(await driverPage.getByRole("button", { name: write }).count(), write).toBe(0);
    await driverPage.screenshot({ path: `${SHOTS}/brief-comparison-1280.png`, fullPage: true });
    await driverPage.setViewportSize({ width: 390, height: 844 });
    await driverPage.screenshot({ path: `${SHOTS}/brief-comparison-390.png`, fullPage: true });
    expect(errors).toEqual([]);
    await outsider.close();
  });

  it("the owner re-analyses, edits and deletes a note, makes a Brief link from the report, and deletes the session after confirming", async () => {
    const page = browser.page;
    const owner = await browser.context.request.post("/api/auth/sign-in/email", { headers: { origin: baseURL }, data: { email: "demo@harrowgate.example", password: DEMO_PASSWORD } });
    expect(owner.status()).toBe(200);
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`/t/harrowgate/sessions/${splitterId}`, { waitUntil: "networkidle" });
    // Re-analyse: posted without a reload; the page shows the job waiting (the demo session has no raw
    // file, so the worker cannot finish it; the state stays queued or running).
    await page.getByRole("button", { name: "Re-analyse" }).click();
    await page.getByTestId("job-state").waitFor();
    expect(await page.getByTestId("job-state").innerText()).toMatch(/Re-analysis (queued|running) since/);
    // The job's state is said once: the processing panel does not repeat the queued detail beside the box.
    expect(await page.getByText(REANALYSIS_QUEUED_DETAIL).count()).toBe(0);
    expect(await page.getByRole("button", { name: "Queued" }).isDisabled()).toBe(true);
    // A note: added, edited, deleted, all without a reload.
    await page.fill('input[name="body"]', "Understeer in the long right-hander");
    await page.getByRole("button", { name: "Add note" }).click();
    const notes = page.getByTestId("notes");
    await notes.getByText("Understeer in the long right-hander").waitFor();
    await notes.getByRole("button", { name: "Edit the note on whole session" }).click();
    await notes.locator('input[name="body"]').fill("Understeer in the long right-hander, worse on new tyres");
    await notes.getByRole("button", { name: "Save note" }).click();
    await notes.getByText("worse on new tyres").waitFor();
    await page.screenshot({ path: `${SHOTS}/report-owner-1280.png`, fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.screenshot({ path: `${SHOTS}/report-owner-390.png`, fullPage: true });
    await page.setViewportSize({ width: 1280, height: 900 });
    await notes.getByRole("button", { name: "Delete the note on whole session" }).click();
    await notes.getByRole("button", { name: "Delete this note" }).click();
    await page.getByText("worse on new tyres").waitFor({ state: "detached" });
    // Brief link: the Brief links page opens with this session chosen.
    await page.getByRole("link", { name: "Brief link…" }).click();
    await page.waitForURL(/\/t\/harrowgate\/briefs\?session=/);
    expect(await page.locator('select[name="subject"]').inputValue()).toBe(`session:${splitterId}`);
    // Delete: two steps; the box must be ticked; then the Sessions list says so and the report is gone.
    await page.goto(`/t/harrowgate/sessions/${splitterId}`, { waitUntil: "networkidle" });
    await page.getByRole("button", { name: "Delete session…" }).click();
    const confirm = page.locator('input[name="confirm"]');
    expect(await confirm.evaluate((el) => (el as HTMLInputElement).required)).toBe(true);
    await page.screenshot({ path: `${SHOTS}/report-delete-1280.png` });
    await confirm.check();
    await Promise.all([page.waitForURL(/\/t\/harrowgate\/sessions\?deleted=/), page.getByRole("button", { name: "Delete for good" }).click()]);
    await page.getByText("The session was deleted with its raw file.").waitFor();
    const gone = await page.goto(`/t/harrowgate/sessions/${splitterId}`);
    expect(gone?.status()).toBe(404);
    expect(pageErrors.join("\n")).toBe("");
  });

  it("an analyst sees no re-analyse, delete or Brief link button, and may edit only their own note", async () => {
    const page = browser.page;
    const analyst = await browser.context.request.post("/api/auth/sign-in/email", { headers: { origin: baseURL }, data: { email: "analyst@harrowgate.example", password: DEMO_PASSWORD } });
    expect(analyst.status()).toBe(200);
    await page.goto(`/t/harrowgate/sessions/${sessionId}`, { waitUntil: "networkidle" });
    for (const name of ["Re-analyse", "Delete session…"]) expect(await page.getByRole("button", { name, exact: true }).count(), name).toBe(0);
    expect(await page.getByRole("link", { name: "Brief link…" }).count()).toBe(0);
    // The analyst wrote the hairpin note in the first test: that one, and only that one, can be edited.
    // Each button names its note (WCAG 2.5.3: the visible word starts the accessible name).
    const editable = page.getByTestId("notes").locator("li", { has: page.getByRole("button", { name: /^Edit the note on / }) });
    expect(await editable.count()).toBe(1);
    expect(await editable.innerText()).toContain("Front locking into the hairpin");
  });
});
