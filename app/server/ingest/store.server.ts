/**
 * A session of record, stored in one transaction: the session row (details, map, options, summary,
 * traces), its speed-band rows, the first row of its results history, the raw upload attached to it,
 * the server's re-check job (when the summary came from the browser), the Logger profile when one is
 * named, a new venue when one is typed, and the audit event. Either all of it is stored or none.
 * Used by the Drop a log page, the headless API and the demo seed.
 */
import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { member } from "~/db/schema/auth";
import { cars, setups } from "~/db/schema/garage";
import { analysisSessions, loggerProfiles, rawUploads, sessionBands, sessionResults, venues, type SessionSource } from "~/db/schema/sessions";
import type { SessionSummary } from "~/engine/summary";
import type { SummaryOptions } from "~/engine/summary-options";
import type { ChannelMap } from "~/engine/types";
import { bandRowsOf } from "~/lib/sessions/band-rows";
import { airSourceOf, type SessionDetails } from "~/lib/sessions/details";
import { headerSignature } from "~/lib/sessions/logger-profile";
import { recordAudit } from "../audit.server";
import { db } from "../db.server";
import { enqueueJob } from "../jobs.server";
import type { StoredObject } from "../storage.server";
import { isDuplicateKey } from "./db-errors.server";

export type RawFile = StoredObject & { fileName: string; /** the raw_uploads row made by the upload route, if any */ uploadId?: string };

export type StoreSessionInput = {
  teamId: string;
  teamSlug: string;
  userId: string | null;
  source: SessionSource;
  raw: RawFile;
  details: SessionDetails;
  map: ChannelMap;
  options: SummaryOptions;
  /** The summary without its traces (the CLI's JSON), and the traces apart. */
  summary: Omit<SessionSummary, "traces">;
  traces: unknown;
  engineVersion: string;
  /** Who ran the engine: the browser, or the server itself (API upload, seed). */
  origin: "browser" | "server";
  /**
   * Queue the job worker's re-check of the stored file (default: yes for a browser summary). The API
   * queues it too: its answer comes from a quick run in the request; the worker's threaded run is then
   * compared with it and becomes the summary of record.
   */
  enqueueCheck?: boolean;
  /** Save the map as a Logger profile under this name (the header's columns give its signature). */
  profile?: { name: string; columns: string[] };
  createdAt?: Date;
};

export type StoreSessionResult =
  | { ok: true; id: string; url: string; duplicate: boolean }
  | { ok: false; status: 404 | 422; error: string; fields?: Record<string, string> };

export const sessionUrl = (teamSlug: string, id: string) => `/t/${teamSlug}/sessions/${id}`;

class Refusal extends Error {
  constructor(
    readonly status: 404 | 422,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

async function existingSession(teamId: string, sha256: string) {
  const [row] = await db
    .select({ id: analysisSessions.id })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.rawSha256, sha256)))
    .limit(1);
  return row ?? null;
}

/** The session already made from this file in this team, if any (the same file twice is one session). */
export async function findSessionByHash(teamId: string, teamSlug: string, sha256: string): Promise<{ id: string; url: string } | null> {
  const row = await existingSession(teamId, sha256);
  return row ? { id: row.id, url: sessionUrl(teamSlug, row.id) } : null;
}

function sessionName(details: SessionDetails, venueName: string | null, fileName: string): string {
  const parts = [details.date, venueName, details.run].filter((p): p is string => !!p);
  return (parts.length ? parts.join(" · ") : fileName).slice(0, 120);
}

