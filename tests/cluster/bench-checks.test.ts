// The judging half of `npm run bench:cluster` (scripts/lib/cluster-bench.mjs), without a cluster:
// latency quantiles against the type-7 definition (Hyndman & Fan 1996, "Sample quantiles in
// statistical packages", The American Statistician 50(4); numpy's and R's default), memory against
// what Node itself reports, and the after-run checks on made-up node, storage and session rows.
import { spawn } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import {
  compareRowCounts, createMemoryTracker, duplicatedJobs, killOutright, latencyFigures, leaseOwnerIs, rssMb, sessionCheck, storageCheck, table, verdictLines,
} from "../../scripts/lib/cluster-bench.mjs";

const scratch = mkdtempSync(path.join(tmpdir(), "rakeline-bench-checks-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe("latency figures", () => {
  it("gives type-7 quantiles whatever the order of the samples", () => {
    // 1..100 shuffled: type 7 puts the p-quantile at index (n-1)p of the sorted sample, interpolated:
    // p50 = 50.5, p95 = 95 + 0.05 = 95.05, p99 = 99 + 0.01 = 99.01 (worked by hand from the definition).
    const values = Array.from({ length: 100 }, (_, i) => ((i * 37) % 100) + 1);
    expect(new Set(values).size).toBe(100);
    const f = latencyFigures(values);
    expect(f.count).toBe(100);
    expect(f.mean).toBeCloseTo(50.5, 12);
    expect(f.p50).toBeCloseTo(50.5, 12);
    expect(f.p95).toBeCloseTo(95.05, 12);
    expect(f.p99).toBeCloseTo(99.01, 12);
    expect(f.max).toBe(100);
  });

  it("answers nulls, not zeros, for a route that got no answer", () => {
    expect(latencyFigures([])).toEqual({ count: 0, mean: null, p50: null, p95: null, p99: null, max: null });
  });
});

describe("process memory", () => {
  it("reads VmRSS of this process close to what Node reports as its rss", () => {
    const fromProc = rssMb(process.pid);
    const fromNode = process.memoryUsage().rss / 2 ** 20;
    expect(fromProc).not.toBeNull();
    expect(Math.abs(fromProc! - fromNode) / fromNode).toBeLessThan(0.15);
  });

  it("reads the kB figure of a status file, and null for a process that is gone", () => {
    mkdirSync(path.join(scratch, "proc", "4242"), { recursive: true });
    writeFileSync(path.join(scratch, "proc", "4242", "status"), "Name:\tmariadbd\nVmPeak:\t 999999 kB\nVmRSS:\t  204800 kB\nThreads:\t40\n");
    expect(rssMb(4242, path.join(scratch, "proc"))).toBe(200);
    expect(rssMb(4243, path.join(scratch, "proc"))).toBeNull();
  });

  it("keeps the peak per process name across a restart under a new pid", () => {
    const readings: Record<number, number | null> = { 10: 100, 11: 300, 20: 50 };
    const tracker = createMemoryTracker((pid) => readings[pid] ?? null);
    tracker.sample([{ name: "app1", role: "app", pid: 10 }, { name: "db1", role: "db", pid: 20 }]);
    readings[10] = null; // killed
    tracker.sample([{ name: "app1", role: "app", pid: 10 }, { name: "db1", role: "db", pid: 20 }]);
    readings[11] = 120;
    tracker.sample([{ name: "app1", role: "app", pid: 11 }, { name: "db1", role: "db", pid: 20 }]);
    expect(tracker.report()).toEqual([
      { name: "app1", role: "app", pids: [10, 11], peakMb: 120, lastMb: 120 },
      { name: "db1", role: "db", pids: [20], peakMb: 50, lastMb: 50 },
    ]);
  });
});

