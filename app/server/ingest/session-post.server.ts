/**
 * POST /api/t/:teamSlug/sessions: the Drop a log page stores a session from an upload it made before,
 * the details and map the engineer confirmed, and the browser's summary. Checks everything again on
 * the server (details with the same zod schema, the map against the stored file's header, the summary's
 * shape), then storeSessionOfRecord. Answers 201 {id, url}, 200 {id, url, duplicate: true}, 422
 * {error, fields?}, 503 {error} (database down).
 */
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { cars, setups } from "~/db/schema/garage";
import { venues } from "~/db/schema/sessions";
import { isEngineError } from "~/engine/errors";
import { validateChannelMap } from "~/engine/mapping";
import type { SessionSummary } from "~/engine/summary";
import { detailsFieldErrors, engineOptionsOf, sessionDetailsSchema, type SessionDetails } from "~/lib/sessions/details";
import { db } from "../db.server";
import { getWaitingUpload } from "./raw-uploads.server";
import { storedHeader } from "./header.server";
import { sessionUrl, storeSessionOfRecord } from "./store.server";

const bandSchema = z.object({ min_kmh: z.number(), max_kmh: z.number(), samples: z.number().int() }).loose();

/** The parts of an engine summary the server stores and queries; the rest is kept as sent. */
export const summaryShape = z
  .object({
    summary_version: z.number().int().positive(),
    samples: z.number(),
    duration_s: z.number(),
    aero: z.object({}).loose(),
    bands: z.array(bandSchema).max(64),
    warnings: z.array(z.object({ code: z.string(), message: z.string() }).loose()),
  })
  .loose();

const bodySchema = z.object({
  uploadId: z.string({ error: "uploadId is required: upload the file first." }).min(1).max(36),
  details: z.unknown(),
  map: z.record(z.string(), z.unknown(), { error: "map must be a Channel map object." }),
  profile: z.object({ name: z.string().transform((s) => s.normalize("NFC").trim()).pipe(z.string().min(1, "Name the Logger profile.").max(80, "Keep the Logger profile's name to 80 characters.")) }).optional(),
  browser: z.object({
    summary: z.unknown(),
    traces: z.unknown().optional(),
    engineVersion: z.string().min(1).max(40),
  }),
});

type Answer = { status: number; body: Record<string, unknown> };
const refuse = (status: number, error: string, fields?: Record<string, string>): Answer => ({ status, body: fields ? { error, fields } : { error } });

/** Session context of the details: the venue's altitude and the car's fuel density, for the engine options. */
async function optionContext(teamId: string, details: SessionDetails) {
  const [car] = await db.select({ fuelDensityKgPerL: cars.fuelDensityKgPerL }).from(cars).where(and(eq(cars.id, details.carId), eq(cars.teamId, teamId)));
  const [venue] = details.venueId
    ? await db.select({ altitudeM: venues.altitudeM }).from(venues).where(and(eq(venues.id, details.venueId), eq(venues.teamId, teamId)))
    : [undefined];
  return { car, venueAltitudeM: venue?.altitudeM ?? null, carFuelDensityKgPerL: car?.fuelDensityKgPerL ?? null };
}

export async function postSession(team: { id: string; slug: string }, userId: string, body: unknown): Promise<Answer> {
  const parsed = bodySchema.safeParse(body);
  if (!parsed.success) {
    const fields = detailsFieldErrors(parsed.error);
    return refuse(422, Object.entries(fields).map(([k, v]) => `${k}: ${v}`)[0] ?? "The request is not a session.", fields);
  }
  const input = parsed.data;
  const details = sessionDetailsSchema.safeParse(input.details);
  if (!details.success) {
    const fields = detailsFieldErrors(details.error);
    return refuse(422, "Some session details need a fix: see the fields.", fields);
  }
  const summary = summaryShape.safeParse(input.browser.summary);
  if (!summary.success) {
    const issue = summary.error.issues[0];
    return refuse(422, `The browser's summary is not one the engine makes (${issue.path.join(".") || "summary"}: ${issue.message}). Reload the page and drop the file again.`);
  }

  const upload = await getWaitingUpload(team.id, input.uploadId);
  if (!upload) return refuse(422, "No such upload in this team: drop the file again.", { uploadId: "Drop the file again." });
  if (upload.status === "attached" && upload.sessionId) {
    return { status: 200, body: { id: upload.sessionId, url: sessionUrl(team.slug, upload.sessionId), duplicate: true } };
  }

  let header;
  try {
    header = await storedHeader(upload.storage, upload.storageKey);
  } catch (error) {
    if (isEngineError(error)) return refuse(422, `The stored file cannot be read: ${error.message}`);
    throw error;
  }
  let map;
  try {
    map = validateChannelMap(input.map, header);
  } catch (error) {
    if (isEngineError(error)) return refuse(422, `Channel map: ${error.message}`, { map: error.message });
    throw error;
  }

  const ctx = await optionContext(team.id, details.data);
  if (!ctx.car) return refuse(422, "No such car in this team.", { carId: "No such car in this team." });
  const [setup] = await db.select({ id: setups.id }).from(setups).where(and(eq(setups.id, details.data.setupId), eq(setups.carId, details.data.carId), eq(setups.teamId, team.id)));
  if (!setup) return refuse(422, "No such setup version of this car.", { setupId: "No such setup version of this car." });

  const { traces: _ignored, ...summaryWithoutTraces } = summary.data as unknown as SessionSummary;
  const stored = await storeSessionOfRecord({
    teamId: team.id,
    teamSlug: team.slug,
    userId,
    source: "browser",
    raw: { storage: upload.storage, key: upload.storageKey, bytes: upload.bytes, sha256: upload.sha256, fileName: upload.fileName, uploadId: upload.id },
    details: details.data,
    map,
    options: engineOptionsOf(details.data, ctx),
    summary: summaryWithoutTraces,
    traces: input.browser.traces ?? (summary.data as { traces?: unknown }).traces ?? null,
    engineVersion: input.browser.engineVersion,
    origin: "browser",
    profile: input.profile ? { name: input.profile.name, columns: header.columns } : undefined,
  });
  if (!stored.ok) return refuse(422, stored.error, stored.fields);
  return stored.duplicate
    ? { status: 200, body: { id: stored.id, url: stored.url, duplicate: true } }
    : { status: 201, body: { id: stored.id, url: stored.url } };
}
