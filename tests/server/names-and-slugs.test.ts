// The probe: an imported car name of 80 characters plus a trailing no-break space was checked trimmed but
// stored raw, and MariaDB refused it (a 500 showing SQL); names over 255 characters gave 500s on
// better-auth's update-user and organization-create; its organization routes took slugs such as
// "a/../../sign-out", and the team switcher followed them. Text is now NFC-normalised and trimmed before it
// is checked and stored, and better-auth's hooks apply the app's own schemas for names, slugs and roles.
import { readFileSync } from "node:fs";
import { renderToString } from "react-dom/server";
import { createElement } from "react";
import { createMemoryRouter, RouterProvider } from "react-router";
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { APIError } from "better-auth/api";
import { db } from "~/server/db.server";
import { cars } from "~/db/schema/garage";
import { organization, user } from "~/db/schema/auth";
import { auth } from "~/server/auth.server";
import { AppShell } from "~/components/ui/shell";
import { teamPath } from "~/lib/team-schemas";
import * as importPage from "~/routes/garage/import";
import * as accountRoute from "~/routes/account/account";
import { appUrl, args, formRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

const headersOf = (jar: { header(): string }) => new Headers({ cookie: jar.header(), origin: appUrl });

/** The status better-auth answers with: 200 when the call returns, else the APIError's. */
async function statusOf(call: () => Promise<unknown>): Promise<{ status: number; message: string }> {
  try {
    await call();
    return { status: 200, message: "" };
  } catch (error) {
    if (error instanceof APIError) return { status: error.statusCode, message: String((error.body as { message?: string })?.message ?? "") };
    throw error;
  }
}

describe("names are normalised before they are checked and stored", () => {
  it("imports a car named with 80 characters and a trailing no-break space, storing the 80", async () => {
    const file = JSON.parse(readFileSync("sample-data/cars/marlin-sr2.json", "utf8"));
    const name = "M".repeat(79) + "é";
    // Unicode UAX #15: "e" + U+0301 COMBINING ACUTE composes to U+00E9 under NFC.
    file.name = `${"M".repeat(79)}e\u0301\u00a0`;
    const form = new FormData();
    form.set("text", JSON.stringify(file));
    form.set("setupName", "  Kestrel Bank dry\u00a0 ");
    const request = new Request(`${appUrl}/t/${w.team.slug}/garage/import`, { method: "POST", headers: headersOf(w.jars.engineer), body: form });
    const result = await outcome(() => importPage.action(args(request, { teamSlug: w.team.slug })));
    expect(result.status).toBe(302);
    const carId = result.location!.split("/")[4];
    const [row] = await db.select({ name: cars.name }).from(cars).where(eq(cars.id, carId));
    expect(row.name).toBe(name);
    expect(row.name.length).toBe(80);
  });

  it("refuses a 300-character user name with a 400 naming the limit, on the form and on better-auth's endpoint", async () => {
    const long = "N".repeat(300);
    const viaForm = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "profile", name: long }, w.jars.analyst))));
    expect(viaForm.status).toBe(400);
    expect((viaForm.body as { errors: { name: string } }).errors.name).toMatch(/at most 100 characters/);
    const viaApi = await statusOf(() => auth.api.updateUser({ body: { name: long }, headers: headersOf(w.jars.analyst) }));
    // RFC 9110 §15.5.1: 400 Bad Request (not 500).
    expect(viaApi.status).toBe(400);
    expect(viaApi.message).toMatch(/at most 100 characters/);
    const stored = await auth.api.updateUser({ body: { name: "  Priya\u00a0Holloway " }, headers: headersOf(w.jars.analyst) });
    expect(stored.status).toBe(true);
    const [row] = await db.select({ name: user.name }).from(user).where(eq(user.id, w.userIds.analyst));
    expect(row.name).toBe("Priya\u00a0Holloway");
  });

  it("refuses a 300-character team name and path-like slugs on better-auth's organization routes", async () => {
    const tooLong = await statusOf(() => auth.api.createOrganization({ body: { name: "T".repeat(300), slug: "long-name-team" }, headers: headersOf(w.jars.driver) }));
    expect(tooLong.status).toBe(400);
    expect(tooLong.message).toMatch(/at most 80 characters/);
    for (const slug of ["a/../../sign-out", "A B", "x", "-lead", "ok--no"]) {
      const result = await statusOf(() => auth.api.createOrganization({ body: { name: "Slug Probe", slug }, headers: headersOf(w.jars.driver) }));
      expect(result.status, slug).toBe(400);
    }
    const rename = await statusOf(() =>
      auth.api.updateOrganization({ body: { organizationId: w.team.id, data: { slug: "a/../../sign-out" } }, headers: headersOf(w.jars.owner) }),
    );
    expect(rename.status).toBe(400);
    const [team] = await db.select({ slug: organization.slug }).from(organization).where(eq(organization.id, w.team.id));
    expect(team.slug).toBe(w.team.slug);
  });

  it("refuses roles that are not exactly one of the app's four", async () => {
    for (const role of ["owner,engineer", "superuser", ""]) {
      const result = await statusOf(() =>
        auth.api.createInvitation({ body: { email: `role-probe-${role.length}@names.example`, role: role as "owner", organizationId: w.team.id }, headers: headersOf(w.jars.owner) }),
      );
      expect(result.status, role).toBe(400);
    }
  });

  it("builds team links that stay under /t/ whatever a stored slug holds", () => {
    expect(teamPath("a/../../sign-out")).toBe("/t/a%2F..%2F..%2Fsign-out");
    const router = createMemoryRouter(
      [{ path: "*", element: createElement(AppShell, { user: { name: "U", email: "u@x.example" }, teams: [{ name: "Odd", slug: "a/../../sign-out", role: "owner" }], children: null }) }],
      { initialEntries: ["/account"] },
    );
    const html = renderToString(createElement(RouterProvider, { router }));
    expect(html).toContain('href="/t/a%2F..%2F..%2Fsign-out"');
    expect(html).not.toContain('href="/t/a/../../sign-out"');
  });
});
