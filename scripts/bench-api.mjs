// `npm run bench:api`: latency of the data API and the Balance report page at 50 concurrent clients,
// against a running `npm start` (its seeded database on loopback; signs in as the demo user and reads
// with the session cookie and ?team=). Prints p50/p95/p99, requests per second and errors per route.
// Targets (issue 11): GET /api/sessions/:id p95 < 20 ms; GET /api/sessions (50 rows) p95 < 50 ms;
// the Balance report page p95 < 100 ms. Figures only; no pass/fail. Two more rows help read them: the
// repeat read of a summary the client already holds (If-None-Match, answered 304 without the summary), and
// GET /healthz, which touches no database: the floor of the HTTP stack on this machine at this load.
// The 1-minute load average is printed beside each row (the machine may be shared).
// Then the CPU each signed-in page's server render costs (scripts/bench-render.mjs, target < 10 ms), beside
// the latencies: under load the two read together say whether a page is slow by its own work or by waiting.
// BENCH_SECONDS (default 10) sets each route's run; BENCH_CONNECTIONS (default 50) the clients.
import { spawnSync } from "node:child_process";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import autocannon from "autocannon";
import { instances } from "./lib/env.mjs";
import { latencyFigures } from "./lib/cluster-bench.mjs";

const base = process.env.APP_URL ?? `http://127.0.0.1:${instances.dev.appPort ?? 3000}`;
const seconds = Number(process.env.BENCH_SECONDS ?? 10);
const connections = Number(process.env.BENCH_CONNECTIONS ?? 50);

const signIn = await fetch(`${base}/api/auth/sign-in/email`, {
  method: "POST",
  headers: { "content-type": "application/json", origin: base },
  body: JSON.stringify({ email: "demo@harrowgate.example", password: "kestrel-bank-2026" }),
}).catch(() => null);
if (!signIn || signIn.status !== 200) {
  console.error(`error: could not sign in at ${base} (is \`npm start\` running?)`);
  process.exit(2);
}
const cookie = signIn.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
const team = "harrowgate";
const list = await fetch(`${base}/api/sessions?team=${team}&limit=50`, { headers: { cookie } }).then((r) => r.json());
if (!list.sessions?.length) {
  console.error("error: the demo team has no sessions (the seed adds them at `npm start`)");
  process.exit(2);
}
const id = list.sessions[0].id;
const etag = (await fetch(`${base}/api/sessions/${id}?team=${team}`, { headers: { cookie } })).headers.get("etag");

const routes = [
  { name: "GET /api/sessions/:id", path: `/api/sessions/${id}?team=${team}`, target: "p95 < 20 ms" },
  { name: "  … repeat read (If-None-Match)", path: `/api/sessions/${id}?team=${team}`, headers: { "if-none-match": etag ?? "" }, ok: [304], target: "(304, no summary read)" },
  { name: `GET /api/sessions (${list.sessions.length} rows)`, path: `/api/sessions?team=${team}&limit=50`, target: "p95 < 50 ms" },
  { name: "Balance report page", path: `/t/${team}/sessions/${id}`, target: "p95 < 100 ms" },
  { name: "floor: GET /healthz (no database)", path: "/healthz", target: "(no target)" },
];

function run(route) {
  return new Promise((resolve) => {
    const latencies = [];
    const statuses = {};
    const instance = autocannon({ url: base + route.path, connections, duration: seconds, headers: { cookie, ...route.headers }, timeout: 30 });
    instance.on("response", (_client, status, _bytes, ms) => {
      latencies.push(ms);
      statuses[status] = (statuses[status] ?? 0) + 1;
    });
    instance.on("done", (result) => resolve({ latencies, statuses, result }));
  });
}

console.log(`${connections} concurrent clients, ${seconds} s per route, against ${base} (loopback, cookie session)`);
console.log(`machine: ${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(1)).join(" / ")} (figures from a loaded machine are not the app's own)`);
console.log(`  ${"route".padEnd(34)} ${"p50 ms".padStart(8)} ${"p95 ms".padStart(8)} ${"p99 ms".padStart(8)} ${"req/s".padStart(8)} ${"errors".padStart(7)} ${"load".padStart(5)}   target`);
for (const route of routes) {
  const { latencies, statuses, result } = await run(route);
  const f = latencyFigures(latencies);
  const fine = (status) => (route.ok ?? []).includes(status) || (status >= 200 && status <= 299);
  const non2xx = Object.entries(statuses).filter(([s]) => !fine(Number(s))).reduce((n, [, c]) => n + c, 0);
  const errors = non2xx + (result.errors ?? 0);
  const fmt = (v) => (v === null ? "—" : v.toFixed(1)).padStart(8);
  console.log(`  ${route.name.padEnd(34)} ${fmt(f.p50)} ${fmt(f.p95)} ${fmt(f.p99)} ${(f.count / seconds).toFixed(0).padStart(8)} ${String(errors).padStart(7)} ${os.loadavg()[0].toFixed(1).padStart(5)}   ${route.target}`);
  if (non2xx) console.log(`    statuses: ${JSON.stringify(statuses)}`);
}
console.log("");
const render = spawnSync(process.execPath, [path.join(path.dirname(fileURLToPath(import.meta.url)), "bench-render.mjs")], { stdio: "inherit" });
process.exit(render.status ?? 1);
