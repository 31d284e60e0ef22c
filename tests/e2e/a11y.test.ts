// Accessibility and small screens (issue 12 item 9), in Chromium: axe-core (Deque's WCAG 2.x rule engine,
// installed from npm) over the main pages at desktop and 390 px phone width with 0 serious or critical
// violations; no horizontal scrolling at 390 px; the skip link; required fields marked; the team switcher
// closes on Escape; a dead reset link says so before anyone types. Screenshots go to .data/screens/.
import { mkdirSync, readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, isNull } from "drizzle-orm";
import { db } from "~/server/db.server";
import { cars, setups } from "~/db/schema/garage";
import { DEMO_PASSWORD, DEMO_TEAM, seedUsers } from "~/server/seed/users.server";
import { seedGarage } from "~/server/seed/garage.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";
import { organization, user } from "~/db/schema/auth";
import { createBrief } from "~/server/brief.server";
import { storeDemoSession } from "../server/report-support";
import { saveComparison } from "~/server/report/annotations.server";
import { savedComparisons } from "~/db/schema/report";

const axeSource = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
const SHOTS = ".data/screens";
const team = DEMO_TEAM.slug;

type AxeResult = { passes?: unknown[]; violations: Array<{ id: string; impact: string | null; help: string; nodes: Array<{ target: string[] }> }> };

