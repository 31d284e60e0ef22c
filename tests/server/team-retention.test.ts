// Retention (issue 12 item 3): the owner's team archive, leaving a team, deleting a team and deleting an
// account. Each refusal changes nothing; each change is recorded. Fresh teams and users per test, against
// the real MariaDB and the configured raw-file store.
import { randomBytes, randomUUID } from "node:crypto";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { hashPassword } from "better-auth/crypto";
import { db } from "~/server/db.server";
import { account, member, organization, user } from "~/db/schema/auth";
import { cars } from "~/db/schema/garage";
import { analysisSessions, rawUploads } from "~/db/schema/sessions";
import { auditLog } from "~/db/schema/audit";
import { createCar } from "~/server/garage-cars.server";
import { createSetupSheet } from "~/server/garage-setups.server";
import { getStream, putStream } from "~/server/storage.server";
import * as settings from "~/routes/teams/settings";
import * as exportRoute from "~/routes/teams/export";
import * as accountRoute from "~/routes/account/account";
import { args, authCall, CookieJar, formRequest, getRequest, outcome } from "./auth-support";
import { baseSetupValues } from "./garage-support";
import { readZip } from "./helpers/zip";

const PASSWORD = "paddock-grid-4455";

async function person(name: string) {
  const id = randomUUID();
  const email = `${name.toLowerCase()}.${randomBytes(4).toString("hex")}@retention.example`;
  const now = new Date();
  await db.insert(user).values({ id, email, name, emailVerified: true, createdAt: now, updatedAt: now });
  await db.insert(account).values({ id: randomUUID(), accountId: id, providerId: "credential", userId: id, password: await hashPassword(PASSWORD), createdAt: now, updatedAt: now });
  const jar = new CookieJar();
  const signedIn = await authCall("/sign-in/email", { json: { email, password: PASSWORD }, jar });
  if (signedIn.status !== 200) throw new Error(`sign-in failed: ${signedIn.status}`);
  return { id, email, jar };
}

/** A team with an owner and an engineer, a car with a setup, and one session with a stored raw file. */
async function team() {
  const owner = await person("Owner");
  const engineer = await person("Engineer");
  const teamId = randomUUID();
  const slug = `keep-${randomBytes(4).toString("hex")}`;
  await db.insert(organization).values({ id: teamId, name: "Fenwick Motor Club", slug, createdAt: new Date() });
  await db.insert(member).values([
    { id: randomUUID(), organizationId: teamId, userId: owner.id, role: "owner", createdAt: new Date() },
    { id: randomUUID(), organizationId: teamId, userId: engineer.id, role: "engineer", createdAt: new Date() },
  ]);
  const carId = await createCar(teamId, owner.id, { name: "Marlin SR2", wheelbaseMm: 2450, cogHeightMm: 400, steeringRatio: 12, fuelDensityKgPerL: 0.745, massKg: 620, staticFrontWeightPct: 44 });
  const { setupId } = await createSetupSheet(teamId, owner.id, carId, "Dry", baseSetupValues);
  const text = `time_s,speed_kmh\n0,120\n0.1,121\n# ${randomUUID()}\n`;
  const put = await putStream(Readable.from([Buffer.from(text)]), { keyPrefix: `teams/${teamId}` });
  const sessionId = randomUUID();
  const uploadId = randomUUID();
  await db.insert(rawUploads).values({ id: uploadId, teamId, userId: engineer.id, storage: put.storage, storageKey: put.key, fileName: "../../etc/passwd stint.csv", sha256: put.sha256, bytes: put.bytes, status: "attached", sessionId });
  await db.insert(analysisSessions).values({ id: sessionId, teamId, carId, setupId, name: "Fenwick, stint 1", status: "checked", createdBy: engineer.id, rawUploadId: uploadId, rawFileName: "stint.csv", rawSha256: put.sha256, rawBytes: put.bytes });
  return { owner, engineer, teamId, slug, carId, sessionId, uploadId, put, text };
}

function settingsPost(slug: string, jar: CookieJar, fields: Record<string, string>) {
  return outcome(() => settings.action(args(formRequest(`/t/${slug}/settings`, fields, jar), { teamSlug: slug })));
}

async function fileExists(put: { storage: "fs" | "s3"; key: string }) {
  try {
    const stream = await getStream(put.storage, put.key);
    stream.destroy();
    return true;
  } catch {
    return false;
  }
}

describe("team archive", () => {
  it("the owner downloads one zip with team.json and the raw file; an engineer gets 403", async () => {
    const t = await team();
    const refused = await outcome(() => exportRoute.loader(args(getRequest(`/t/${t.slug}/export.zip`, t.engineer.jar), { teamSlug: t.slug })));
    expect(refused.status).toBe(403);
    const response = (await exportRoute.loader(args(getRequest(`/t/${t.slug}/export.zip`, t.owner.jar), { teamSlug: t.slug }))) as Response;
    expect(response.headers.get("content-type")).toBe("application/zip");
    expect(response.headers.get("content-disposition")).toMatch(/^attachment; filename="rakeline-keep-[0-9a-f]+-\d{4}-\d\d-\d\d\.zip"$/);
    const files = readZip(Buffer.from(await response.arrayBuffer()));
    const json = JSON.parse(files.get("team.json")!.toString("utf8"));
    expect(json.format).toBe("rakeline-team-export/1");
    expect(json.cars.map((c: { id: string }) => c.id)).toEqual([t.carId]);
    expect(json.sessions.map((s: { id: string }) => s.id)).toEqual([t.sessionId]);
    expect(json.members.map((m: { email: string }) => m.email).sort()).toEqual([t.engineer.email, t.owner.email].sort());
    // No secrets: neither the storage key nor any password hash travels.
    expect(JSON.stringify(json)).not.toContain(t.put.key);
    expect(JSON.stringify(json)).not.toMatch(/password/i);
    // A path trick in the uploaded file name stays one file name inside raw/.
    const rawPath = json.rawUploads[0].archivePath as string;
    expect(rawPath).toMatch(/^raw\/[0-9a-f-]{36}-[\w.-]+$/);
    expect(rawPath).not.toContain("..");
    expect(files.get(rawPath)!.toString("utf8")).toBe(t.text);
    const [event] = await db.select().from(auditLog).where(and(eq(auditLog.teamId, t.teamId), eq(auditLog.action, "team_exported")));
    expect(event.actorUserId).toBe(t.owner.id);
    console.log(`tried: owner export of a team with one session; held: ${files.size} entries, raw bytes identical, no storage key or password in team.json`);
  });
});

