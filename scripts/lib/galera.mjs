// A three-node Galera cluster of Debian's MariaDB (mariadb-server + galera-4) on loopback, for
// `npm run cluster`. Each node has its own datadir under .data/cluster/, owned by the `mysql` user
// (rsync state transfer refuses to run as root), and its own client, group, IST and SST ports.
//
// Bootstrapping follows the Galera documentation: a new cluster starts from one node with
// --wsrep-new-cluster; a cluster that was stopped starts again from the node whose grastate.dat says
// safe_to_bootstrap: 1 (the last one to stop), or, after a crash, from the node with the highest
// recovered seqno (mariadbd --wsrep-recover). A node that restarts after a crash recovers its position
// first, so it rejoins by incremental state transfer (IST) instead of copying the whole datadir.
import { chownSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import path from "node:path";
import {
  assertPortFree, commandLineOf, findExecutable, info, isAlive, run, runQuiet, sleep, spawnService,
  terminatePid, UserFacingError, waitForExit,
} from "./proc.mjs";

export const GALERA_PROVIDER = "/usr/lib/galera/libgalera_smm.so";
export const galeraPackages = [
  { pkg: "mariadb-server", present: () => Boolean(findExecutable("mariadbd")) },
  { pkg: "galera-4", present: () => existsSync(GALERA_PROVIDER) },
  { pkg: "rsync", present: () => Boolean(findExecutable("rsync")) },
];

function tools() {
  const names = { server: "mariadbd", install: "mariadb-install-db", admin: "mariadb-admin", client: "mariadb" };
  const found = {};
  for (const [key, name] of Object.entries(names)) {
    found[key] = findExecutable(name);
    if (!found[key]) throw new UserFacingError(`${name} was not found; install Debian's mariadb-server`);
  }
  return found;
}

/** uid and gid of the `mysql` account that Debian's mariadb-server package creates. */
function mysqlAccount() {
  try {
    const uid = Number(execFileSync("id", ["-u", "mysql"], { encoding: "utf8" }).trim());
    const gid = Number(execFileSync("id", ["-g", "mysql"], { encoding: "utf8" }).trim());
    return { uid, gid };
  } catch {
    throw new UserFacingError("there is no `mysql` user; Debian's mariadb-server package creates it (apt-get install mariadb-server)");
  }
}

/** chown -R to mysql (the nodes run as mysql; rsync state transfer fails as root). */
function chownTree(dir, { uid, gid }) {
  chownSync(dir, uid, gid);
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) chownTree(full, { uid, gid });
    else chownSync(full, uid, gid);
  }
}

function logTail(file, lines = 20) {
  try {
    return readFileSync(file, "utf8").trimEnd().split("\n").slice(-lines).join("\n");
  } catch {
    return "(no log)";
  }
}

/** Root reaches a node through its Unix socket (unix_socket authentication, as mariadb-install-db sets up). */
const socketArgs = (node) => ["--no-defaults", `--socket=${node.socket}`, "-u", "root"];

/** One SQL statement on a node through its socket; resolves with the tab-separated rows, or null when it cannot connect. */
export async function nodeQuery(node, sql) {
  const { client } = tools();
  const result = await run(client, [...socketArgs(node), "--connect-timeout=2", "-N", "-B", "-e", sql], {
    stdio: ["ignore", "pipe", "pipe"],
  });
  if (result.code !== 0) return null;
  return result.output.trim() ? result.output.trim().split("\n").map((line) => line.split("\t")) : [];
}

/** wsrep status of a node: { size, state, ready, connected, clusterStatus } or null when it does not answer. */
export async function nodeStatus(node) {
  const rows = await nodeQuery(
    node,
    "SHOW GLOBAL STATUS WHERE Variable_name IN ('wsrep_cluster_size','wsrep_local_state_comment','wsrep_ready','wsrep_connected','wsrep_cluster_status','wsrep_last_committed')",
  );
  if (!rows) return null;
  const map = Object.fromEntries(rows);
  return {
    size: Number(map.wsrep_cluster_size ?? 0),
    state: map.wsrep_local_state_comment ?? "",
    ready: map.wsrep_ready === "ON",
    connected: map.wsrep_connected === "ON",
    clusterStatus: map.wsrep_cluster_status ?? "",
    lastCommitted: Number(map.wsrep_last_committed ?? -1),
  };
}

/** Contents of a node's grastate.dat: { uuid, seqno, safeToBootstrap } or null when it has none yet. */
export function readGrastate(datadir) {
  const file = path.join(datadir, "grastate.dat");
  if (!existsSync(file)) return null;
  return parseGrastate(readFileSync(file, "utf8"));
}

