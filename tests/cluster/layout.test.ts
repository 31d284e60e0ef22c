// The cluster's configuration, checked without starting it: which Galera node bootstraps (the
// procedure of the Galera documentation, "Restarting the cluster": the node whose grastate.dat says
// safe_to_bootstrap: 1, else the highest recovered seqno), the node arguments Galera requires
// (binlog_format=ROW, innodb_autoinc_lock_mode=2, distinct ports per node), and what HAProxy's
// configuration routes where (Debian's haproxy loads the same text in the cluster fault run, the
// cluster stage of npm test: scripts/bench-cluster.mjs --short).
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { clusterLayout } from "../../scripts/lib/cluster-layout.mjs";
import { chooseBootstrapNode, nodeArgs, parseGrastate } from "../../scripts/lib/galera.mjs";
import { haproxyConfig, parseHaproxyStats } from "../../scripts/lib/haproxy.mjs";

const scratch = mkdtempSync(path.join(tmpdir(), "rakeline-cluster-layout-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const UUID = "ae892d50-ee6b-11f1-9c9d-9f3cb977c0e0";
// The file Galera writes (its format as MariaDB 10.11 with galera-4 leaves it; seen on this machine).
const grastate = (seqno: number, safe: 0 | 1) =>
  `# GALERA saved state\nversion: 2.1\nuuid:    ${UUID}\nseqno:   ${seqno}\nsafe_to_bootstrap: ${safe}\n`;

describe("Galera bootstrap choice", () => {
  it("reads grastate.dat", () => {
    expect(parseGrastate(grastate(20, 1))).toEqual({ uuid: UUID, seqno: 20, safeToBootstrap: true });
    expect(parseGrastate(grastate(-1, 0))).toEqual({ uuid: UUID, seqno: -1, safeToBootstrap: false });
  });

  it("starts a new cluster from db1 when no node has state", () => {
    const choice = chooseBootstrapNode([
      { name: "db1", grastate: null, recovered: null },
      { name: "db2", grastate: null, recovered: null },
      { name: "db3", grastate: null, recovered: null },
    ]);
    expect(choice).toEqual({ name: "db1", reason: "new cluster", needsSafeFlag: false });
  });

  it("restarts from the node that stopped last (safe_to_bootstrap: 1), even when it is not db1", () => {
    const choice = chooseBootstrapNode([
      { name: "db1", grastate: parseGrastate(grastate(18, 0)), recovered: null },
      { name: "db2", grastate: parseGrastate(grastate(20, 1)), recovered: null },
      { name: "db3", grastate: parseGrastate(grastate(19, 0)), recovered: null },
    ]);
    expect(choice.name).toBe("db2");
    expect(choice.needsSafeFlag).toBe(false);
  });

  it("after an abrupt stop of every node, picks the highest recovered seqno and marks it safe", () => {
    const choice = chooseBootstrapNode([
      { name: "db1", grastate: parseGrastate(grastate(-1, 0)), recovered: 41 },
      { name: "db2", grastate: parseGrastate(grastate(-1, 0)), recovered: 57 },
      { name: "db3", grastate: parseGrastate(grastate(-1, 0)), recovered: 50 },
    ]);
    expect(choice).toMatchObject({ name: "db2", needsSafeFlag: true });
  });
});

describe("Galera node arguments", () => {
  const layout = clusterLayout({ base: 4400, dir: scratch });

  it("give every node what Galera requires and ports of its own", () => {
    const all = layout.nodes.map((node) => nodeArgs(layout, node));
    for (const args of all) {
      expect(args[0]).toBe("--no-defaults");
      expect(args).toContain("--binlog-format=ROW");
      expect(args).toContain("--innodb-autoinc-lock-mode=2");
      expect(args).toContain("--wsrep-on=ON");
      expect(args).toContain("--user=mysql");
      // Reads pass while a dead peer is voted out (MariaDB's wsrep_dirty_reads, documented for Galera).
      expect(args).toContain("--wsrep-dirty-reads=ON");
      // Its own folder for internal temporary tables, not a /tmp shared with every other server here.
      expect(args.find((a) => a.startsWith("--tmpdir="))).toMatch(/[/\\]tmp[/\\]db[123]$/);
      expect(args).toContain("--wsrep-cluster-address=gcomm://127.0.0.1:4441,127.0.0.1:4442,127.0.0.1:4443");
      expect(args).not.toContain("--wsrep-new-cluster");
    }
    expect(new Set(layout.nodes.map((n) => n.tmpdir)).size).toBe(3);
    const ports = layout.nodes.flatMap((n) => [n.clientPort, n.groupPort, n.istPort, n.sstPort]);
    expect(new Set(ports).size).toBe(12);
    expect(all[1]).toContain(`--wsrep-sst-receive-address=127.0.0.1:${layout.nodes[1].sstPort}`);
    expect(all[1].find((a) => a.startsWith("--wsrep-provider-options="))).toContain(`ist.recv_addr=127.0.0.1:${layout.nodes[1].istPort}`);
    expect(nodeArgs(layout, layout.nodes[0], { newCluster: true })).toContain("--wsrep-new-cluster");
  });

  it("keeps the whole layout inside its block of 100 ports", () => {
    const other = clusterLayout({ base: 5200, dir: scratch });
    const ports = [other.appFrontPort, other.statsPort, other.dbFrontPort, ...other.appPorts, ...other.workerHealthPorts, other.smtpPort, other.s3Port,
      ...other.nodes.flatMap((n) => [n.clientPort, n.groupPort, n.istPort, n.sstPort])];
    expect(new Set(ports).size).toBe(ports.length);
    expect(Math.min(...ports)).toBeGreaterThanOrEqual(5200);
    expect(Math.max(...ports)).toBeLessThan(5300);
  });
});

describe("HAProxy configuration", () => {
  const layout = clusterLayout({ base: 4400, dir: scratch, apps: 3 });
  const text = haproxyConfig(layout);

  it("routes round robin over every app process, health-checked, retrying only GETs", () => {
    const backend = text.slice(text.indexOf("backend app_processes"), text.indexOf("frontend database"));
    expect(backend).toContain("balance roundrobin");
    expect(backend).toContain("uri /healthz");
    for (const [i, port] of layout.appPorts.entries()) expect(backend).toContain(`server app${i + 1} 127.0.0.1:${port} check`);
    expect(backend).toContain("http-request disable-l7-retry unless METH_GET");
  });

  it("sends database connections to one writer, the others as backups in order, sticky after a fail-over", () => {
    const backend = text.slice(text.indexOf("backend galera_writer"));
    const servers = backend.split("\n").filter((l) => l.trim().startsWith("server "));
    expect(servers).toEqual([
      "  server db1 127.0.0.1:4431 check",
      "  server db2 127.0.0.1:4432 check backup",
      "  server db3 127.0.0.1:4433 check backup",
    ]);
    expect(backend).toContain("stick on int(1)");
    expect(backend).toContain("on-marked-down shutdown-sessions");
    // A refused connection marks the node down at once and goes to the next one (HAProxy 2.6 manual:
    // "observe", "on-error", "option redispatch").
    expect(backend).toContain("observe layer4 error-limit 1 on-error mark-down");
    expect(backend).toContain("option redispatch");
  });

  it("reads the statistics CSV", () => {
    // Columns as HAProxy 2.6 prints them (abridged to the ones read).
    const csv = "# pxname,svname,qcur,scur,stot,wretr,wredis,status,act,bck\napp_processes,app1,0,3,120,2,1,UP,1,0\ngalera_writer,db2,0,4,9,0,0,UP,0,1\n";
    expect(parseHaproxyStats(csv)).toEqual([
      { proxy: "app_processes", server: "app1", status: "UP", sessionsTotal: 120, current: 3, active: true, backup: false, retries: 2, redispatches: 1 },
      { proxy: "galera_writer", server: "db2", status: "UP", sessionsTotal: 9, current: 4, active: false, backup: true, retries: 0, redispatches: 0 },
    ]);
  });
});
