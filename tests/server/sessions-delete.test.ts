// Deleting a session (issue 12 item 3): the owner only, after a confirmation; its rows, its raw upload row and
// its raw file in storage go, and the audit log keeps the event. Against the real MariaDB and the configured store.
import { randomUUID } from "node:crypto";
import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { analysisSessions, rawUploads, sessionResults } from "~/db/schema/sessions";
import { auditLog } from "~/db/schema/audit";
import { getStream, putStream } from "~/server/storage.server";
import * as route from "~/routes/api/session-delete";
import { appUrl, args, outcome } from "./auth-support";
import { garageWorld, type Who } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

async function storedSession() {
  const text = `time_s,speed\n0,10\n0.1,10.5\n# ${randomUUID()}\n`;
  const put = await putStream(Readable.from([Buffer.from(text)]), { keyPrefix: `teams/${w.team.id}` });
  const sessionId = randomUUID();
  const uploadId = randomUUID();
  await db.insert(rawUploads).values({ id: uploadId, teamId: w.team.id, userId: w.userIds.engineer, storage: put.storage, storageKey: put.key, fileName: "stint.csv", sha256: put.sha256, bytes: put.bytes, status: "attached", sessionId });
  await db.insert(analysisSessions).values({ id: sessionId, teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, stint 3", status: "checked", createdBy: w.userIds.engineer, rawUploadId: uploadId, rawFileName: "stint.csv", rawSha256: put.sha256, rawBytes: put.bytes });
  await db.insert(sessionResults).values({ id: randomUUID(), sessionId, teamId: w.team.id, origin: "browser", reason: "upload", summary: {}, createdBy: w.userIds.engineer });
  return { sessionId, uploadId, put };
}

function post(who: Who, sessionId: string, body: string, accept = "application/json") {
  const team = who === "outsider" ? w.outsider.teamSlug : w.team.slug;
  const request = new Request(`${appUrl}/api/t/${team}/sessions/${sessionId}/delete`, {
    method: "POST",
    headers: { origin: appUrl, cookie: w.jars[who].header(), "content-type": "application/x-www-form-urlencoded", accept },
    body,
  });
  return outcome(() => route.action(args(request, { teamSlug: team, sessionId })));
}

async function fileExists(put: { storage: "fs" | "s3"; key: string }): Promise<boolean> {
  try {
    const stream = await getStream(put.storage, put.key);
    for await (const _ of stream) break;
    stream.destroy();
    return true;
  } catch {
    return false;
  }
}

describe("deleting a session", () => {
  it.each([["engineer", 403], ["analyst", 403], ["driver", 403], ["outsider", 404]] as const)("%s gets %i and nothing changes", async (who, status) => {
    const { sessionId, put } = await storedSession();
    const refused = await post(who, sessionId, "confirm=yes");
    expect(refused.status).toBe(status);
    expect(await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId))).toHaveLength(1);
    expect(await fileExists(put)).toBe(true);
  });

  it("without confirm=yes: 400 with a message, and nothing changes", async () => {
    const { sessionId, put } = await storedSession();
    const refused = await post("owner", sessionId, "");
    expect(refused.status).toBe(400);
    expect((refused.body as { error: string }).error).toMatch(/confirm/);
    expect(await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId))).toHaveLength(1);
    expect(await fileExists(put)).toBe(true);
  });

  it("the owner deletes it: rows, upload row and raw file gone, one audit event", async () => {
    const { sessionId, uploadId, put } = await storedSession();
    expect(await fileExists(put)).toBe(true);
    const done = await post("owner", sessionId, "confirm=yes");
    expect(done.status).toBe(200);
    expect(done.body).toEqual({ deleted: sessionId, fileRemoved: true });
    expect(await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId))).toHaveLength(0);
    expect(await db.select().from(sessionResults).where(eq(sessionResults.sessionId, sessionId))).toHaveLength(0);
    expect(await db.select().from(rawUploads).where(eq(rawUploads.id, uploadId))).toHaveLength(0);
    expect(await fileExists(put)).toBe(false);
    const events = await db.select().from(auditLog).where(eq(auditLog.subjectId, sessionId));
    expect(events.map((e) => [e.action, e.actorUserId])).toEqual([["session_deleted", w.userIds.owner]]);
    console.log("tried: owner deletes a stored session; held: session, results, upload row and raw file removed, audit event written");
  });

  it("a form post (the report page) is redirected to the Sessions list; a second delete is a 404", async () => {
    const { sessionId } = await storedSession();
    const done = await post("owner", sessionId, "confirm=yes", "text/html");
    // RFC 9110 §15.4.3: 302 Found to the list.
    expect(done.status).toBe(302);
    expect(done.location).toBe(`/t/${w.team.slug}/sessions?deleted=${sessionId}`);
    expect((await post("owner", sessionId, "confirm=yes")).status).toBe(404);
  });
});