describe("accessibility and small screens", () => {
  let browser: OpenBrowser;
  let carPath = "";
  let setupPath = "";
  let briefPath = "";
  let reportPath = "";
  let comparePath = "";
  let comparisonBriefPath = "";
  const pageErrors: string[] = [];

  beforeAll(async () => {
    await seedUsers();
    await seedGarage();
    const [car] = await db.select().from(cars).where(and(eq(cars.name, "Marlin SR2"), isNull(cars.createdBy)));
    const [v1] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 1)));
    carPath = `/t/${team}/garage/${car.id}`;
    setupPath = `${carPath}/setups/${v1.id}`;
    const [org] = await db.select().from(organization).where(eq(organization.slug, team));
    const session = await storeDemoSession("marlin-comma", { teamId: org.id, carId: car.id, setupId: v1.id, name: "Kestrel Bank, a11y stint" });
    const [owner] = await db.select().from(user).where(eq(user.email, "demo@harrowgate.example"));
    const brief = await createBrief({ id: org.id, name: org.name }, { id: owner.id, name: owner.name }, { sessionId: session.id, note: "Brake later into turn 3.", days: 14, recipientEmail: null });
    briefPath = `/brief/${brief.token}`;
    const [v2] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 2)));
    const other = await storeDemoSession("marlin-splitter", { teamId: org.id, carId: car.id, setupId: (v2 ?? v1).id, name: "Kestrel Bank, low splitter", sessionDate: "2026-06-02" });
    reportPath = `/t/${team}/sessions/${session.id}`;
    comparePath = `/t/${team}/compare?ids=${session.id},${other.id}`;
    await saveComparison(org.id, owner.id, "Splitter against wing", [session.id, other.id]);
    const [saved] = await db.select().from(savedComparisons).where(eq(savedComparisons.teamId, org.id));
    const comparisonBrief = await createBrief({ id: org.id, name: org.name }, { id: owner.id, name: owner.name }, { comparisonId: saved.id, note: "Turn 7 in both.", days: 14, recipientEmail: null });
    comparisonBriefPath = `/brief/${comparisonBrief.token}`;
    mkdirSync(SHOTS, { recursive: true });
    browser = await openBrowser();
    browser.page.on("pageerror", (e) => pageErrors.push(e.message));
  });

  afterAll(async () => {
    await browser?.close();
  });

  async function audit(path: string, name: string, width: number) {
    const page = browser.page;
    await page.setViewportSize({ width, height: width < 500 ? 844 : 900 });
    const response = await page.goto(path, { waitUntil: "networkidle" });
    expect(response?.status(), path).toBeLessThan(400);
    await page.screenshot({ path: `${SHOTS}/${name}-${width}.png`, fullPage: true });
    // Evaluated through the DevTools protocol, so the page's nonce-based CSP does not apply to axe itself.
    const result = (await page.evaluate(`${axeSource}; axe.run(document, { resultTypes: ["violations"] })`)) as AxeResult;
    expect(result.passes?.length ?? 0, "axe ran its rules").toBeGreaterThan(0);
    const serious = result.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    if (overflow > 0) {
      // Name the widest culprits so a failure says where to look.
      const wide = await page.evaluate(() =>
        [...document.querySelectorAll("body *")]
          .map((el) => ({ el, right: el.getBoundingClientRect().right }))
          .filter((x) => x.right > window.innerWidth + 1)
          .sort((a, b) => b.right - a.right)
          .slice(0, 4)
          .map((x) => `${x.el.tagName.toLowerCase()}.${String(x.el.className).slice(0, 60)} → ${Math.round(x.right)} px`),
      );
      console.log(`  wider than the screen on ${path}: ${wide.join(" | ")}`);
    }
    const hasMain = await page.evaluate(() => Boolean(document.getElementById("main")));
    console.log(
      `tried: axe on ${path} at ${width} px; held: ${serious.length} serious/critical (${result.violations.length} in all), ` +
        `horizontal overflow ${overflow} px, #main ${hasMain ? "present" : "missing"}`,
    );
    return { serious, overflow, hasMain };
  }

  const signedOut = [
    ["/", "landing"],
    ["/sign-in", "sign-in"],
    ["/sign-up", "sign-up"],
    ["/forgot-password", "forgot-password"],
  ] as const;

  it("signed-out pages: 0 serious violations, no sideways scroll at 390 px, a skip link to #main", async () => {
    for (const [path, name] of [...signedOut, [briefPath, "brief"] as const, [comparisonBriefPath, "brief-comparison"] as const]) {
      for (const width of [1280, 390]) {
        const r = await audit(path, name, width);
        expect(r.serious.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).join(", ")})`), path).toEqual([]);
        expect(r.hasMain, path).toBe(true);
        if (width === 390) expect(r.overflow, path).toBeLessThanOrEqual(0);
      }
    }
    const page = browser.page;
    await page.goto("/sign-in", { waitUntil: "networkidle" });
    await page.keyboard.press("Tab");
    const focused = await page.evaluate(() => ({ text: document.activeElement?.textContent, href: document.activeElement?.getAttribute("href") }));
    expect(focused).toEqual({ text: "Skip to the page's content", href: "#main" });
    // Required fields say so to assistive technology (WCAG 2.1 SC 3.3.2).
    expect(await page.locator("#f-email").getAttribute("required")).not.toBeNull();
    expect(await page.locator("#f-password").getAttribute("required")).not.toBeNull();
  });

  it("a reset link that no longer works says so before anything is typed", async () => {
    const page = browser.page;
    await page.goto("/reset-password?token=not-a-live-token", { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "This reset link no longer works" }).waitFor();
    expect(await page.locator("input[type=password]").count()).toBe(0);
    console.log("tried: /reset-password with a dead token; held: the page says so and shows no password fields");
  });

  it("signed-in main pages: 0 serious violations; car page, setup table and team settings fit 390 px", async () => {
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", {
      headers: { origin: baseURL },
      data: { email: "demo@harrowgate.example", password: DEMO_PASSWORD },
    });
    expect(signIn.status()).toBe(200);
    const pages: Array<[string, string, boolean]> = [
      [`/t/${team}`, "dashboard", false],
      [`/t/${team}/garage`, "garage", false],
      [carPath, "car", true],
      [setupPath, "setup", true],
      [`${setupPath}/edit`, "setup-edit", false],
      [`/t/${team}/garage/import`, "import", false],
      [`/t/${team}/settings`, "settings", true],
      [`/t/${team}/audit`, "audit", false],
      [`/t/${team}/briefs`, "briefs", true],
      [`/t/${team}/sessions`, "sessions", false],
      [reportPath, "report", true],
      [comparePath, "compare", true],
      ["/account", "account", false],
    ];
    const problems: string[] = [];
    for (const [path, name, mustFit] of pages) {
      for (const width of [1280, 390]) {
        const r = await audit(path, name, width);
        for (const v of r.serious) problems.push(`${path} @${width}: ${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).join(", ")})`);
        if (!r.hasMain) problems.push(`${path}: no #main for the skip link`);
        if (width === 390 && mustFit && r.overflow > 0) problems.push(`${path} @390: scrolls sideways by ${r.overflow} px`);
      }
    }
    expect(problems).toEqual([]);
  });

  it("the team switcher closes on Escape and gives focus back to its button", async () => {
    const page = browser.page;
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`/t/${team}/garage`, { waitUntil: "networkidle" });
    const switcher = page.locator("header details").first();
    await switcher.locator("summary").click();
    expect(await switcher.getAttribute("open")).not.toBeNull();
    await page.keyboard.press("Escape");
    expect(await switcher.getAttribute("open")).toBeNull();
    expect(await page.evaluate(() => document.activeElement?.tagName)).toBe("SUMMARY");
    expect(pageErrors).toEqual([]);
    console.log("tried: open the team switcher, press Escape; held: closed, focus on its summary");
  });
});