describe("after-run checks", () => {
  it("finds the nodes in sync only when every node answered with the same count for every table", () => {
    const same = { jobs: 12, analysis_sessions: 16 };
    expect(compareRowCounts({ db1: same, db2: { ...same }, db3: { ...same } })).toMatchObject({ inSync: true, tables: 2, differences: [] });
    const apart = compareRowCounts({ db1: same, db2: { ...same, jobs: 11 }, db3: same });
    expect(apart.inSync).toBe(false);
    expect(apart.differences).toEqual([{ table: "jobs", counts: { db1: 12, db2: 11, db3: 12 } }]);
    const silent = compareRowCounts({ db1: same, db2: null, db3: same });
    expect(silent).toMatchObject({ inSync: false, silent: ["db2"] });
    // A table only one node has is a difference too.
    expect(compareRowCounts({ db1: { ...same, extra: 0 }, db2: same, db3: same }).differences).toEqual([{ table: "extra", counts: { db1: 0, db2: null, db3: null } }]);
  });

  it("names storage objects no row references (orphans) and referenced keys with no object (missing)", () => {
    const result = storageCheck(["teams/a/1", "teams/a/2", "teams/a/3"], ["teams/a/1", "teams/a/3", "teams/a/4"]);
    expect(result).toEqual({ objects: 3, referenced: 3, orphans: ["teams/a/2"], missing: ["teams/a/4"] });
  });

  it("holds each uploaded file to exactly one session carrying a server-made summary", () => {
    const uploads = [
      { file: "a.csv", sha256: "aa" },
      { file: "b.csv", sha256: "bb" },
      { file: "c.csv", sha256: "cc" },
      { file: "d.csv", sha256: "dd" },
    ];
    const sessions = [
      { id: "s1", rawSha256: "aa", hasSummary: true, serverResults: 2 },
      { id: "s2", rawSha256: "bb", hasSummary: true, serverResults: 1 },
      { id: "s3", rawSha256: "bb", hasSummary: true, serverResults: 1 },
      { id: "s4", rawSha256: "cc", hasSummary: true, serverResults: 0 },
      { id: "s5", rawSha256: "zz", hasSummary: true, serverResults: 1 },
    ];
    const result = sessionCheck(uploads, sessions);
    expect(result.lost).toEqual(["d.csv"]);
    expect(result.duplicated).toEqual(["b.csv"]);
    expect(result.withoutServerSummary).toEqual(["c.csv"]);
    expect(result.rows[0]).toMatchObject({ file: "a.csv", sessions: 1, ids: ["s1"], serverSummary: true });
  });

  it("reports a job with more than one result as done twice", () => {
    expect(duplicatedJobs([{ jobId: "4", results: "1" }, { jobId: 7, results: 2 }, { jobId: "10", results: 1 }])).toEqual([{ jobId: 7, results: 2 }]);
    expect(duplicatedJobs([])).toEqual([]);
  });

  it("ties a lease to a worker by its label or pid as a whole word", () => {
    expect(leaseOwnerIs("worker2:host-a:31337:9f2c", { label: "worker2", pid: 1 })).toBe(true);
    expect(leaseOwnerIs("host-a:31337:9f2c", { label: "worker2", pid: 31337 })).toBe(true);
    expect(leaseOwnerIs("worker12:host:5:x", { label: "worker1", pid: 3 })).toBe(false);
    expect(leaseOwnerIs("host:313370:x", { pid: 31337 })).toBe(false);
    expect(leaseOwnerIs(null, { label: "worker1" })).toBe(false);
  });

  it("kills a process outright only when its command line is the one meant", async () => {
    const child = spawn("sleep", ["30"], { stdio: "ignore" });
    const exited = new Promise<NodeJS.Signals | null>((resolve) => child.once("exit", (_code, signal) => resolve(signal)));
    try {
      expect(killOutright(child.pid!, "mariadbd")).toMatchObject({ killed: false });
      expect(killOutright(child.pid!, "sleep")).toEqual({ killed: true, why: "" });
      expect(await exited).toBe("SIGKILL");
      expect(killOutright(child.pid!, "sleep").killed).toBe(false);
    } finally {
      child.kill("SIGKILL");
    }
  });
});

describe("printing", () => {
  it("aligns a table: text left, numbers right, dashes for missing figures", () => {
    const text = table(["route", "p95 ms"], [["/api/sessions", "12.5"], ["/api/cars", null]]);
    expect(text.split("\n")).toEqual(["  route          p95 ms", "  -------------  ------", "  /api/sessions    12.5", "  /api/cars           –"]);
  });

  it("says which checks held and fails the verdict when one did not", () => {
    const v = verdictLines([{ check: "zero lost sessions", ok: true }, { check: "zero duplicated jobs", ok: false, detail: "job 7 wrote 2 results" }]);
    expect(v.ok).toBe(false);
    expect(v.text).toBe("  held      zero lost sessions\n  FAILED    zero duplicated jobs — job 7 wrote 2 results");
  });

  it("prints a check that does not gate as not held, without failing the verdict", () => {
    const v = verdictLines([{ check: "zero lost sessions", ok: true }, { check: "no orphan object", ok: false, gate: false, detail: "1 orphan" }]);
    expect(v.ok).toBe(true);
    expect(v.text).toBe("  held      zero lost sessions\n  not held  no orphan object — 1 orphan");
    expect(verdictLines([{ check: "no orphan object", ok: false, gate: true }]).ok).toBe(false);
  });
});