export function parseGrastate(text) {
  const field = (name) => text.match(new RegExp(`^${name}:\\s*(\\S+)`, "m"))?.[1];
  const uuid = field("uuid") ?? null;
  const seqno = Number(field("seqno") ?? -1);
  return { uuid, seqno: Number.isFinite(seqno) ? seqno : -1, safeToBootstrap: field("safe_to_bootstrap") === "1" };
}

/**
 * Which node starts the cluster. nodes: [{ name, grastate, recovered }] where recovered is the seqno
 * `--wsrep-recover` found (or null). Returns { name, reason, needsSafeFlag }:
 * - no node has state yet: the first node starts a new cluster;
 * - a node says safe_to_bootstrap: 1 (it stopped last, cleanly): that one;
 * - otherwise (the whole cluster stopped abruptly) the node with the highest recovered seqno, after
 *   marking it safe, which is the recovery the Galera documentation gives.
 */
export function chooseBootstrapNode(nodes) {
  const withState = nodes.filter((n) => n.grastate?.uuid && n.grastate.uuid !== "00000000-0000-0000-0000-000000000000");
  if (withState.length === 0) return { name: nodes[0].name, reason: "new cluster", needsSafeFlag: false };
  const safe = withState.find((n) => n.grastate.safeToBootstrap);
  if (safe) return { name: safe.name, reason: "it stopped last (safe_to_bootstrap: 1)", needsSafeFlag: false };
  let best = null;
  for (const n of withState) {
    const seqno = Math.max(n.grastate.seqno, n.recovered ?? -1);
    if (!best || seqno > best.seqno) best = { name: n.name, seqno };
  }
  return { name: best.name, reason: `highest recovered seqno (${best.seqno}) after an abrupt stop`, needsSafeFlag: true };
}

function setSafeToBootstrap(datadir) {
  const file = path.join(datadir, "grastate.dat");
  const text = readFileSync(file, "utf8");
  writeFileSync(file, text.replace(/^safe_to_bootstrap:.*$/m, "safe_to_bootstrap: 1"));
}

/** Donors for a joiner: the other nodes, the one least likely to be the writer first (writes go to db1, then db2, …). */
function donorList(layout, node) {
  return `${layout.nodes.filter((n) => n !== node).map((n) => n.name).reverse().join(",")},`;
}

/** mariadbd arguments of a Galera node (--no-defaults first, as mariadbd requires). */
export function nodeArgs(layout, node, { newCluster = false, startPosition = null, recover = false } = {}) {
  const peers = layout.nodes.map((n) => `127.0.0.1:${n.groupPort}`).join(",");
  const providerOptions = [
    `base_host=127.0.0.1`,
    `base_port=${node.groupPort}`,
    `gmcast.listen_addr=tcp://127.0.0.1:${node.groupPort}`,
    `ist.recv_addr=127.0.0.1:${node.istPort}`,
    // Keep enough write sets for a node that was down for a while to rejoin by IST.
    `gcache.size=256M`,
    // Notice a dead peer in a few seconds rather than the default ~5–15 s.
    `evs.suspect_timeout=PT3S`,
    `evs.inactive_timeout=PT6S`,
  ].join(";");
  return [
    "--no-defaults",
    `--datadir=${node.datadir}`,
    `--socket=${node.socket}`,
    `--pid-file=${node.pidFile}`,
    `--tmpdir=${node.tmpdir}`,
    `--port=${node.clientPort}`,
    "--bind-address=127.0.0.1",
    "--user=mysql",
    "--skip-name-resolve",
    `--log-error=${recover ? path.join(layout.logDir, `${node.name}-recover.log`) : node.log}`,
    "--character-set-server=utf8mb4",
    "--collation-server=utf8mb4_unicode_ci",
    "--innodb-buffer-pool-size=128M",
    "--max-connections=300",
    // What Galera requires of every node.
    "--binlog-format=ROW",
    "--default-storage-engine=InnoDB",
    "--innodb-autoinc-lock-mode=2",
    "--wsrep-on=ON",
    `--wsrep-provider=${GALERA_PROVIDER}`,
    `--wsrep-cluster-name=${layout.clusterName}`,
    `--wsrep-cluster-address=gcomm://${peers}`,
    `--wsrep-node-name=${node.name}`,
    `--wsrep-node-address=127.0.0.1:${node.groupPort}`,
    `--wsrep-node-incoming-address=127.0.0.1:${node.clientPort}`,
    `--wsrep-provider-options=${providerOptions}`,
    "--wsrep-sst-method=rsync",
    `--wsrep-sst-receive-address=127.0.0.1:${node.sstPort}`,
    `--wsrep-sst-donor=${donorList(layout, node)}`,
    "--wsrep-slave-threads=2",
    // While a dead peer is being voted out (a few seconds after a node dies) the writer node's view is
    // changing and plain reads would be refused ("WSREP has not yet prepared node for application
    // use"); let SELECTs through meanwhile. Writes still wait for a primary component.
    "--wsrep-dirty-reads=ON",
    ...(newCluster ? ["--wsrep-new-cluster"] : []),
    ...(startPosition ? [`--wsrep-start-position=${startPosition}`] : []),
    ...(recover ? ["--wsrep-recover"] : []),
  ];
}

