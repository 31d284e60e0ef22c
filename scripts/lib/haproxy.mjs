// HAProxy (Debian's package) in front of the app processes and the Galera nodes, for `npm run cluster`.
//
// - App frontend: round robin over the app processes, each health-checked on GET /healthz. A process
//   that dies is taken out after three failed checks (new requests that find it gone go to another at once); a GET that was in flight on it (the connection
//   closed with no answer) is sent again to another process by HAProxy's layer-7 retries. Requests
//   with a body (uploads) are never retried by the proxy: their client sends them again.
// - Database frontend: one writer at a time. db1 takes every connection while it is up; db2, then
//   db3, are backups. The first refused connection marks a dead node down (live traffic is observed),
//   so the next connection already goes to the next node. A one-entry stick table keeps the writer where it is once it has moved, so a
//   node that comes back (and may still be catching up) does not take the writes back; this is the
//   usual way to avoid Galera's certification conflicts between two writers.
import { mkdirSync, openSync, writeFileSync } from "node:fs";
import path from "node:path";
import { findExecutable, info, sleep, spawnService, terminatePid, UserFacingError } from "./proc.mjs";

export const haproxyPackage = { pkg: "haproxy", present: () => Boolean(findExecutable("haproxy")) };

/**
 * The configuration text. layout: from clusterLayout(); options.appCheckPath: the route the proxy
 * polls on each app process.
 */
export function haproxyConfig(layout, { appCheckPath = "/healthz" } = {}) {
  const appServers = layout.appPorts.map((port, i) => `  server app${i + 1} 127.0.0.1:${port} check`);
  const dbServers = layout.nodes.map(
    (node, i) => `  server ${node.name} 127.0.0.1:${node.clientPort} check${i === 0 ? "" : " backup"}`,
  );
  return `# Written by scripts/lib/haproxy.mjs for npm run cluster; regenerated on every start.
global
  maxconn 4096
  log stdout format raw daemon notice

defaults
  log global
  option dontlognull
  timeout connect 2s
  retries 3

# Statistics and server states (read by npm run bench:cluster as CSV at /;csv).
listen stats
  mode http
  bind 127.0.0.1:${layout.statsPort}
  timeout client 30s
  timeout server 30s
  stats enable
  stats uri /
  stats refresh 2s

frontend app
  mode http
  bind 127.0.0.1:${layout.appFrontPort}
  option httplog
  option dontlog-normal
  # Uploads of several hundred MB and the server's reading of them take minutes on a busy host.
  timeout client 10m
  timeout http-request 30s
  option forwardfor
  default_backend app_processes

backend app_processes
  mode http
  balance roundrobin
  timeout server 10m
  option httpchk
  http-check send meth GET uri ${appCheckPath} ver HTTP/1.1 hdr Host 127.0.0.1
  http-check expect status 200
  # A busy process answers its check late, not never: give it 5 s before a check counts as failed
  # (a dead one refuses the connection at once and is out after three checks, about 2 s).
  timeout check 5s
  default-server inter 1s fastinter 500ms fall 3 rise 2
  option redispatch 1
  retry-on conn-failure empty-response response-timeout 500 502 503 504
  # Only requests without a body that change nothing are sent again.
  http-request disable-l7-retry unless METH_GET
${appServers.join("\n")}

frontend database
  mode tcp
  bind 127.0.0.1:${layout.dbFrontPort}
  timeout client 1h
  default_backend galera_writer

backend galera_writer
  mode tcp
  timeout server 1h
  option mysql-check user haproxy_check post-41
  # One entry: every connection goes to the node that took the writes last, while it is up.
  stick-table type integer size 1
  stick on int(1)
  default-server inter 1s fastinter 500ms fall 2 rise 3 on-marked-down shutdown-sessions observe layer4 error-limit 1 on-error mark-down
  # A connection refused by a node that has just died marks it down at once (observe layer4), and is
  # tried again on the next node instead of failing (redispatch), without waiting for two failed checks.
  option redispatch
${dbServers.join("\n")}
`;
}

/** Parse HAProxy's CSV statistics into [{ proxy, server, status, sessions, active, backup }]. */
export function parseHaproxyStats(csv) {
  const lines = csv.trim().split("\n");
  const header = lines[0].replace(/^# /, "").split(",");
  const col = (name) => header.indexOf(name);
  return lines.slice(1).map((line) => {
    const cells = line.split(",");
    return {
      proxy: cells[col("pxname")],
      server: cells[col("svname")],
      status: cells[col("status")],
      sessionsTotal: Number(cells[col("stot")] || 0),
      current: Number(cells[col("scur")] || 0),
      active: cells[col("act")] === "1",
      backup: cells[col("bck")] === "1",
      retries: Number(cells[col("wretr")] || 0),
      redispatches: Number(cells[col("wredis")] || 0),
    };
  });
}

export async function fetchHaproxyStats(layout) {
  const response = await fetch(`http://127.0.0.1:${layout.statsPort}/;csv`, { signal: AbortSignal.timeout(3000) });
  if (!response.ok) throw new Error(`HAProxy statistics answered ${response.status}`);
  return parseHaproxyStats(await response.text());
}

/** Start HAProxy in the foreground (-db) with the generated configuration; resolves once its frontends listen. */
export async function startHaproxy(layout, options = {}) {
  const haproxy = findExecutable("haproxy");
  if (!haproxy) throw new UserFacingError("haproxy was not found; install Debian's haproxy package");
  mkdirSync(layout.logDir, { recursive: true });
  writeFileSync(layout.haproxyConfig, haproxyConfig(layout, options));
  const logFile = path.join(layout.logDir, "haproxy.log");
  const out = openSync(logFile, "a");
  const service = spawnService("haproxy", haproxy, ["-db", "-f", layout.haproxyConfig], { stdio: ["ignore", out, out] });
  let exited = null;
  service.exited.then((result) => (exited = result));
  const deadline = Date.now() + 15_000;
  for (;;) {
    if (exited) throw new UserFacingError(`haproxy exited (code ${exited.code}) while starting; see ${logFile}`);
    try {
      await fetchHaproxyStats(layout);
      break;
    } catch {
      if (Date.now() > deadline) {
        await terminatePid(service.child.pid);
        throw new UserFacingError(`haproxy did not answer on 127.0.0.1:${layout.statsPort} within 15 s; see ${logFile}`);
      }
      await sleep(200);
    }
  }
  info(`HAProxy is up: app on 127.0.0.1:${layout.appFrontPort}, database writer on 127.0.0.1:${layout.dbFrontPort}, stats on 127.0.0.1:${layout.statsPort} (pid ${service.child.pid})`);
  return { pid: service.child.pid, exited: service.exited, stop: () => terminatePid(service.child.pid, { timeoutMs: 5000 }) };
}