describe("leaving a team", () => {
  it("the only owner cannot leave; an engineer can, and the event is recorded", async () => {
    const t = await team();
    const refused = await settingsPost(t.slug, t.owner.jar, { intent: "leave", confirm: "yes" });
    expect(refused.status).toBe(400);
    expect((refused.body as { errors: { form: string } }).errors.form).toMatch(/only owner/);
    expect(await db.select().from(member).where(eq(member.organizationId, t.teamId))).toHaveLength(2);
    const left = await settingsPost(t.slug, t.engineer.jar, { intent: "leave", confirm: "yes" });
    expect(left.status).toBe(302);
    expect(await db.select().from(member).where(and(eq(member.organizationId, t.teamId), eq(member.userId, t.engineer.id)))).toHaveLength(0);
    const events = await db.select().from(auditLog).where(and(eq(auditLog.teamId, t.teamId), eq(auditLog.action, "member_left")));
    expect(events.map((e) => e.actorUserId)).toEqual([t.engineer.id]);
    // What the engineer made stays with the team.
    expect(await db.select().from(analysisSessions).where(eq(analysisSessions.id, t.sessionId))).toHaveLength(1);
  });
});

describe("deleting a team", () => {
  it("needs the owner and the address typed; then every row and raw file of the team is gone", async () => {
    const t = await team();
    expect((await settingsPost(t.slug, t.engineer.jar, { intent: "delete-team", confirmSlug: t.slug })).status).toBe(403);
    const wrong = await settingsPost(t.slug, t.owner.jar, { intent: "delete-team", confirmSlug: "something-else" });
    expect(wrong.status).toBe(400);
    expect(await db.select().from(organization).where(eq(organization.id, t.teamId))).toHaveLength(1);
    const done = await settingsPost(t.slug, t.owner.jar, { intent: "delete-team", confirmSlug: t.slug });
    expect(done.status).toBe(302);
    expect(await db.select().from(organization).where(eq(organization.id, t.teamId))).toHaveLength(0);
    expect(await db.select().from(cars).where(eq(cars.teamId, t.teamId))).toHaveLength(0);
    expect(await db.select().from(analysisSessions).where(eq(analysisSessions.teamId, t.teamId))).toHaveLength(0);
    expect(await db.select().from(rawUploads).where(eq(rawUploads.teamId, t.teamId))).toHaveLength(0);
    expect(await fileExists(t.put)).toBe(false);
    // The people stay; only their membership went.
    expect(await db.select().from(user).where(eq(user.id, t.engineer.id))).toHaveLength(1);
    console.log("tried: engineer, wrong address, then the owner with the address; held: refused twice with nothing changed, then rows and raw file gone");
  });
});

describe("deleting an account", () => {
  const post = (jar: CookieJar, password: string) =>
    outcome(() => accountRoute.action(args(formRequest("/account", { intent: "delete-account", password }, jar), {})));

  it("needs the right password, and is refused while the user alone owns a team with members", async () => {
    const t = await team();
    const wrong = await post(t.engineer.jar, "not-the-password");
    expect(wrong.status).toBe(400);
    const held = await post(t.owner.jar, PASSWORD);
    expect(held.status).toBe(400);
    expect((held.body as { errors: { password: string } }).errors.password).toMatch(/only owner of Fenwick Motor Club/);
    expect(await db.select().from(user).where(eq(user.id, t.owner.id))).toHaveLength(1);
  });

  it("deletes the user, their membership and sign-ins; their work stays with the team as a former member's", async () => {
    const t = await team();
    const done = await post(t.engineer.jar, PASSWORD);
    expect(done.status).toBe(302);
    expect(await db.select().from(user).where(eq(user.id, t.engineer.id))).toHaveLength(0);
    expect(await db.select().from(member).where(eq(member.userId, t.engineer.id))).toHaveLength(0);
    const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, t.sessionId));
    expect(session.createdBy).toBeNull();
    const events = await db.select().from(auditLog).where(and(eq(auditLog.teamId, t.teamId), eq(auditLog.action, "account_deleted")));
    expect(events).toHaveLength(1);
    // The old cookie no longer signs anyone in (better-auth's get-session answers null).
    const me = await authCall("/get-session", { jar: t.engineer.jar });
    expect(await me.json()).toBeNull();
    console.log("tried: wrong password, sole owner, then an engineer deleting their account; held: refusals changed nothing; user gone, work kept");
  });
});
