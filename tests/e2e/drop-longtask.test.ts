// The page stays responsive while a large export is dropped, mapped and read. Two records of the
// page's main thread, from the drop to the end of the read:
// - a long-task observer (the Long Tasks API: tasks of 50 ms or more, wall-clock time), printed;
// - Chromium's own trace of the same thread (DevTools protocol, "toplevel" RunTask events), whose
//   thread time (`tdur`) is the CPU the page's code spent in each task.
// No task may take over 100 ms of main-thread time. Wall-clock durations also count the time the
// thread waited for a core, which on a shared 2-core machine running several test suites can be
// many times the work itself: RAKELINE_LONGTASK_WALL=1 asserts the 100 ms on them too (a quiet machine).
// The export is written by scripts/bench-browser.mjs (a demo log cut into a seamless loop);
// RAKELINE_LONGTASK_MB sets its size (default 500 MB).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { statSync } from "node:fs";
import { seedGarage } from "~/server/seed/garage.server";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
// @ts-expect-error a plain-JS script without type declarations
import { largeExport } from "../../scripts/bench-browser.mjs";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

const MB = Number(process.env.RAKELINE_LONGTASK_MB || 500);
const WALL = process.env.RAKELINE_LONGTASK_WALL === "1";

interface TraceEvent { name: string; cat?: string; ph: string; pid: number; tid: number; ts: number; dur?: number; tdur?: number; args?: { name?: string } }

