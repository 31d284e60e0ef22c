// Authorisation matrix (issue 12 item 6): every route in app/routes.ts × owner, engineer, analyst, driver,
// signed out, a Brief-link holder and a member of another team, read (GET through the loader) and write
// (POST through the action, with a probe body that no action accepts, so nothing is changed). The route list
// is generated from routes.ts: a route added without a rule here fails the first test.
// Rules come from the permission table in DEVELOPERS.md ("Current grants") and app/lib/access.ts; a row of
// another team is answered 404, never 403 (DEVELOPERS.md, "Teams, roles and permissions").
import { beforeAll, describe, expect, it } from "vitest";
import type { RouteConfigEntry } from "@react-router/dev/routes";
import routes from "~/routes";
import { args, CookieJar, formRequest, getRequest, outcome, type Outcome } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";
import { createBrief } from "~/server/brief.server";

type Actor = "owner" | "engineer" | "analyst" | "driver" | "signedOut" | "briefHolder" | "otherTeam";
const ACTORS: Actor[] = ["owner", "engineer", "analyst", "driver", "signedOut", "briefHolder", "otherTeam"];
const ROLES = ["owner", "engineer", "analyst", "driver"] as const;
type Role = (typeof ROLES)[number];

/** ok: answered (2xx/3xx, not a sign-in redirect); pass: got past the checks (not 401/403/404 nor sign-in). */
type Want = number | "ok" | "login" | "pass";
type Row = Record<Actor, Want>;
type Rule = { get: Row; post?: Row | "none"; why?: string };

const all = (want: Want): Row => Object.fromEntries(ACTORS.map((a) => [a, want])) as Row;
/** Signed-in users of any team; anyone else is sent to sign in. */
const signedIn = (want: Want = "ok"): Row => ({ ...all(want), signedOut: "login", briefHolder: "login" });
/** A team page or resource: roles in `allowed` get `want`, the other roles 403, another team 404, anyone else sign-in. */
const team = (allowed: readonly Role[], want: Want = "ok"): Row => ({
  owner: allowed.includes("owner") ? want : 403,
  engineer: allowed.includes("engineer") ? want : 403,
  analyst: allowed.includes("analyst") ? want : 403,
  driver: allowed.includes("driver") ? want : 403,
  signedOut: "login",
  briefHolder: "login",
  otherTeam: 404,
});
const EVERYONE = ROLES;
const EDITORS = ["owner", "engineer"] as const; // car/setup create+update, session upload, share (access.ts)
const READERS = ["owner", "engineer", "analyst"] as const; // session read, compare (access.ts)
const OWNER = ["owner"] as const;