/** Initialise a node's datadir on first use (system tables, root by Unix socket), owned by mysql. */
function initialiseNode(node, installDb, account, logDir) {
  if (existsSync(path.join(node.datadir, "mysql"))) return false;
  if (existsSync(node.datadir) && readdirSync(node.datadir).length) rmSync(node.datadir, { recursive: true, force: true });
  mkdirSync(node.datadir, { recursive: true });
  chownTree(node.datadir, account);
  info(`initialising ${node.name}'s datadir at ${path.relative(process.cwd(), node.datadir) || node.datadir}`);
  // Its own temporary folder here too: files of other servers' runs in a shared /tmp come and go.
  ensureTmpdir(node);
  execFileSync(installDb, [
    "--no-defaults", `--datadir=${node.datadir}`, "--user=mysql",
    "--auth-root-authentication-method=socket", "--skip-test-db", `--tmpdir=${node.tmpdir}`,
  ], { stdio: ["ignore", "pipe", "pipe"], env: { ...process.env, TMPDIR: node.tmpdir } });
  chownTree(node.datadir, account);
  mkdirSync(logDir, { recursive: true });
  return true;
}

/** The node's own temporary-table folder, owned by mysql. */
function ensureTmpdir(node) {
  mkdirSync(node.tmpdir, { recursive: true });
  chownTree(node.tmpdir, mysqlAccount());
}

/** The seqno `mariadbd --wsrep-recover` finds in a node's InnoDB (its last committed write set), or null. */
async function recoverPosition(layout, node) {
  ensureTmpdir(node);
  const { server } = tools();
  const log = path.join(layout.logDir, `${node.name}-recover.log`);
  rmSync(log, { force: true });
  await run(server, nodeArgs(layout, node, { recover: true }), { stdio: "ignore" });
  const match = logTail(log, 200).match(/WSREP: Recovered position:\s*([0-9a-f-]{36}):(-?\d+)/);
  if (!match) return null;
  return { uuid: match[1], seqno: Number(match[2]), position: `${match[1]}:${match[2]}` };
}

/** A mariadbd left running on a node's datadir by an earlier run that did not stop cleanly. */
async function stopLeftoverNode(node) {
  if (!existsSync(node.pidFile)) return;
  const pid = Number(readFileSync(node.pidFile, "utf8").trim());
  if (!isAlive(pid) || !commandLineOf(pid).includes(node.datadir)) return;
  info(`${node.name} from an earlier run is still up (pid ${pid}); shutting it down`);
  await run(tools().admin, [...socketArgs(node), "shutdown"], { stdio: "ignore" });
  if (!(await waitForExit(pid, 60_000))) await terminatePid(pid, { timeoutMs: 10_000 });
}

/**
 * Start one node and wait until it is Synced in a primary component. Resolves with a handle:
 * { node, pid, exited, stop() }.
 */
export async function startNode(layout, node, { newCluster = false, recoverFirst = false, timeoutMs = 180_000 } = {}) {
  const { server } = tools();
  await assertPortFree("127.0.0.1", node.clientPort, `Another MariaDB may be using it; stop it and run again.`);
  ensureTmpdir(node);
  let startPosition = null;
  if (recoverFirst) {
    const recovered = await recoverPosition(layout, node);
    if (recovered && recovered.seqno >= 0) startPosition = recovered.position;
  }
  const service = spawnService(node.name, server, nodeArgs(layout, node, { newCluster, startPosition }), { stdio: "ignore" });
  let exited = null;
  service.exited.then((result) => (exited = result));
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (exited) throw new UserFacingError(`${node.name} exited (code ${exited.code}) while starting. Its log:\n${logTail(node.log)}`);
    const status = await nodeStatus(node);
    if (status?.ready && status.state === "Synced" && status.clusterStatus === "Primary") break;
    if (Date.now() > deadline) {
      await terminatePid(service.child.pid, { timeoutMs: 10_000 });
      throw new UserFacingError(`${node.name} was not synced within ${timeoutMs / 1000} s. Its log:\n${logTail(node.log)}`);
    }
    await sleep(300);
  }
  info(`${node.name} is synced on 127.0.0.1:${node.clientPort} (pid ${service.child.pid}${startPosition ? `, rejoined from ${startPosition.split(":")[1]}` : ""})`);
  return {
    node,
    pid: service.child.pid,
    exited: service.exited,
    stop: () => stopNode(node, service),
  };
}

