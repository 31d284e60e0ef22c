/**
 * POST /api/sessions (headless ingest: pit laptops, scripts). Multipart with `file` (the export) and
 * `meta` (JSON: car, setup?, map? | profile?, date?, venue?, run?, driver?, air?, fuel_l?). The file is
 * streamed to storage, the engine runs on it in the request (the answer carries its summary), and the
 * session is stored with the job worker's re-check queued. Answers: 201 {id, url, summary}; 200 {id,
 * url, duplicate: true}; 401 (no or bad token); 404 (no such car or setup in the token's team); 413/415;
 * 422 {error} (the engine's message, missing channels, bad meta); 503 (database down). Anything but a
 * 201 leaves no new file or row behind.
 */
import { and, desc, eq, or } from "drizzle-orm";
import { z } from "zod";
import { member, user } from "~/db/schema/auth";
import { cars, setups } from "~/db/schema/garage";
import { loggerProfiles, venues } from "~/db/schema/sessions";
import { analyseLog } from "~/engine/analyse";
import { validateCar } from "~/engine/car";
import { isEngineError } from "~/engine/errors";
import { suggestChannelMap, validateChannelMap } from "~/engine/mapping";
import { REQUIRED_CHANNELS, type ChannelMap } from "~/engine/types";
import { detailsFieldErrors, engineOptionsOf, looseSessionDetailsSchema } from "~/lib/sessions/details";
import type { ApiAccess } from "../api-access.server";
import { parseJsonBounded } from "../body.server";
import { db } from "../db.server";
import { env } from "../env.server";
import { exportCarInput } from "../garage-io.server";
import { getStream } from "../storage.server";
import { discardWaitingUpload, recordUpload } from "./raw-uploads.server";
import { storedHeader } from "./header.server";
import { serverEngineVersion } from "./recheck.server";
import { findSessionByHash, storeSessionOfRecord } from "./store.server";
import { receiveUpload } from "./upload.server";

const text = (max: number) => z.string().transform((s) => s.normalize("NFC").trim()).pipe(z.string().min(1).max(max));

export const apiMetaSchema = z
  .object({
    car: text(120),
    setup: text(36).optional(),
    map: z.record(z.string(), z.unknown()).optional(),
    profile: text(80).optional(),
    date: z.string().optional(),
    venue: text(80).optional(),
    run: z.string().optional(),
    driver: text(120).optional(),
    air: z.unknown().optional(),
    fuel_l: z.unknown().optional(),
    fuel_density_kg_per_l: z.unknown().optional(),
    tyre_notes: z.string().optional(),
    notes: z.string().optional(),
  })
  .strict();

type Answer = { status: number; body: Record<string, unknown> };
const refuse = (status: number, error: string, fields?: Record<string, string>): Answer => ({ status, body: fields ? { error, fields } : { error } });
const absolute = (path: string) => new URL(path, env.APP_URL).toString();

async function findCar(teamId: string, ref: string) {
  const rows = await db
    .select({ id: cars.id, name: cars.name, fuelDensityKgPerL: cars.fuelDensityKgPerL })
    .from(cars)
    .where(and(eq(cars.teamId, teamId), or(eq(cars.id, ref), eq(cars.name, ref))))
    .limit(2);
  // An id wins over a name; two cars of the same name need the id.
  return rows.find((r) => r.id === ref) ?? (rows.length === 1 ? rows[0] : rows.length > 1 ? "ambiguous" : null);
}

async function findSetup(teamId: string, carId: string, ref: string | undefined) {
  const where = ref ? and(eq(setups.teamId, teamId), eq(setups.carId, carId), eq(setups.id, ref)) : and(eq(setups.teamId, teamId), eq(setups.carId, carId));
  const [row] = await db.select({ id: setups.id }).from(setups).where(where).orderBy(desc(setups.createdAt), desc(setups.version)).limit(1);
  return row ?? null;
}

async function resolveMap(teamId: string, meta: z.infer<typeof apiMetaSchema>, header: Awaited<ReturnType<typeof storedHeader>>): Promise<ChannelMap | Answer> {
  try {
    if (meta.map) return validateChannelMap(meta.map, header);
    if (meta.profile) {
      const [profile] = await db.select({ map: loggerProfiles.map }).from(loggerProfiles).where(and(eq(loggerProfiles.teamId, teamId), eq(loggerProfiles.name, meta.profile)));
      if (!profile) return refuse(422, `No Logger profile named "${meta.profile}" in this team.`);
      return validateChannelMap(profile.map, header);
    }
    const suggested = suggestChannelMap(header);
    const missing = REQUIRED_CHANNELS.filter((c) => !suggested.map[c]);
    if (missing.length) {
      return refuse(422, `No channel map was given and these channels could not be found in the file's columns: ${missing.join(", ")}. Send "map" (a MAP.json object) or "profile" (a Logger profile's name) in meta.`);
    }
    return validateChannelMap(suggested.map, header);
  } catch (error) {
    if (isEngineError(error)) return refuse(422, `Channel map: ${error.message}`);
    throw error;
  }
}

async function driverOf(teamId: string, driver: string | undefined): Promise<{ driverUserId?: string; driverName?: string }> {
  if (!driver) return {};
  const [m] = await db
    .select({ userId: user.id })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(and(eq(member.organizationId, teamId), or(eq(user.id, driver), eq(user.email, driver))))
    .limit(1);
  return m ? { driverUserId: m.userId } : { driverName: driver };
}