// One rule per route file. Probe POSTs carry intent=__matrix_probe__ and nothing else.
const RULES: Record<string, Rule> = {
  "routes/home/landing.tsx": { get: all("ok") },
  "routes/auth/sign-up.tsx": { get: all("ok"), post: all("pass") },
  "routes/auth/sign-in.tsx": { get: all("ok"), post: all("pass") },
  "routes/auth/sign-out.tsx": { get: all("ok"), post: "none", why: "the action signs the caller out (auth-flow.test.ts)" },
  "routes/auth/verify.tsx": { get: all("ok") },
  "routes/auth/forgot-password.tsx": { get: all("ok"), post: all("pass") },
  "routes/auth/reset-password.tsx": { get: all("ok"), post: all("pass") },
  "routes/account/account.tsx": { get: signedIn(), post: signedIn("pass") },
  "routes/teams/new.tsx": { get: signedIn(), post: signedIn("pass") },
  "routes/teams/invitation.tsx": { get: all(404), post: signedIn(400), why: "an invitation id nobody was sent; the probe is refused as input" },
  "routes/teams/layout.tsx": { get: team(EVERYONE) },
  "routes/teams/dashboard.tsx": { get: team(EVERYONE) },
  "routes/teams/settings.tsx": { get: team(EVERYONE), post: team(OWNER, "pass") },
  "routes/garage/cars.tsx": { get: team(EVERYONE) },
  "routes/garage/car-new.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/garage/import.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/garage/car.tsx": { get: team(EVERYONE), post: team(EVERYONE, "pass"), why: "each intent checks its own permission after reading it" },
  "routes/garage/car-edit.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/garage/setup-new.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/garage/setup.tsx": { get: team(EVERYONE), post: team(EDITORS, "pass"), why: "an unknown intent is a duplicate (setup: create)" },
  "routes/garage/setup-edit.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/garage/setup-diff.tsx": { get: team(EVERYONE) },
  "routes/sessions/list.tsx": { get: team(READERS) },
  "routes/sessions/venues.tsx": { get: team(READERS), post: team(EDITORS, "pass") },
  "routes/sessions/new.tsx": { get: team(EDITORS) },
  "routes/audit/audit.tsx": { get: team(OWNER) },
  "routes/sessions/session.tsx": { get: team(READERS), post: team(READERS, "pass"), why: "annotating is session: annotate (owner, engineer, analyst)" },
  "routes/compare/compare.tsx": { get: team(READERS), post: team(READERS, "pass"), why: "saving a comparison needs compare: read and session: annotate" },
  "routes/api/compare.ts": { get: { ...api(team(READERS, "pass")), otherTeam: "pass" }, why: "no ids given: 400 after the checks; another team's member is scoped to their own team" },
  "routes/teams/export.ts": { get: team(OWNER) },
  "routes/dev/mailbox.tsx": { get: all("ok"), why: "DEV_MAILBOX=on in npm test; 404 in production" },
  "routes/dev/message.tsx": { get: all(404) },
  "routes/health/healthz.ts": { get: all(200) },
  "routes/health/readyz.ts": { get: all(200) },
  "routes/api/auth.ts": { get: all(200), post: all(404), why: "GET /api/auth/ok; POST /api/auth/ok is no endpoint" },
  "routes/api/cars.ts": { get: api(team(EVERYONE)) },
  "routes/api/cars-import.ts": { get: all(405), post: api(team(EDITORS, "pass")) },
  "routes/api/cars-export.ts": { get: api(team(EVERYONE)) },
  "routes/api/tokens.ts": { get: api(signedIn()), post: api(signedIn("pass")) },
  "routes/api/token.ts": { get: all(405), post: all(405) },
  "routes/api/uploads.ts": { get: all(405), post: api(team(EDITORS, "pass")) },
  "routes/api/team-sessions.ts": { get: all(405), post: api(team(EDITORS, "pass")) },
  "routes/api/logger-profiles.ts": { get: api(team(EDITORS)) },
  "routes/api/sessions.ts": { get: { ...api(team(READERS)), otherTeam: 200 }, post: all(401), why: "a cookie lists the caller's only team (another team's member sees their own); POST needs a token" },
  "routes/api/session-summary.ts": { get: api(team(READERS)) },
  "routes/api/session-bands-csv.ts": { get: api(team(READERS)) },
  "routes/api/session-traces.ts": { get: api(team(READERS)) },
  "routes/api/session-delete.ts": { get: all(405), post: api(team(OWNER, "pass")) },
  "routes/api/not-found.ts": { get: all(404), post: all(404) },
  "routes/home/not-found.tsx": { get: all(404) },
  "routes/api/cars-list.ts": { get: { ...api(team(EVERYONE)), otherTeam: 200 }, why: "a cookie lists the caller's only team" },
  "routes/api/cars-setups.ts": { get: api(team(EVERYONE)) },
  "routes/api/openapi.ts": { get: all(200) },
  "routes/api/session-reanalyse.ts": { get: all(405), post: api(team(EDITORS, "pass")) },
  "routes/brief/briefs.tsx": { get: team(EDITORS), post: team(EDITORS, "pass") },
  "routes/brief/brief.tsx": { get: all(200), why: "a live link: whoever holds it sees the one session, signed in or not" },
  "routes/brief/shared.tsx": { get: signedIn(404), why: "a brief id not shared with any of them" },
};

/** Resource routes answer 401 JSON instead of a sign-in redirect. */
function api(row: Row): Row {
  return { ...row, signedOut: row.signedOut === "login" ? 401 : row.signedOut, briefHolder: row.briefHolder === "login" ? 401 : row.briefHolder };
}

type Flat = { path: string; file: string };
function flatten(entries: RouteConfigEntry[], parent = ""): Flat[] {
  return entries.flatMap((e) => {
    const path = e.index ? parent : [parent, e.path ?? ""].filter(Boolean).join("/");
    return [{ path, file: e.file }, ...flatten(e.children ?? [], path)];
  });
}

let w: Awaited<ReturnType<typeof garageWorld>>;
let sessionId = "";
let briefToken = "";
const jars = {} as Record<Actor, CookieJar>;

