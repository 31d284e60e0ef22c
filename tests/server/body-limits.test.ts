// The probe: a 10 MB pasted `text` field of nested brackets on the Garage import held the event loop for
// 5 s and took 500 MB. Every body and field is now capped before it is parsed, and JSON nesting is limited
// before JSON.parse. Each refusal names the limit, and nothing is stored.
import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { cars } from "~/db/schema/garage";
import * as importPage from "~/routes/garage/import";
import * as apiImport from "~/routes/api/cars-import";
import { jsonDepthProblem, parseJsonBounded, readForm, readJson, readText } from "~/server/body.server";
import { appUrl, args, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

async function carCount(teamId: string): Promise<number> {
  const [row] = await db.select({ n: count() }).from(cars).where(eq(cars.teamId, teamId));
  return Number(row.n);
}

const nested = (depth: number) => "[".repeat(depth) + "]".repeat(depth);

function post(path: string, body: BodyInit, contentType: string | null, extra: Record<string, string> = {}) {
  const headers: Record<string, string> = { origin: appUrl, cookie: w.jars.engineer.header(), ...extra };
  if (contentType) headers["content-type"] = contentType;
  return new Request(`${appUrl}${path}`, { method: "POST", headers, body });
}

describe("body readers", () => {
  it("refuse JSON nested deeper than the limit before parsing, and accept ordinary JSON", () => {
    expect(jsonDepthProblem(nested(33))).toMatch(/nested more than 32 levels deep/);
    expect(jsonDepthProblem(nested(32))).toBeNull();
    // Brackets inside strings are text, not nesting (RFC 8259 §7: a string may hold any character but " and \).
    expect(jsonDepthProblem(JSON.stringify({ name: "[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\\\"" }))).toBeNull();
    const ok = parseJsonBounded('{"a":[1,{"b":2}]}');
    expect(ok).toEqual({ ok: true, value: { a: [1, { b: 2 }] } });
    const bad = parseJsonBounded("{not json");
    expect(bad.ok).toBe(false);
  });

  it("stop reading a text body at the cap, with or without a Content-Length", async () => {
    const big = "x".repeat(70_000);
    const declared = new Request(`${appUrl}/api/x`, { method: "POST", body: big, headers: { "content-length": String(big.length) } });
    const refused = await outcome(() => readText(declared, 64 * 1024));
    // RFC 9110 §15.5.14: 413 Content Too Large.
    expect(refused.status).toBe(413);
    expect((refused.body as { error: string }).error).toMatch(/larger than 64 KiB/);
    const streamed = new ReadableStream({
      start(controller) {
        for (let i = 0; i < 20; i++) controller.enqueue(new TextEncoder().encode("y".repeat(10_000)));
        controller.close();
      },
    });
    const chunked = new Request(`${appUrl}/api/x`, { method: "POST", body: streamed, duplex: "half" } as RequestInit);
    expect((await outcome(() => readText(chunked, 64 * 1024))).status).toBe(413);
  });

  it("cap each form field and the number of fields, naming the field", async () => {
    const long = new URLSearchParams({ name: "n".repeat(40_000) });
    const one = await outcome(() => readForm(post("/t/x/settings", long, "application/x-www-form-urlencoded")));
    expect(one.status).toBe(413);
    expect(one.body).toMatch(/"name" is longer than 32 KiB/);
    const many = new URLSearchParams(Array.from({ length: 500 }, (_, i) => [`f${i}`, "1"]));
    const fields = await outcome(() => readForm(post("/t/x/settings", many, "application/x-www-form-urlencoded")));
    expect(fields.status).toBe(413);
    expect(fields.body).toMatch(/more than 400 fields/);
  });

  it("refuse a body that is not a form where a form is expected, and JSON that is too deep", async () => {
    const wrong = await outcome(() => readForm(post("/t/x/settings", "{}", "application/json")));
    // RFC 9110 §15.5.16: 415 Unsupported Media Type.
    expect(wrong.status).toBe(415);
    const deep = await outcome(() => readJson(post("/api/x", nested(100), "application/json")));
    expect(deep.status).toBe(400);
    expect((deep.body as { error: string }).error).toMatch(/nested more than 32 levels/);
  });
});

describe("Garage import under hostile bodies", () => {
  it("refuses a 10 MB pasted text field at the cap and stores nothing", async () => {
    const before = await carCount(w.team.id);
    const form = new FormData();
    form.set("text", nested(5_000_000));
    form.set("setupName", "Imported");
    const result = await outcome(() => importPage.action(args(post(`/t/${w.team.slug}/garage/import`, form, null), { teamSlug: w.team.slug })));
    expect(result.status).toBe(413);
    expect((result.body as { errors: string[] }).errors[0]).toMatch(/larger than/);
    expect(await carCount(w.team.id)).toBe(before);
  });

  it("refuses nested brackets that fit under the size cap by their depth, naming the limit", async () => {
    const before = await carCount(w.team.id);
    const form = new FormData();
    form.set("text", nested(30_000));
    const result = await outcome(() => importPage.action(args(post(`/t/${w.team.slug}/garage/import`, form, null), { teamSlug: w.team.slug })));
    expect(result.status).toBe(400);
    expect((result.body as { errors: string[] }).errors[0]).toMatch(/nested more than 8 levels deep/);
    expect(await carCount(w.team.id)).toBe(before);
  });

  it("refuses an oversized car file on the JSON route before reading it", async () => {
    const before = await carCount(w.team.id);
    const body = nested(5_000_000);
    const result = await outcome(() =>
      apiImport.action(args(post(`/api/t/${w.team.slug}/cars/import`, body, "application/json", { "content-length": String(body.length) }), { teamSlug: w.team.slug })),
    );
    expect(result.status).toBe(413);
    expect((result.body as { error: string }).error).toMatch(/larger than 64 KiB/);
    expect(await carCount(w.team.id)).toBe(before);
  });
});
