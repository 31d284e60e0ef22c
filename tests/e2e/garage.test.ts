// The Garage in Chromium, the way a new engineer uses it: a car from scale readings, a setup typed in
// imperial units, a new version, and the CAR.json download that the engine's car validation accepts.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { validateCar } from "~/engine/car";
import { DEMO_PASSWORD, seedUsers } from "~/server/seed/users.server";
import { baseURL, openBrowser, type OpenBrowser } from "./helpers/browser";

describe("Garage in the browser", () => {
  let browser: OpenBrowser;
  const pageErrors: string[] = [];

  beforeAll(async () => {
    await seedUsers();
    browser = await openBrowser();
    browser.page.on("pageerror", (e) => pageErrors.push(e.message));
    // better-auth's e-mail sign-in endpoint; a browser sends its Origin with the POST.
    const signIn = await browser.context.request.post("/api/auth/sign-in/email", {
      headers: { origin: baseURL },
      data: { email: "engineer@harrowgate.example", password: DEMO_PASSWORD },
    });
    expect(signIn.status()).toBe(200);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("creates a car from corner weights, versions an imperial setup and downloads its CAR.json", async () => {
    const page = browser.page;
    await page.goto("/t/harrowgate/garage/new", { waitUntil: "networkidle" });
    const name = `Scales car ${Date.now().toString(36)}`;
    await page.fill("#f-name", name);
    await page.fill("#f-wheelbaseMm", "2450");
    await page.fill("#f-cogHeightMm", "400");
    await page.fill("#f-steeringRatio", "12");
    for (const [corner, kg] of [["Fl", "150"], ["Fr", "155"], ["Rl", "160"], ["Rr", "155"]]) await page.fill(`#f-corner${corner}Kg`, kg);
    // Hand-computed: total 620 kg; front (150 + 155) / 620 = 49.19 %; cross (155 + 160) / 620 = 50.81 %;
    // CoG behind the front axle = 2450 × 315 / 620 = 1244.76 mm (moment balance, common practice).
    const summary = await page.locator("dl[aria-live]").innerText();
    expect(summary).toContain("620.0 kg");
    expect(summary).toContain("49.19 %");
    expect(summary).toContain("50.81 %");
    expect(summary).toContain("1245 mm");

    // Switching units converts what is typed (NIST SP 811: 2450 mm / 25.4 = 96.4567 in).
    await page.getByText("in · lb · lbf/in").click();
    expect(await page.inputValue("#f-wheelbaseMm")).toBe("96.4567");
    // The draft survives a reload (kept in localStorage for this form).
    await page.reload({ waitUntil: "networkidle" });
    // The draft is put back once the page has hydrated, which may come after network idle on a busy machine.
    await expect.poll(() => page.inputValue("#f-name")).toBe(name);
    expect(await page.inputValue("#f-wheelbaseMm")).toBe("96.4567");
    await page.getByRole("button", { name: "Create car" }).click();
    await page.waitForURL(/\/garage\/[0-9a-f-]{36}$/);
    await page.getByRole("heading", { name }).waitFor();
    await expect(page.getByText("Cross weight (FR + RL) / total").count()).resolves.toBe(1);

    await page.getByRole("link", { name: "New setup" }).click();
    await page.waitForURL(/\/setups\/new$/);
    await page.waitForLoadState("networkidle");
    await page.getByText("in · lb · lbf/in").click();
    await page.fill("#f-name", "Kestrel Bank, imperial sheet");
    await page.fill("#f-frontSpringRateNPerMm", "600");
    await page.fill("#f-rearSpringRateNPerMm", "700");
    await page.fill("#f-frontMotionRatio", "7");
    await page.locator("#f-frontMotionRatio").blur();
    await expect(page.locator("#f-frontMotionRatio-msg").innerText()).resolves.toMatch(/motion ratio of 7 looks like a typing error/);
    await page.fill("#f-frontMotionRatio", "0.9");
    await page.fill("#f-rearMotionRatio", "0.8");
    await page.fill("#f-rearWingAngleDeg", "8");
    await page.getByRole("button", { name: "Create setup" }).click();
    await page.waitForURL(/\/setups\/[0-9a-f-]{36}$/);

    await page.getByRole("link", { name: "Edit" }).click();
    await page.waitForURL(/\/edit$/);
    await page.waitForLoadState("networkidle");
    await page.fill("#f-rearWingAngleDeg", "11");
    await page.fill("#f-changeNote", "More rear wing");
    await page.getByRole("button", { name: "Save as new version" }).click();
    await page.waitForURL(/saved=v2/);
    await page.getByText(/Saved as v2; the version you edited is kept unchanged/).waitFor();
    // Editing v2 starts with an empty change note: the next version's note is its own (issue 12 item 4).
    await page.getByRole("link", { name: "Edit" }).click();
    await page.waitForURL(/\/edit$/);
    await page.waitForLoadState("networkidle");
    expect(await page.inputValue("#f-changeNote")).toBe("");
    await page.goBack();
    await page.waitForURL(/saved=v2/);

    const [download] = await Promise.all([page.waitForEvent("download"), page.getByText("Download CAR.json").click()]);
    const car = JSON.parse(readFileSync((await download.path())!, "utf8"));
    expect(() => validateCar(car)).not.toThrow();
    expect(car.name).toBe(name);
    // Typed in mm and switched to inches unchanged: stored exactly as typed.
    expect(car.wheelbase_mm).toBe(2450);
    expect(car.mass_kg).toBe(620);
    // NIST SP 811: 600 lbf/in × 0.17512683524648 = 105.0761 N/mm
    expect(car.front.spring_rate_n_per_mm).toBeCloseTo(105.0761, 4);
    expect(Object.keys(car)).toEqual(["name", "wheelbase_mm", "mass_kg", "static_front_weight_pct", "cog_height_mm", "steering_ratio", "front", "rear", "garage"]);
    // The Garage's own fields travel in the garage block (issue 12 item 4): the setup name and the v2 change note.
    expect(car.garage).toMatchObject({ setup_name: "Kestrel Bank, imperial sheet", rear_wing_angle_deg: 11, change_note: "More rear wing" });
    expect(pageErrors).toEqual([]);
  });
});