beforeAll(async () => {
  w = await garageWorld();
  sessionId = (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Matrix session" })).id;
  for (const role of ROLES) jars[role] = w.jars[role];
  jars.otherTeam = w.jars.outsider;
  jars.signedOut = new CookieJar();
  // The Brief-link holder has the link to this session and no cookie: everywhere else they are a stranger.
  jars.briefHolder = new CookieJar();
  const made = await createBrief({ id: w.team.id, name: w.team.name }, { id: w.userIds.engineer, name: "Matrix" }, { sessionId, note: null, days: 14, recipientEmail: null });
  briefToken = made.token;
}, 120_000);

function concretePath(pattern: string): string {
  const ids: Record<string, string> = {
    teamSlug: w.team.slug,
    carId: w.carId,
    setupId: w.setupId,
    sessionId,
    id: "00000000-0000-4000-8000-000000000000",
    briefId: "00000000-0000-4000-8000-000000000000",
    token: briefToken,
  };
  const path = "/" + pattern.replace(/:(\w+)/g, (_, k: string) => ids[k] ?? k).replace("*", pattern.startsWith("api/auth") ? "ok" : "no-such-thing");
  if (pattern === "t/:teamSlug/garage/:carId/setups/:setupId/diff") return `${path}?against=${w.setupId}`;
  return path;
}

function paramsOf(pattern: string, path: string): Record<string, string> {
  const names = [...pattern.matchAll(/:(\w+)/g)].map((m) => m[1]);
  const parts = path.split("?")[0].split("/").slice(1);
  const out: Record<string, string> = {};
  pattern.split("/").forEach((seg, i) => {
    if (seg.startsWith(":")) out[seg.slice(1)] = decodeURIComponent(parts[i]);
  });
  if (pattern.endsWith("*")) out["*"] = parts.slice(pattern.split("/").length - 1).join("/");
  void names;
  return out;
}

function verdict(o: Outcome, resource: boolean): Want {
  const toSignIn = o.status >= 300 && o.status < 400 && (o.location ?? "").startsWith("/sign-in");
  if (toSignIn) return "login";
  return o.status;
}

function matches(want: Want, o: Outcome): boolean {
  const got = verdict(o, false);
  if (want === "ok") return got !== "login" && typeof got === "number" && got >= 200 && got < 400;
  if (want === "pass") return got !== "login" && ![401, 403, 404].includes(got as number);
  return got === want;
}

const flat = flatten(routes as RouteConfigEntry[]);

describe("authorisation matrix", () => {
  it("every route in app/routes.ts has a rule (a new route needs one here)", () => {
    const missing = flat.filter((r) => !RULES[r.file]).map((r) => `${r.path || "/"} → ${r.file}`);
    expect(missing).toEqual([]);
    const stale = Object.keys(RULES).filter((f) => !flat.some((r) => r.file === f));
    expect(stale).toEqual([]);
  });

  it.each(flat.map((r) => [r.path || "/", r.file] as const))("%s (%s)", async (pattern, file) => {
    const rule = RULES[file];
    if (!rule) return;
    const mod = (await import(/* @vite-ignore */ `../../app/${file}`)) as { loader?: (a: unknown) => unknown; action?: (a: unknown) => unknown };
    const path = concretePath(pattern);
    const params = paramsOf(pattern, path);
    const lines: string[] = [];
    const wrong: string[] = [];
    for (const actor of ACTORS) {
      if (mod.loader) {
        const got = await outcome(() => mod.loader!(args(getRequest(path, jars[actor]), params)));
        lines.push(`GET ${actor} ${verdict(got, true)}`);
        if (!matches(rule.get[actor], got)) wrong.push(`GET ${path} as ${actor}: wanted ${rule.get[actor]}, got ${got.status}${got.location ? " → " + got.location : ""}`);
        // Whatever another team's member or a stranger is answered, it never carries this team's data.
        if (actor === "otherTeam" || actor === "signedOut" || actor === "briefHolder") {
          const text = JSON.stringify(got.body ?? null);
          if (text.includes(sessionId) || text.includes(w.carId) || text.includes(w.setupId)) wrong.push(`GET ${path} as ${actor}: the answer carries the team's ids`);
        }
      }
      if (mod.action && rule.post !== "none") {
        const want = rule.post?.[actor];
        const got = await outcome(() => mod.action!(args(formRequest(path, { intent: "__matrix_probe__" }, jars[actor]), params)));
        lines.push(`POST ${actor} ${verdict(got, true)}`);
        if (want === undefined) wrong.push(`POST ${path}: the module has an action but the rule has no post row`);
        else if (!matches(want, got)) wrong.push(`POST ${path} as ${actor}: wanted ${want}, got ${got.status}${got.location ? " → " + got.location : ""}`);
      }
    }
    console.log(`tried: ${path} (${file}); held: ${lines.join(", ")}`);
    expect(wrong).toEqual([]);
  });
});