describe("Drop a log stays responsive on a large export", () => {
  let browser: OpenBrowser;
  let file: string;

  beforeAll(async () => {
    await seedUsers();
    await seedGarage();
    file = ((await largeExport(MB)) as { file: string }).file;
    browser = await openBrowser();
    await browser.context.addInitScript(() => {
      const w = window as unknown as { __longTasks: { start: number; duration: number }[] };
      w.__longTasks = [];
      new PerformanceObserver((list) => {
        for (const e of list.getEntries()) w.__longTasks.push({ start: e.startTime, duration: e.duration });
      }).observe({ type: "longtask", buffered: true });
    });
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", {
      headers: { origin: baseURL },
      data: { email: "engineer@harrowgate.example", password: DEMO_PASSWORD },
    });
    expect(signIn.status()).toBe(200);
  }, 600_000);

  afterAll(async () => {
    await browser?.close();
  });

  it(`has no main-thread task over 100 ms from the drop to the end of the read (${MB} MB export)`, async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    await page.locator('[data-testid="drop-input"]').waitFor({ state: "attached" });
    const cdp = await browser.context.newCDPSession(page);
    const events: TraceEvent[] = [];
    cdp.on("Tracing.dataCollected", (e) => { events.push(...(e.value as unknown as TraceEvent[])); });
    const traced = new Promise<void>((resolve) => cdp.once("Tracing.tracingComplete", () => resolve()));
    await cdp.send("Tracing.start", { transferMode: "ReportEvents", traceConfig: { includedCategories: ["toplevel", "__metadata", "blink.user_timing"] } });
    const from = await page.evaluate(() => performance.mark("test:drop").startTime);
    await page.setInputFiles('[data-testid="drop-input"]', file);
    await expect.poll(() => page.inputValue("#map-time-column"), { timeout: 60_000 }).not.toBe("");
    const tMap = await page.evaluate(() => performance.now());
    await page.getByRole("button", { name: "Confirm map" }).click();

    await page.locator("#f-carId").selectOption({ label: "Marlin SR2" });
    await page.locator("#f-venueId").selectOption({ label: "Another venue…" });
    await page.fill("#f-venueName", "Kestrel Bank Raceway");
    const tRead = await page.evaluate(() => performance.now());
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.getByText("Reading (in this browser)").waitFor({ timeout: 60_000 });
    // The window closes at the page's own mark for the end of the read (User Timing), before the
    // upload's end and the Balance report the page then opens.
    await expect.poll(() => page.evaluate(() => performance.getEntriesByName("rakeline:read-end").length), { timeout: 600_000, interval: 250 }).toBeGreaterThan(0);
    const to = await page.evaluate(() => performance.getEntriesByName("rakeline:read-end")[0].startTime);
    const readS = (to - (await page.evaluate(() => performance.getEntriesByName("rakeline:read-start")[0].startTime))) / 1000;
    await cdp.send("Tracing.end");
    await traced;
    // The page's main thread is the renderer thread named CrRendererMain (a worker runs on its own thread).
    const mains = new Set(events.filter((e) => e.ph === "M" && e.name === "thread_name" && e.args?.name === "CrRendererMain").map((e) => `${e.pid}:${e.tid}`));
    const markTs = (name: string) => events.find((e) => e.name === name && e.cat?.includes("user_timing"))?.ts;
    const [fromTs, toTs] = [markTs("test:drop"), markTs("rakeline:read-end")];
    expect(fromTs).toBeDefined();
    expect(toTs).toBeGreaterThan(fromTs!);
    const runs = events.filter((e) => e.ph === "X" && mains.has(`${e.pid}:${e.tid}`) && /RunTask/.test(e.name) && e.tdur !== undefined && e.ts >= fromTs! && e.ts <= toTs!);
    expect(runs.length).toBeGreaterThan(100);
    const cpuMs = runs.map((e) => e.tdur! / 1000).sort((a, b) => b - a);
    console.log(`main-thread tasks traced: ${runs.length}; most CPU in one task ${cpuMs[0].toFixed(1)} ms (next ${cpuMs.slice(1, 4).map((x) => x.toFixed(1)).join(", ")} ms)`);
    const tasks = await page.evaluate((t0) => (window as unknown as { __longTasks: { start: number; duration: number }[] }).__longTasks.filter((t) => t.start >= t0[0] && t.start <= t0[1]), [from, to]);
    // When each long task came (ms after the drop) against the map's arrival and the read's start, for the log.
    console.log(`map shown at ${Math.round(tMap - from)} ms, read started at ${Math.round(tRead - from)} ms; long tasks [start, ms]: ${JSON.stringify(tasks.map((t) => [Math.round(t.start - from), Math.round(t.duration)]))}`);
    const longest = tasks.reduce((m, t) => Math.max(m, t.duration), 0);
    const mb = statSync(file).size / 1e6;
    console.log(`long tasks: ${tasks.length} of 50 ms or more, longest ${longest.toFixed(0)} ms; read ${mb.toFixed(0)} MB in ${readS.toFixed(1)} s (${(mb / readS).toFixed(1)} MB/s, with the upload running)`);
    await page.waitForURL(/\/t\/harrowgate\/sessions\/[0-9a-f-]{36}$/, { timeout: 300_000 });
    expect(cpuMs.filter((ms) => ms > 100)).toEqual([]);
    if (WALL) expect(tasks.filter((t) => t.duration > 100)).toEqual([]);
  }, 900_000);

  it("shows the read's progress, stops it on request and reads again; the same file then offers its stored session", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/sessions/new", { waitUntil: "networkidle" });
    await page.setInputFiles('[data-testid="drop-input"]', file);
    await expect.poll(() => page.inputValue("#map-time-column"), { timeout: 60_000 }).not.toBe("");
    await page.getByRole("button", { name: "Confirm map" }).click();
    await page.locator("#f-carId").selectOption({ label: "Marlin SR2" });
    await page.locator("#f-venueId").selectOption({ label: "Another venue…" });
    await page.fill("#f-venueName", "Kestrel Bank Raceway");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    await page.getByRole("button", { name: "Stop reading" }).waitFor({ timeout: 60_000 });
    await page.screenshot({ path: ".data/shots/drop-7-reading-1280.png", fullPage: true });
    await page.getByRole("button", { name: "Stop reading" }).click();
    await page.getByText("Reading cancelled. Your map and details are kept.").waitFor();
    expect(await page.inputValue("#f-venueName")).toBe("Kestrel Bank Raceway");
    await page.getByRole("button", { name: "Read and store the session" }).click();
    // The first test stored this file: the server answers with that session instead of a second one.
    await page.getByText("This file was already stored in this team as a session.").waitFor({ timeout: 300_000 });
    await page.setViewportSize({ width: 390, height: 900 });
    await page.screenshot({ path: ".data/shots/drop-8-already-stored-390.png", fullPage: true });
  }, 900_000);
});