async function stopNode(node, service) {
  if (!isAlive(service.child.pid)) return;
  await run(tools().admin, [...socketArgs(node), "shutdown"], { stdio: "ignore" });
  const done = await Promise.race([service.exited.then(() => true), sleep(60_000).then(() => false)]);
  if (!done) await terminatePid(service.child.pid, { timeoutMs: 10_000 });
}

/**
 * Initialise (first use), bootstrap and join all three nodes; then create the database and the app
 * user (replicated to every node). Resolves with { handles, url, password, bootstrap }.
 * A second call after a clean stop keeps every row.
 */
export async function startGalera(layout, { password, database, user = "rakeline", checkStopping = () => {} }) {
  const { install } = tools();
  const account = mysqlAccount();
  mkdirSync(layout.logDir, { recursive: true });
  chownSync(layout.logDir, account.uid, account.gid);
  for (const node of layout.nodes) await stopLeftoverNode(node);
  const fresh = layout.nodes.map((node) => initialiseNode(node, install, account, layout.logDir));

  const states = [];
  for (const [i, node] of layout.nodes.entries()) {
    const grastate = fresh[i] ? null : readGrastate(node.datadir);
    states.push({ name: node.name, grastate, recovered: null });
  }
  if (states.some((s) => s.grastate?.uuid) && !states.some((s) => s.grastate?.safeToBootstrap)) {
    info("no node says it stopped last: recovering each node's position (mariadbd --wsrep-recover)");
    for (const [i, node] of layout.nodes.entries()) states[i].recovered = (await recoverPosition(layout, node))?.seqno ?? null;
  }
  const choice = chooseBootstrapNode(states);
  const first = layout.nodes.find((n) => n.name === choice.name);
  if (choice.needsSafeFlag) setSafeToBootstrap(first.datadir);
  info(`bootstrapping the cluster from ${first.name}: ${choice.reason}`);

  const handles = [];
  try {
    handles.push(await startNode(layout, first, { newCluster: true }));
    for (const node of layout.nodes) {
      if (node === first) continue;
      checkStopping();
      // A node whose last stop was abrupt recovers its position first, to rejoin by IST.
      const state = readGrastate(node.datadir);
      handles.push(await startNode(layout, node, { recoverFirst: Boolean(state?.uuid) && state.seqno < 0 }));
    }
    const status = await nodeStatus(first);
    if (status?.size !== layout.nodes.length) {
      throw new UserFacingError(`the cluster has ${status?.size ?? 0} nodes after every node started; expected ${layout.nodes.length}`);
    }
    info(`Galera cluster "${layout.clusterName}" is up: wsrep_cluster_size ${status.size}`);

    // Users and databases are replicated DDL: create them once, on the first node.
    const db = `\`${database}\``;
    const appAccount = `'${user}'@'127.0.0.1'`;
    const sql = [
      `CREATE DATABASE IF NOT EXISTS ${db} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`,
      `CREATE USER IF NOT EXISTS ${appAccount} IDENTIFIED BY '${password}';`,
      `ALTER USER ${appAccount} IDENTIFIED BY '${password}';`,
      `GRANT ALL PRIVILEGES ON ${db}.* TO ${appAccount};`,
      // HAProxy's mysql-check logs in as this password-less user, which can do nothing else.
      `CREATE USER IF NOT EXISTS 'haproxy_check'@'127.0.0.1';`,
    ].join("\n");
    await runQuiet(tools().client, [...socketArgs(first), "-e", sql]);
    return { handles, bootstrap: first.name };
  } catch (error) {
    await stopGalera(handles);
    throw error;
  }
}

/** Stop the nodes one at a time, the bootstrap node last (it then holds safe_to_bootstrap: 1). */
export async function stopGalera(handles) {
  for (const handle of [...handles].reverse()) {
    info(`stopping ${handle.node.name}`);
    await handle.stop();
  }
}

/** Row counts of every table of a database, per node: { db1: { table: n, … }, … }. */
export async function rowCountsPerNode(layout, database) {
  const out = {};
  for (const node of layout.nodes) {
    const tables = await nodeQuery(node, `SELECT table_name FROM information_schema.tables WHERE table_schema = '${database}' ORDER BY table_name`);
    if (!tables) {
      out[node.name] = null;
      continue;
    }
    const counts = {};
    if (tables.length) {
      const sql = "SET SESSION wsrep_sync_wait = 1; " + tables.map(([t]) => `SELECT '${t}', COUNT(*) FROM \`${database}\`.\`${t}\``).join(" UNION ALL ");
      for (const [table, n] of (await nodeQuery(node, sql)) ?? []) counts[table] = Number(n);
    }
    out[node.name] = counts;
  }
  return out;
}