export async function storeSessionOfRecord(input: StoreSessionInput): Promise<StoreSessionResult> {
  const before = await existingSession(input.teamId, input.raw.sha256);
  if (before) return { ok: true, id: before.id, url: sessionUrl(input.teamSlug, before.id), duplicate: true };
  const id = randomUUID();
  const now = input.createdAt ?? new Date();
  const check = input.enqueueCheck ?? input.origin === "browser";
  try {
    await db.transaction(async (tx) => {
      const { details, teamId } = input;
      const [car] = await tx.select({ id: cars.id, name: cars.name }).from(cars).where(and(eq(cars.id, details.carId), eq(cars.teamId, teamId)));
      if (!car) throw new Refusal(404, "No such car in this team.", { carId: "No such car in this team." });
      const [setup] = await tx
        .select({ id: setups.id, version: setups.version })
        .from(setups)
        .where(and(eq(setups.id, details.setupId), eq(setups.carId, car.id), eq(setups.teamId, teamId)));
      if (!setup) throw new Refusal(404, "No such setup version of this car.", { setupId: "No such setup version of this car." });

      let venue: { id: string; name: string; altitudeM: number | null } | null = null;
      if (details.venueId) {
        const [row] = await tx.select({ id: venues.id, name: venues.name, altitudeM: venues.altitudeM }).from(venues).where(and(eq(venues.id, details.venueId), eq(venues.teamId, teamId)));
        if (!row) throw new Refusal(422, "No such venue in this team's list.", { venueId: "No such venue in this team's list." });
        venue = row;
      } else if (details.venueName) {
        const [row] = await tx.select({ id: venues.id, name: venues.name, altitudeM: venues.altitudeM }).from(venues).where(and(eq(venues.teamId, teamId), eq(venues.name, details.venueName)));
        if (row) venue = row;
        else {
          venue = { id: randomUUID(), name: details.venueName, altitudeM: null };
          await tx.insert(venues).values({ id: venue.id, teamId, name: venue.name, createdAt: now });
          await recordAudit(tx, { teamId, actorUserId: input.userId, action: "venue_created", subjectType: "venue", subjectId: venue.id, detail: { name: venue.name } });
        }
      }
      if (details.driverUserId) {
        const [m] = await tx.select({ id: member.id }).from(member).where(and(eq(member.organizationId, teamId), eq(member.userId, details.driverUserId)));
        if (!m) throw new Refusal(422, "That driver is not a member of this team.", { driverUserId: "That driver is not a member of this team." });
      }

      await tx.insert(analysisSessions).values({
        id,
        teamId,
        carId: car.id,
        setupId: setup.id,
        name: sessionName(details, venue?.name ?? null, input.raw.fileName),
        recordedAt: null,
        status: check ? "read" : "checked",
        summaryVersion: input.summary.summary_version,
        summary: input.summary,
        createdBy: input.userId,
        createdAt: now,
        sessionDate: details.date ?? null,
        venueId: venue?.id ?? null,
        runLabel: details.run ?? null,
        driverUserId: details.driverUserId ?? null,
        driverName: details.driverName ?? null,
        airTempC: details.air?.temp_c ?? null,
        airPressureHpa: details.air?.pressure_hpa ?? null,
        airHumidityPct: details.air?.humidity_pct ?? null,
        airSource: airSourceOf(details, venue?.altitudeM ?? null),
        fuelStartL: details.fuel_l?.start ?? null,
        fuelEndL: details.fuel_l?.end ?? null,
        fuelDensityKgPerL: details.fuelDensityKgPerL ?? null,
        tyreNotes: details.tyreNotes ?? null,
        notes: details.notes ?? null,
        source: input.source,
        rawUploadId: input.raw.uploadId ?? null,
        rawFileName: input.raw.fileName,
        rawSha256: input.raw.sha256,
        rawBytes: input.raw.bytes,
        channelMap: input.map,
        analysisOptions: input.options,
        engineVersion: input.engineVersion,
        traces: input.traces ?? null,
        // The first reading of the file, which the re-check compares with (the browser's, or the API's quick run).
        browserSummary: check ? input.summary : null,
        statusDetail: !check
          ? "Analysed by the server from the stored file."
          : input.origin === "browser"
            ? "Read in the browser; the server's re-check is queued."
            : "Analysed on upload; the job worker's re-check is queued.",
        checkedAt: check ? null : now,
        updatedAt: now,
      });
      const bands = bandRowsOf(id, input.summary as SessionSummary);
      if (bands.length) await tx.insert(sessionBands).values(bands);
      await tx.insert(sessionResults).values({
        id: randomUUID(),
        sessionId: id,
        teamId,
        origin: input.origin,
        reason: input.source === "browser" ? "upload" : input.source === "api" ? "api" : "seed",
        engineVersion: input.engineVersion,
        summaryVersion: input.summary.summary_version,
        setupId: setup.id,
        summary: input.summary,
        options: input.options,
        createdBy: input.userId,
        createdAt: now,
      });

      // The raw file: the upload route's row is attached; API and seed files get their row here.
      if (input.raw.uploadId) {
        const attached = await tx
          .update(rawUploads)
          .set({ status: "attached", sessionId: id })
          .where(and(eq(rawUploads.id, input.raw.uploadId), eq(rawUploads.teamId, teamId), eq(rawUploads.status, "stored")));
        if (Number((attached[0] as { affectedRows?: number }).affectedRows ?? 0) !== 1) {
          throw new Refusal(422, "That upload is not waiting for a session any more: drop the file again.", { uploadId: "Drop the file again." });
        }
      } else {
        const uploadId = randomUUID();
        await tx.insert(rawUploads).values({
          id: uploadId,
          teamId,
          userId: input.userId,
          storage: input.raw.storage,
          storageKey: input.raw.key,
          fileName: input.raw.fileName,
          sha256: input.raw.sha256,
          bytes: input.raw.bytes,
          status: "attached",
          sessionId: id,
          createdAt: now,
        });
        await tx.update(analysisSessions).set({ rawUploadId: uploadId }).where(eq(analysisSessions.id, id));
      }

      if (check) {
        await enqueueJob(tx, { kind: "session_check", teamId, sessionId: id, payload: { reason: "recheck" } });
      }

      if (input.profile) {
        const signature = headerSignature(input.profile.columns);
        const [existing] = await tx.select({ id: loggerProfiles.id }).from(loggerProfiles).where(and(eq(loggerProfiles.teamId, teamId), eq(loggerProfiles.name, input.profile.name)));
        if (existing) {
          await tx.update(loggerProfiles).set({ headerSignature: signature, columns: input.profile.columns, map: input.map, lastUsedAt: now }).where(eq(loggerProfiles.id, existing.id));
        } else {
          await tx.insert(loggerProfiles).values({ id: randomUUID(), teamId, name: input.profile.name, headerSignature: signature, columns: input.profile.columns, map: input.map, createdBy: input.userId, createdAt: now, lastUsedAt: now });
        }
      }

      await recordAudit(tx, {
        teamId,
        actorUserId: input.userId,
        action: "session_uploaded",
        subjectType: "session",
        subjectId: id,
        detail: { file: input.raw.fileName, car: car.name, setupVersion: setup.version, via: input.source },
      });
    });
  } catch (error) {
    if (error instanceof Refusal) return { ok: false, status: error.status, error: error.message, fields: error.fields };
    if (isDuplicateKey(error)) {
      // Another request stored the same file a moment ago.
      const raced = await existingSession(input.teamId, input.raw.sha256);
      if (raced) return { ok: true, id: raced.id, url: sessionUrl(input.teamSlug, raced.id), duplicate: true };
    }
    throw error;
  }
  return { ok: true, id, url: sessionUrl(input.teamSlug, id), duplicate: false };
}
