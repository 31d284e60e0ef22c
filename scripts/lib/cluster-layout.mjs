// Where `npm run cluster` puts everything on loopback: one block of ports (4400–4499 by default,
// RAKELINE_CLUSTER_PORT_BASE moves it) and one folder, .data/cluster/ (RAKELINE_CLUSTER_DATA names another). Read by scripts/cluster.mjs,
// scripts/bench-cluster.ts and the cluster tests; see "Running at scale" in the README.
import path from "node:path";
import { dataDir } from "./env.mjs";

export const DEFAULT_PORT_BASE = 4400;

function portBase() {
  const raw = process.env.RAKELINE_CLUSTER_PORT_BASE;
  if (!raw) return DEFAULT_PORT_BASE;
  const base = Number(raw);
  if (!Number.isInteger(base) || base < 1024 || base > 65_000 || base % 100 !== 0) {
    throw new Error(`RAKELINE_CLUSTER_PORT_BASE must be a multiple of 100 from 1100 to 65000, not "${raw}"`);
  }
  return base;
}

/** The cluster's folder under .data/: `cluster`, or RAKELINE_CLUSTER_DATA (the cluster test stage uses its own). */
function clusterDir() {
  const name = process.env.RAKELINE_CLUSTER_DATA || "cluster";
  if (!/^[a-z0-9-]+$/.test(name)) throw new Error(`RAKELINE_CLUSTER_DATA must be a folder name of lower-case letters, digits and dashes, not "${name}"`);
  return path.join(dataDir, name);
}

/**
 * The layout for `apps` app processes and `workers` job workers (the issue asks for at least two of
 * each). Offsets inside the block: +0 app frontend, +1 HAProxy stats, +6 database frontend (the
 * writer), +11… app processes, +21… job workers' health ports, +25 mail catcher, +31…/+41…/+51…/+61…
 * each Galera node's client, group-communication, IST and SST ports, +90 the S3 fake.
 */
export function clusterLayout({ base = portBase(), dir = clusterDir(), apps = 2, workers = 2 } = {}) {
  const nodes = [1, 2, 3].map((i) => {
    const datadir = path.join(dir, `db${i}`);
    return {
      name: `db${i}`,
      index: i,
      datadir,
      socket: path.join(datadir, "mysqld.sock"),
      pidFile: path.join(datadir, "mysqld.pid"),
      log: path.join(dir, "logs", `db${i}.log`),
      // Each node's own folder for internal temporary tables (never a /tmp shared with other servers).
      tmpdir: path.join(dir, "tmp", `db${i}`),
      clientPort: base + 30 + i,
      groupPort: base + 40 + i,
      istPort: base + 50 + i,
      sstPort: base + 60 + i,
    };
  });
  return {
    base,
    dir,
    logDir: path.join(dir, "logs"),
    stateFile: path.join(dir, "state.json"),
    clusterName: "rakeline",
    database: "rakeline",
    passwordFile: path.join(dir, "db-password"),
    appFrontPort: base,
    statsPort: base + 1,
    dbFrontPort: base + 6,
    appPorts: Array.from({ length: apps }, (_, i) => base + 11 + i),
    workerHealthPorts: Array.from({ length: workers }, (_, i) => base + 21 + i),
    smtpPort: base + 25,
    mailDir: path.join(dir, "mail"),
    s3Port: base + 90,
    s3Dir: path.join(dir, "s3"),
    s3Bucket: "rakeline-raw",
    uploadDir: path.join(dir, "spool"),
    haproxyConfig: path.join(dir, "haproxy.cfg"),
    nodes,
  };
}
