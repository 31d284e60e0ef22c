/**
 * The team's sessions, filtered, for the Sessions list page (sorted, a page at a time) and for
 * GET /api/sessions (newest first, cursor pagination). One query with the same filters for both:
 * car (id or exact name), setup (version id), date range, venue (id or exact name), driver (member id
 * or name), state. Headline ClA and balance come from the summary of record.
 */
import { and, asc, desc, eq, gte, like, lte, or, sql, type SQL } from "drizzle-orm";
import { z } from "zod";
import { user } from "~/db/schema/auth";
import { cars, setupSheets, setups } from "~/db/schema/garage";
import { analysisSessions, SESSION_STATUSES, venues } from "~/db/schema/sessions";
import { isCalendarDate } from "~/lib/sessions/details";
import { db } from "../db.server";

const dateParam = z
  .string()
  .trim()
  .refine((s) => isCalendarDate(s), "must be a date written YYYY-MM-DD");

export const SESSION_SORTS = ["date", "venue", "car", "driver", "run", "duration", "cla", "balance", "state"] as const;
export type SessionSort = (typeof SESSION_SORTS)[number];

const blank = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

/** Filters as they come in a URL (page and API share them). */
export const sessionFilterSchema = z.object({
  car: z.preprocess(blank, z.string().trim().max(120).optional()),
  setup: z.preprocess(blank, z.string().trim().max(36).optional()),
  from: z.preprocess(blank, dateParam.optional()),
  to: z.preprocess(blank, dateParam.optional()),
  venue: z.preprocess(blank, z.string().trim().max(80).optional()),
  driver: z.preprocess(blank, z.string().trim().max(120).optional()),
  state: z.preprocess(blank, z.enum(SESSION_STATUSES, { error: `state must be one of ${SESSION_STATUSES.join(", ")}` }).optional()),
});
export type SessionFilter = z.infer<typeof sessionFilterSchema>;

export const sessionPageSchema = sessionFilterSchema.extend({
  sort: z.preprocess(blank, z.enum(SESSION_SORTS).catch("date").default("date")),
  dir: z.preprocess(blank, z.enum(["asc", "desc"]).catch("desc").default("desc")),
  page: z.preprocess(blank, z.coerce.number().int().min(1).max(10_000).catch(1).default(1)),
});

export const sessionApiSchema = sessionFilterSchema.extend({
  limit: z.preprocess(blank, z.coerce.number({ error: "limit must be a whole number from 1 to 200" }).int().min(1).max(200).default(50)),
  cursor: z.preprocess(blank, z.string().max(300).optional()),
});

export type SessionRow = {
  id: string;
  date: string | null;
  createdAt: string;
  venue: { id: string; name: string } | null;
  car: { id: string; name: string };
  setup: { id: string; name: string; version: number };
  driver: { userId: string | null; name: string } | null;
  run: string | null;
  state: (typeof SESSION_STATUSES)[number];
  statusDetail: string | null;
  durationS: number | null;
  claTotalM2: number | null;
  balanceFrontPct: number | null;
  fileName: string | null;
};

// MariaDB keeps JSON as text: JSON_VALUE reads one figure of the summary (NULL when it is null or absent).
const figure = (path: string) => sql<number | null>`CAST(JSON_VALUE(${analysisSessions.summary}, ${path}) AS DOUBLE)`;
const claTotal = figure("$.aero.cla_total_m2");
const balanceFront = figure("$.aero.balance_front_pct");
const duration = figure("$.duration_s");

