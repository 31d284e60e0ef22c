// The parts of `npm run bench:cluster` that judge and print, kept apart from the run so that they can
// be tested without a cluster: latency quantiles per route, process memory from /proc, the row counts
// of the Galera nodes compared, storage objects against the rows that reference them, sessions per
// uploaded file, results per job, which worker holds a job's lease, and the printed tables.
import { readFileSync } from "node:fs";
import { quantileSorted } from "simple-statistics";
import { commandLineOf, isAlive } from "./proc.mjs";

/**
 * Latency figures of one route from every response time (ms): count, mean, p50/p95/p99 and max.
 * Quantiles by simple-statistics' quantileSorted: linear interpolation between order statistics
 * (Hyndman & Fan 1996, type 7; numpy's and R's default).
 */
export function latencyFigures(latenciesMs) {
  const sorted = Float64Array.from(latenciesMs).sort();
  if (sorted.length === 0) return { count: 0, mean: null, p50: null, p95: null, p99: null, max: null };
  let sum = 0;
  for (const v of sorted) sum += v;
  return {
    count: sorted.length,
    mean: sum / sorted.length,
    p50: quantileSorted(sorted, 0.5),
    p95: quantileSorted(sorted, 0.95),
    p99: quantileSorted(sorted, 0.99),
    max: sorted[sorted.length - 1],
  };
}

/**
 * Resident memory of a process in MB (VmRSS in /proc/<pid>/status, kB), or null when it is gone.
 * Threads share their process's memory, so a job worker's engine threads are inside its figure.
 */
export function rssMb(pid, procRoot = "/proc") {
  try {
    const text = readFileSync(`${procRoot}/${pid}/status`, "utf8");
    const kb = text.match(/^VmRSS:\s+(\d+)\s+kB/m);
    return kb ? Number(kb[1]) / 1024 : null;
  } catch {
    return null;
  }
}

/**
 * Memory over a run, per process name (a process started again keeps its name, under a new pid).
 * sample(processes) reads each one's RSS; report() gives [{ name, role, pids, peakMb, lastMb }].
 */
export function createMemoryTracker(read = rssMb) {
  const byName = new Map();
  return {
    sample(processes) {
      for (const p of processes) {
        const mb = p.pid ? read(p.pid) : null;
        let entry = byName.get(p.name);
        if (!entry) byName.set(p.name, (entry = { name: p.name, role: p.role, pids: [], peakMb: null, lastMb: null }));
        if (p.pid && !entry.pids.includes(p.pid)) entry.pids.push(p.pid);
        if (mb === null) continue;
        entry.lastMb = mb;
        entry.peakMb = entry.peakMb === null ? mb : Math.max(entry.peakMb, mb);
      }
    },
    report() {
      return [...byName.values()];
    },
  };
}

/**
 * Row counts per node ({ db1: { table: n } | null, … }) compared table by table. In sync when every
 * node answered and every table has the same count on each. differences: [{ table, counts: { db1: n, … } }].
 */
export function compareRowCounts(perNode) {
  const nodes = Object.keys(perNode);
  const silent = nodes.filter((n) => !perNode[n]);
  const tables = new Set();
  for (const n of nodes) for (const t of Object.keys(perNode[n] ?? {})) tables.add(t);
  const differences = [];
  for (const table of [...tables].sort()) {
    const counts = Object.fromEntries(nodes.map((n) => [n, perNode[n]?.[table] ?? null]));
    if (new Set(Object.values(counts)).size > 1) differences.push({ table, counts });
  }
  return { inSync: silent.length === 0 && differences.length === 0 && tables.size > 0, tables: tables.size, silent, differences };
}

/**
 * Storage against the database: an object no row references is an orphan (a file stored for nothing);
 * a referenced key with no object is missing (a session whose raw file is lost).
 */
export function storageCheck(objectKeys, referencedKeys) {
  const objects = new Set(objectKeys);
  const referenced = new Set(referencedKeys);
  return {
    objects: objects.size,
    referenced: referenced.size,
    orphans: [...objects].filter((k) => !referenced.has(k)).sort(),
    missing: [...referenced].filter((k) => !objects.has(k)).sort(),
  };
}

/**
 * Each uploaded file (by SHA-256) against the team's sessions: exactly one session, and that session
 * carries a summary of record made by the server. uploads: [{ file, sha256 }]; sessions:
 * [{ id, rawSha256, hasSummary, serverResults }] (serverResults = its session_results rows of origin server).
 */
