/**
 * A team's data as one zip archive (archiver), for its owner: `team.json` with every row the team owns
 * (members, cars, setup sheets and versions, venues, logger profiles, sessions with their bands and analysis
 * results, the audit log), and `raw/` with each session's raw export as it was uploaded. Streamed: the raw
 * files are read from storage one after another, never held in memory. Secrets (password hashes, token
 * hashes, sessions of better-auth) are not part of it.
 */
import { PassThrough, Readable } from "node:stream";
import { ZipArchive } from "archiver";
import { asc, eq } from "drizzle-orm";
import { member, organization, user } from "../db/schema/auth";
import { cars, setupSheets, setups } from "../db/schema/garage";
import { analysisSessions, loggerProfiles, rawUploads, sessionBands, sessionResults, venues } from "../db/schema/sessions";
import { auditLog } from "../db/schema/audit";
import { db } from "./db.server";
import { getStream, type StorageKind } from "./storage.server";

export const TEAM_EXPORT_FORMAT = "rakeline-team-export/1";

/** Every row the team owns, as plain JSON (dates as ISO text). */
export async function teamExportData(teamId: string) {
  const [team] = await db.select({ id: organization.id, name: organization.name, slug: organization.slug, createdAt: organization.createdAt }).from(organization).where(eq(organization.id, teamId));
  const members = await db
    .select({ userId: user.id, name: user.name, email: user.email, role: member.role, joinedAt: member.createdAt })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(eq(member.organizationId, teamId))
    .orderBy(asc(user.email));
  const sessions = await db.select().from(analysisSessions).where(eq(analysisSessions.teamId, teamId)).orderBy(asc(analysisSessions.createdAt));
  const sessionIds = new Set(sessions.map((s) => s.id));
  const bands = (await db.select().from(sessionBands).innerJoin(analysisSessions, eq(analysisSessions.id, sessionBands.sessionId)).where(eq(analysisSessions.teamId, teamId))).map((r) => r.session_bands);
  const uploads = await db.select().from(rawUploads).where(eq(rawUploads.teamId, teamId)).orderBy(asc(rawUploads.createdAt));
  return {
    format: TEAM_EXPORT_FORMAT,
    exportedAt: new Date().toISOString(),
    team,
    members,
    cars: await db.select().from(cars).where(eq(cars.teamId, teamId)).orderBy(asc(cars.createdAt)),
    setupSheets: await db.select().from(setupSheets).where(eq(setupSheets.teamId, teamId)).orderBy(asc(setupSheets.createdAt)),
    setups: await db.select().from(setups).where(eq(setups.teamId, teamId)).orderBy(asc(setups.sheetId), asc(setups.version)),
    venues: await db.select().from(venues).where(eq(venues.teamId, teamId)),
    loggerProfiles: await db.select().from(loggerProfiles).where(eq(loggerProfiles.teamId, teamId)),
    sessions,
    sessionBands: bands.filter((b) => sessionIds.has(b.sessionId)),
    sessionResults: await db.select().from(sessionResults).where(eq(sessionResults.teamId, teamId)).orderBy(asc(sessionResults.createdAt)),
    rawUploads: uploads.map(({ storageKey: _key, ...u }) => ({ ...u, archivePath: rawPathOf(u) })),
    auditLog: await db.select().from(auditLog).where(eq(auditLog.teamId, teamId)).orderBy(asc(auditLog.createdAt)),
    _uploads: uploads,
  };
}

/** Where a raw file sits in the archive: raw/<upload id>-<file name made safe> (no folders, no dots first). */
export function rawPathOf(upload: { id: string; fileName: string }): string {
  const safe = upload.fileName.normalize("NFKC").replace(/[^\w.-]+/g, "_").replace(/\.{2,}/g, ".").replace(/^[._]+/, "").slice(0, 120) || "export.csv";
  return `raw/${upload.id}-${safe}`;
}

/** The archive as a web stream, and its file name. A raw file missing from storage is listed in MISSING.txt. */
export async function teamArchive(teamId: string): Promise<{ body: ReadableStream<Uint8Array>; fileName: string }> {
  const { _uploads: uploads, ...content } = await teamExportData(teamId);
  const zip = new ZipArchive({ zlib: { level: 6 } });
  const out = new PassThrough();
  zip.on("error", (error: Error) => out.destroy(error));
  zip.pipe(out);
  zip.append(JSON.stringify(content, null, 2) + "\n", { name: "team.json" });
  void (async () => {
    const missing: string[] = [];
    for (const upload of uploads) {
      try {
        const stream = await getStream(upload.storage as StorageKind, upload.storageKey);
        await new Promise<void>((resolve, reject) => {
          stream.once("error", reject);
          zip.once("entry", () => resolve());
          zip.append(stream, { name: rawPathOf(upload) });
        });
      } catch {
        missing.push(`${rawPathOf(upload)} (${upload.fileName}): not found in storage`);
      }
    }
    if (missing.length) zip.append(missing.join("\n") + "\n", { name: "MISSING.txt" });
    await zip.finalize();
  })().catch((error) => out.destroy(error as Error));
  const date = new Date().toISOString().slice(0, 10);
  return { body: Readable.toWeb(out) as ReadableStream<Uint8Array>, fileName: `rakeline-${content.team?.slug ?? "team"}-${date}.zip` };
}