function filters(teamId: string, f: SessionFilter): SQL[] {
  const where: SQL[] = [eq(analysisSessions.teamId, teamId)];
  if (f.car) where.push(or(eq(cars.id, f.car), eq(cars.name, f.car))!);
  if (f.setup) where.push(eq(analysisSessions.setupId, f.setup));
  if (f.from) where.push(gte(analysisSessions.sessionDate, f.from));
  if (f.to) where.push(lte(analysisSessions.sessionDate, f.to));
  if (f.venue) where.push(or(eq(venues.id, f.venue), eq(venues.name, f.venue))!);
  if (f.driver) {
    const pattern = `%${f.driver.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.push(or(eq(analysisSessions.driverUserId, f.driver), like(analysisSessions.driverName, pattern), like(user.name, pattern))!);
  }
  if (f.state) where.push(eq(analysisSessions.status, f.state));
  return where;
}

function baseQuery(where: SQL[]) {
  return db
    .select({
      id: analysisSessions.id,
      date: analysisSessions.sessionDate,
      createdAt: analysisSessions.createdAt,
      venueId: venues.id,
      venueName: venues.name,
      carId: cars.id,
      carName: cars.name,
      setupId: setups.id,
      setupVersion: setups.version,
      sheetName: setupSheets.name,
      driverUserId: analysisSessions.driverUserId,
      driverUserName: user.name,
      driverName: analysisSessions.driverName,
      run: analysisSessions.runLabel,
      state: analysisSessions.status,
      statusDetail: analysisSessions.statusDetail,
      durationS: duration,
      claTotalM2: claTotal,
      balanceFrontPct: balanceFront,
      fileName: analysisSessions.rawFileName,
    })
    .from(analysisSessions)
    .innerJoin(cars, eq(cars.id, analysisSessions.carId))
    .innerJoin(setups, eq(setups.id, analysisSessions.setupId))
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .leftJoin(venues, eq(venues.id, analysisSessions.venueId))
    .leftJoin(user, eq(user.id, analysisSessions.driverUserId))
    .where(and(...where));
}

type Raw = Awaited<ReturnType<ReturnType<typeof baseQuery>["execute"]>>[number];

const num = (v: unknown) => (v === null || v === undefined ? null : Number.isFinite(Number(v)) ? Number(v) : null);

function toRow(r: Raw): SessionRow {
  const driverName = r.driverUserName ?? r.driverName;
  return {
    id: r.id,
    date: r.date,
    createdAt: r.createdAt.toISOString(),
    venue: r.venueId && r.venueName ? { id: r.venueId, name: r.venueName } : null,
    car: { id: r.carId, name: r.carName },
    setup: { id: r.setupId, name: r.sheetName, version: r.setupVersion },
    driver: driverName ? { userId: r.driverUserId, name: driverName } : null,
    run: r.run,
    state: r.state,
    statusDetail: r.statusDetail,
    durationS: num(r.durationS),
    claTotalM2: num(r.claTotalM2),
    balanceFrontPct: num(r.balanceFrontPct),
    fileName: r.fileName,
  };
}

const SORT_COLUMNS: Record<SessionSort, SQL | typeof analysisSessions.sessionDate> = {
  date: sql`${analysisSessions.sessionDate}`,
  venue: sql`${venues.name}`,
  car: sql`${cars.name}`,
  driver: sql`COALESCE(${user.name}, ${analysisSessions.driverName})`,
  run: sql`${analysisSessions.runLabel}`,
  duration: duration,
  cla: claTotal,
  balance: balanceFront,
  state: sql`${analysisSessions.status}`,
};

export const SESSIONS_PER_PAGE = 25;

/** A page of the list, sorted; ties by newest first. */
export async function listSessionsPage(teamId: string, q: z.infer<typeof sessionPageSchema>) {
  const where = filters(teamId, q);
  const order = q.dir === "asc" ? asc : desc;
  const rows = await baseQuery(where)
    .orderBy(order(SORT_COLUMNS[q.sort]), desc(analysisSessions.createdAt), desc(analysisSessions.id))
    .limit(SESSIONS_PER_PAGE + 1)
    .offset((q.page - 1) * SESSIONS_PER_PAGE);
  return { rows: rows.slice(0, SESSIONS_PER_PAGE).map(toRow), hasNext: rows.length > SESSIONS_PER_PAGE };
}

// The dashboard's newest sessions, in the list's default order (date, then stored, newest first): prepared
// once, as every dashboard render reads it.
let recentStatement: ReturnType<typeof prepareRecent> | undefined;
function prepareRecent() {
  return baseQuery([eq(analysisSessions.teamId, sql.placeholder("teamId"))])
    .orderBy(desc(SORT_COLUMNS.date), desc(analysisSessions.createdAt), desc(analysisSessions.id))
    .limit(sql.placeholder("limit"))
    .prepare();
}

/** The team's newest `limit` sessions, as the Sessions list's first page shows them. */
export async function recentSessions(teamId: string, limit = 5): Promise<SessionRow[]> {
  return (await (recentStatement ??= prepareRecent()).execute({ teamId, limit })).map(toRow);
}

/** Does the team have any session at all (the empty list says what to do first)? */
export async function teamHasSessions(teamId: string): Promise<boolean> {
  const [row] = await db.select({ id: analysisSessions.id }).from(analysisSessions).where(eq(analysisSessions.teamId, teamId)).limit(1);
  return Boolean(row);
}

type Cursor = { d: string | null; c: string; i: string };

function encodeCursor(row: SessionRow): string {
  return Buffer.from(JSON.stringify({ d: row.date, c: row.createdAt, i: row.id } satisfies Cursor)).toString("base64url");
}

function decodeCursor(cursor: string): Cursor | null {
  try {
    const value = JSON.parse(Buffer.from(cursor, "base64url").toString("utf8")) as Cursor;
    if ((value.d === null || isCalendarDate(value.d)) && typeof value.c === "string" && !Number.isNaN(Date.parse(value.c)) && typeof value.i === "string") return value;
  } catch {
    // fall through
  }
  return null;
}

/**
 * Newest first (session date, then when it was stored; sessions without a date last), `limit` at a
 * time; `next` is the cursor for the following page, or null. Throws "bad_cursor" for a cursor we did not make.
 */
export async function listSessionsApi(teamId: string, q: z.infer<typeof sessionApiSchema>): Promise<{ rows: SessionRow[]; next: string | null }> {
  const where = filters(teamId, q);
  if (q.cursor) {
    const c = decodeCursor(q.cursor);
    if (!c) throw new Error("bad_cursor");
    const at = new Date(c.c);
    const sameDateLater = and(
      or(sql`${analysisSessions.createdAt} < ${at}`, and(eq(analysisSessions.createdAt, at), sql`${analysisSessions.id} < ${c.i}`)),
    )!;
    where.push(
      c.d === null
        ? and(sql`${analysisSessions.sessionDate} IS NULL`, sameDateLater)!
        : or(
            sql`${analysisSessions.sessionDate} < ${c.d}`,
            sql`${analysisSessions.sessionDate} IS NULL`,
            and(eq(analysisSessions.sessionDate, c.d), sameDateLater),
          )!,
    );
  }
  const rows = await baseQuery(where)
    // NULL dates sort last in a descending order.
    .orderBy(sql`${analysisSessions.sessionDate} IS NULL`, desc(analysisSessions.sessionDate), desc(analysisSessions.createdAt), desc(analysisSessions.id))
    .limit(q.limit + 1);
  const page = rows.slice(0, q.limit).map(toRow);
  return { rows: page, next: rows.length > q.limit ? encodeCursor(page[page.length - 1]) : null };
}