export function sessionCheck(uploads, sessions) {
  const bySha = new Map();
  for (const s of sessions) {
    if (!bySha.has(s.rawSha256)) bySha.set(s.rawSha256, []);
    bySha.get(s.rawSha256).push(s);
  }
  const rows = uploads.map((u) => {
    const found = bySha.get(u.sha256) ?? [];
    return {
      file: u.file,
      sha256: u.sha256,
      sessions: found.length,
      ids: found.map((s) => s.id),
      serverSummary: found.length === 1 && Boolean(found[0].hasSummary) && found[0].serverResults > 0,
    };
  });
  return {
    rows,
    lost: rows.filter((r) => r.sessions === 0).map((r) => r.file),
    duplicated: rows.filter((r) => r.sessions > 1).map((r) => r.file),
    withoutServerSummary: rows.filter((r) => r.sessions === 1 && !r.serverSummary).map((r) => r.file),
  };
}

/** Jobs that wrote more than one result: rows [{ jobId, results }] (session_results per job_id). */
export function duplicatedJobs(rows) {
  return rows.filter((r) => Number(r.results) > 1).map((r) => ({ jobId: Number(r.jobId), results: Number(r.results) }));
}

/**
 * Whether a job's lease_owner names this worker process: its label (JOB_WORKER_LABEL, e.g. "worker2")
 * or its pid as a whole word (owners look like "<label>:<host>:<pid>:<random>" or similar).
 */
export function leaseOwnerIs(owner, { label, pid }) {
  if (!owner) return false;
  const parts = String(owner).split(/[^A-Za-z0-9_-]+/);
  return (label ? parts.includes(label) : false) || (pid ? parts.includes(String(pid)) : false);
}

/** Kill a process outright (SIGKILL), after checking by its command line that the pid is still the one meant. */
export function killOutright(pid, marker) {
  if (!pid || !isAlive(pid)) return { killed: false, why: `pid ${pid} is not running` };
  const line = commandLineOf(pid);
  if (marker && !line.includes(marker)) return { killed: false, why: `pid ${pid} is not ${marker} (it runs: ${line.slice(0, 80)})` };
  process.kill(pid, "SIGKILL");
  return { killed: true, why: "" };
}

const fmt = (v, digits = 1) => (v === null || v === undefined || Number.isNaN(v) ? "–" : Number(v).toFixed(digits));

/** A plain text table: headers, then rows of cells; numbers right-aligned. */
export function table(headers, rows) {
  const cells = [headers, ...rows.map((r) => r.map((c) => (c === null || c === undefined ? "–" : String(c))))];
  const widths = headers.map((_, j) => Math.max(...cells.map((r) => r[j].length)));
  const numeric = headers.map((_, j) => rows.length > 0 && rows.every((r) => typeof r[j] === "number" || /^[-+]?[\d.,]+( ?[a-zA-Z%/]+)?$|^–$/.test(String(r[j] ?? "–"))));
  const line = (r) => "  " + r.map((c, j) => (numeric[j] ? c.padStart(widths[j]) : c.padEnd(widths[j]))).join("  ").trimEnd();
  return [line(cells[0]), line(widths.map((w) => "-".repeat(w))), ...cells.slice(1).map(line)].join("\n");
}

/** Per-route reader figures as a table: requests, throughput, latency quantiles, failures. */
export function routeTable(routes) {
  return table(
    ["route", "requests", "req/s", "p50 ms", "p95 ms", "p99 ms", "max ms", "non-2xx", "errors", "timeouts"],
    routes.map((r) => [r.name, r.figures.count, fmt(r.rps), fmt(r.figures.p50), fmt(r.figures.p95), fmt(r.figures.p99), fmt(r.figures.max, 0), r.non2xx, r.errors, r.timeouts]),
  );
}

export function memoryTable(entries) {
  return table(
    ["process", "role", "pids", "peak RSS MB", "end RSS MB"],
    entries.map((e) => [e.name, e.role, e.pids.join(" "), fmt(e.peakMb, 0), fmt(e.lastMb, 0)]),
  );
}

/**
 * The verdict lines: [{ check, ok, detail, gate }] → text, and whether every gating check held. A check
 * with gate: false that does not hold is printed as "not held" and does not fail the verdict.
 */
export function verdictLines(checks) {
  const mark = (c) => (c.ok ? "held    " : c.gate === false ? "not held" : "FAILED  ");
  const text = checks.map((c) => `  ${mark(c)}  ${c.check}${c.detail ? ` — ${c.detail}` : ""}`).join("\n");
  return { text, ok: checks.every((c) => c.ok || c.gate === false) };
}