async function venueOf(teamId: string, venue: string | undefined): Promise<{ venueId?: string; venueName?: string; altitudeM: number | null }> {
  if (!venue) return { altitudeM: null };
  const [v] = await db
    .select({ id: venues.id, altitudeM: venues.altitudeM })
    .from(venues)
    .where(and(eq(venues.teamId, teamId), or(eq(venues.id, venue), eq(venues.name, venue))))
    .limit(1);
  return v ? { venueId: v.id, altitudeM: v.altitudeM } : { venueName: venue, altitudeM: null };
}

export async function apiUpload(request: Request, access: ApiAccess): Promise<Answer> {
  const { file, fields } = await receiveUpload(request, `teams/${access.teamId}`, { fields: ["meta"] });
  // Recorded at once (a process killed while analysing then leaves a waiting upload, swept later, not
  // a file nobody knows of); a copy of a file already waiting is dropped in favour of the first.
  const { row, reused } = await recordUpload(access.teamId, access.userId, file);
  let keep = false;
  try {
    const answer = await afterStored(access, { ...file, storage: row.storage, key: row.storageKey, uploadId: row.id }, fields.meta);
    keep = answer.status === 201;
    return answer;
  } finally {
    // Anything but a new session: the upload this request made goes again (one that was waiting before stays).
    if (!keep && !reused) await discardWaitingUpload(row).catch(() => undefined);
  }
}

async function afterStored(access: ApiAccess, file: Awaited<ReturnType<typeof receiveUpload>>["file"] & { uploadId: string }, metaText: string | undefined): Promise<Answer> {
  if (metaText === undefined) return refuse(422, 'The form has no "meta" part: send JSON {"car": "<id or name>", …} in it.');
  const json = parseJsonBounded(metaText, 8);
  if (!json.ok) return refuse(422, `meta: ${json.message}`);
  const parsedMeta = apiMetaSchema.safeParse(json.value);
  if (!parsedMeta.success) {
    const fields = detailsFieldErrors(parsedMeta.error);
    return refuse(422, `meta: ${Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join("; ")}`, fields);
  }
  const meta = parsedMeta.data;

  const duplicate = await findSessionByHash(access.teamId, access.teamSlug, file.sha256);
  if (duplicate) return { status: 200, body: { id: duplicate.id, url: absolute(duplicate.url), duplicate: true } };

  const car = await findCar(access.teamId, meta.car);
  if (car === "ambiguous") return refuse(422, `Two cars in this team are named "${meta.car}": give the car's id.`);
  if (!car) return refuse(404, `No car "${meta.car}" in this team (give a car's id or its exact name).`);
  const setup = await findSetup(access.teamId, car.id, meta.setup);
  if (!setup) return refuse(404, meta.setup ? `No setup version "${meta.setup}" of ${car.name}.` : `${car.name} has no setup version yet: add one in the Garage.`);

  let header;
  try {
    header = await storedHeader(file.storage, file.key);
  } catch (error) {
    if (isEngineError(error)) return refuse(422, error.message);
    throw error;
  }
  const map = await resolveMap(access.teamId, meta, header);
  if ("status" in map && "body" in map) return map as Answer;

  const venue = await venueOf(access.teamId, meta.venue);
  const details = looseSessionDetailsSchema.safeParse({
    carId: car.id,
    setupId: setup.id,
    date: meta.date,
    venueId: venue.venueId,
    venueName: venue.venueName,
    run: meta.run,
    ...(await driverOf(access.teamId, meta.driver)),
    air: meta.air,
    fuel_l: meta.fuel_l,
    fuelDensityKgPerL: meta.fuel_density_kg_per_l,
    tyreNotes: meta.tyre_notes,
    notes: meta.notes,
  });
  if (!details.success) {
    const fields = detailsFieldErrors(details.error);
    return refuse(422, `meta: ${Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join("; ")}`, fields);
  }
  const options = engineOptionsOf(details.data, { venueAltitudeM: venue.altitudeM, carFuelDensityKgPerL: car.fuelDensityKgPerL ?? null });

  let summary;
  try {
    const { car: carFile } = await exportCarInput(access.teamId, car.id, setup.id);
    summary = await analyseLog(await getStream(file.storage, file.key), validateCar(carFile), map as ChannelMap, options);
  } catch (error) {
    if (isEngineError(error)) return refuse(422, error.message);
    throw error;
  }
  const { traces, ...cliSummary } = summary;
  const stored = await storeSessionOfRecord({
    teamId: access.teamId,
    teamSlug: access.teamSlug,
    userId: access.userId,
    source: "api",
    raw: file,
    details: details.data,
    map: map as ChannelMap,
    options,
    summary: cliSummary,
    traces,
    engineVersion: serverEngineVersion(summary),
    origin: "server",
    enqueueCheck: true,
  });
  if (!stored.ok) return refuse(stored.status, stored.error, stored.fields);
  if (stored.duplicate) return { status: 200, body: { id: stored.id, url: absolute(stored.url), duplicate: true } };
  return { status: 201, body: { id: stored.id, url: absolute(stored.url), summary: cliSummary } };
}
