// `npm test`: provision a separate test instance (MariaDB on 3308 with a fresh rakeline_test, catcher on 2526),
// then typecheck, vitest unit + integration, build, serve on 127.0.0.1:3100 and run the browser tests.
// Exits non-zero when any stage fails and always stops what it started.
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { chromiumPackage, ensureDebianPackages, mariadbPackage } from "./lib/apt.mjs";
import { galeraPackages } from "./lib/galera.mjs";
import { haproxyPackage } from "./lib/haproxy.mjs";
import { ensureNodeModules } from "./lib/deps.mjs";
import { appEnvironment, instances, repoRoot } from "./lib/env.mjs";
import { startMariaDB } from "./lib/mariadb.mjs";
import { applyMigrations } from "./lib/migrate.mjs";
import { buildApp, serveApp, startJobWorker } from "./lib/app-server.mjs";
import { assertPortFree, banner, createStack, info, packageBin, run, UserFacingError, watchParent } from "./lib/proc.mjs";
import { acquireRunLock } from "./lib/run-lock.mjs";

const instance = instances.test;
const stack = createStack();
const results = [];
let lock = null;
let stopping = false;

// Each vitest run also writes its JSON report here, so the summary can count tests across runs.
const reportDir = path.join(repoRoot, ".data", "test-reports");
const reports = [];

function vitestArgs(vitest, name, rest) {
  const file = path.join(reportDir, `${name}.json`);
  rmSync(file, { force: true });
  reports.push(file);
  return [vitest, "run", "--reporter=default", "--reporter=json", `--outputFile.json=${file}`, ...rest];
}

/** Totals over the vitest reports written by this run: the closing "N passed, N failed" line. */
function testTally() {
  let passed = 0, failed = 0, skipped = 0;
  for (const file of reports) {
    if (!existsSync(file)) continue;
    const r = JSON.parse(readFileSync(file, "utf8"));
    passed += r.numPassedTests ?? 0;
    failed += r.numFailedTests ?? 0;
    skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
  }
  return { passed, failed, skipped };
}

function printSummary() {
  banner("npm test summary");
  for (const { stage, status, seconds } of results) {
    console.log(`  ${status.padEnd(7)} ${stage.padEnd(58)} ${seconds.toFixed(1).padStart(6)} s`);
  }
  const { passed, failed, skipped } = testTally();
  console.log(`\nTests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
}

async function finish(exitCode, reason) {
  if (stopping) return;
  stopping = true;
  if (reason) info(reason);
  await stack.stopAll();
  lock?.release();
  printSummary();
  const failed = results.filter((r) => r.status === "FAILED").map((r) => r.stage);
  if (exitCode === 130 || exitCode === 143) {
    console.log("\nnpm test was stopped before it finished");
    process.exit(exitCode);
  }
  if (exitCode !== 0 || failed.length) {
    console.log(`\nnpm test FAILED${failed.length ? `: ${failed.join(", ")}` : ""}`);
    process.exit(exitCode || 1);
  }
  console.log("\nnpm test passed");
  process.exit(0);
}

process.on("SIGINT", () => void finish(130, "SIGINT received: stopping"));
process.on("SIGTERM", () => void finish(143, "SIGTERM received: stopping"));
watchParent(() => void finish(143, "the parent process (npm) is gone: stopping"));

/** Run one stage; returns true when it passed. A thrown UserFacingError fails the stage with its message. */
async function stage(name, body) {
  if (stopping) throw new UserFacingError("stopping");
  banner(name);
  const started = Date.now();
  let passed = false;
  try {
    passed = (await body()) !== false;
  } catch (error) {
    if (!stopping) console.error(`[rakeline] ${name}: ${error instanceof UserFacingError ? error.message : error.stack}`);
  }
  const status = stopping ? "stopped" : passed ? "passed" : "FAILED";
  results.push({ stage: name, status, seconds: (Date.now() - started) / 1000 });
  return passed;
}

function skip(name, why) {
  info(`skipping ${name}: ${why}`);
  results.push({ stage: name, status: "skipped", seconds: 0 });
}

async function node(args, env) {
  const { code } = await run(process.execPath, args, { cwd: repoRoot, env });
  return code === 0;
}

/** Provisioning must all succeed; a failure here stops the run. */
async function provision() {
  const ok = (await stage("npm dependencies", () => ensureNodeModules(repoRoot)))
    && (await stage("Debian packages (mariadb-server, chromium)", () => ensureDebianPackages([mariadbPackage, chromiumPackage])));
  if (!ok) return null;
  let db = null;
  const dbOk = await stage(`Test database (127.0.0.1:${instance.dbPort}/${instance.database}, fresh)`, async () => {
    db = await startMariaDB(instance, { fresh: true });
    stack.push("MariaDB (test)", db.stop);
    lock.record("mariadbd", db.pid, instance.datadir);
    await applyMigrations(db.url, path.join(repoRoot, "drizzle"));
  });
  if (!dbOk) return null;
  const catcherOk = await stage(`Mail catcher (127.0.0.1:${instance.smtpPort}, emptied)`, async () => {
    rmSync(instance.mailDir, { recursive: true, force: true });
    mkdirSync(instance.mailDir, { recursive: true });
    const { startMailCatcher } = await import("./lib/mail-catcher.mjs");
    const catcher = await startMailCatcher({ port: instance.smtpPort, dir: instance.mailDir });
    stack.push("mail catcher (test)", catcher.close);
  });
  return catcherOk ? db : null;
}

/**
 * s3rver (a local S3-compatible fake) for the storage tests, in this process. The tests get its address
 * as S3_TEST_* (the app itself keeps storing on disk unless S3_BUCKET is set).
 */
async function startS3Fake() {
  await assertPortFree("127.0.0.1", instance.s3Port, "Another npm test may be running its S3 fake; stop it first.");
  rmSync(instance.s3Dir, { recursive: true, force: true });
  mkdirSync(instance.s3Dir, { recursive: true });
  const { default: S3rver } = await import("s3rver");
  const server = new S3rver({ address: "127.0.0.1", port: instance.s3Port, directory: instance.s3Dir, silent: true, configureBuckets: [{ name: instance.s3Bucket }] });
  await server.run();
  return {
    close: () => server.close(),
    env: {
      S3_TEST_ENDPOINT: `http://127.0.0.1:${instance.s3Port}`,
      S3_TEST_BUCKET: instance.s3Bucket,
      S3_TEST_REGION: "us-east-1",
      // s3rver's fixed development credentials.
      S3_TEST_ACCESS_KEY_ID: "S3RVER",
      S3_TEST_SECRET_ACCESS_KEY: "S3RVER",
    },
  };
}

async function main() {
  lock = await acquireRunLock("test", path.join("scripts", "test.mjs"));
  const started = Date.now();
  const portsFree = await stage(`Ports free (${instance.appPort} app, ${instance.smtpPort} mail)`, async () => {
    await assertPortFree(instance.appHost, instance.appPort, "Another npm test may be serving there; stop it first.");
    await assertPortFree("127.0.0.1", instance.smtpPort, "Another npm test may be running its mail catcher; stop it first.");
  });
  if (!portsFree) return finish(1, "a port npm test needs is taken");
  mkdirSync(reportDir, { recursive: true });
  const db = await provision();
  if (!db) return finish(1, "provisioning failed; no tests were run");

  const appEnv = appEnvironment(instance, { databaseUrl: db.url });
  // vitest sets NODE_ENV=test itself; the build must not see a non-production NODE_ENV.
  const { NODE_ENV: _outer, ...baseEnv } = process.env;
  const { NODE_ENV: _app, ...testEnv } = appEnv;
  const vitestEnv = { ...baseEnv, ...testEnv };
  const reactRouter = packageBin(repoRoot, "@react-router/dev", "react-router");
  const tsc = packageBin(repoRoot, "typescript", "tsc");
  const vitest = packageBin(repoRoot, "vitest", "vitest");

  // `npm test -- <files or filters>`: the same provisioning, then only those tests (browser tests when every
  // filter is under tests/e2e). The full run (no arguments) is what CI and the README use.
  const filters = process.argv.slice(2);
  const e2eOnly = filters.length > 0 && filters.every((filter) => filter.replace(/\\/g, "/").includes("tests/e2e"));
  const full = filters.length === 0;

  if (full) {
    await stage("Typecheck (react-router typegen && tsc)", async () =>
      (await node([reactRouter, "typegen"], baseEnv)) && (await node([tsc], baseEnv)));
  }
  if (!e2eOnly) {
    const s3Ok = await stage(`S3 fake (s3rver on 127.0.0.1:${instance.s3Port}, emptied)`, async () => {
      const s3 = await startS3Fake();
      stack.push("S3 fake (test)", s3.close);
      Object.assign(vitestEnv, s3.env);
    });
    if (s3Ok) await stage("Unit and integration tests (vitest run)", () => node(vitestArgs(vitest, "unit-integration", filters), vitestEnv));
    else skip("Unit and integration tests", "the S3 fake did not start");
  }
  if (full || e2eOnly) {
    const built = await stage("Build (react-router build)", async () => (await buildApp(repoRoot, baseEnv)) === 0);
    if (built) {
      await stage(`Browser tests (Chromium against ${appEnv.APP_URL})`, async () => {
        const server = await serveApp(repoRoot, appEnv);
        stack.push("app server (test)", server.stop);
        lock.record("app server", server.pid, server.marker);
        // The server's re-checks of what the browser tests upload.
        const worker = await startJobWorker(repoRoot, appEnv, { healthPort: instance.workerHealthPort });
        stack.push("job worker (test)", worker.stop);
        lock.record("job worker", worker.pid, worker.marker);
        try {
          return await node(vitestArgs(vitest, "browser", ["--config", "vitest.e2e.config.ts", ...filters]), vitestEnv);
        } finally {
          if (!stopping) await Promise.all([server.stop(), worker.stop()]);
        }
      });
    } else skip("Browser tests", "the build failed");
  }

  // The cluster fault run (README, "Running at scale"): `npm run bench:cluster -- --short` on a fresh
  // cluster of its own (.data/test-cluster, a port block from the test offset): one kill of each kind,
  // small files; fails when a session is lost, a job is done twice or another check does not hold.
  // Full runs, and `npm test -- tests/cluster`; RAKELINE_TEST_CLUSTER=off leaves it out.
  const clusterFilter = filters.some((f) => f.replace(/\\/g, "/").replace(/\/$/, "").endsWith("tests/cluster"));
  const clusterMissing = !existsSync(path.join(repoRoot, "scripts", "job-worker.ts"))
    ? "there is no job worker yet (scripts/job-worker.ts), so none can be killed in the middle of a job"
    : !/route\("api\/sessions"/.test(readFileSync(path.join(repoRoot, "app", "routes.ts"), "utf8"))
      ? "the headless upload (POST /api/sessions) is not routed yet, so the fault run has nothing to upload through"
      : null;
  if ((full || clusterFilter) && process.env.RAKELINE_TEST_CLUSTER !== "off" && clusterMissing) {
    skip("Cluster fault run", clusterMissing);
  } else if ((full || clusterFilter) && process.env.RAKELINE_TEST_CLUSTER !== "off") {
    const offset = Number(process.env.RAKELINE_TEST_PORT_OFFSET || 0);
    const clusterBase = 5000 + 100 * Math.round(offset / 10);
    await stage(`Cluster fault run (bench:cluster --short, ports ${clusterBase}-${clusterBase + 99})`, async () => {
      await ensureDebianPackages([...galeraPackages, haproxyPackage]);
      rmSync(path.join(repoRoot, ".data", "test-cluster"), { recursive: true, force: true });
      const built = existsSync(path.join(repoRoot, "build", "server", "index.js")) && results.some((r) => r.stage.startsWith("Build") && r.status === "passed");
      return node([path.join(repoRoot, "scripts", "bench-cluster.mjs"), "--short"], {
        ...baseEnv,
        RAKELINE_CLUSTER_DATA: "test-cluster",
        RAKELINE_CLUSTER_PORT_BASE: String(clusterBase),
        RAKELINE_CLUSTER_SKIP_BUILD: built ? "1" : "0",
      });
    });
  }

  info(`all stages done in ${((Date.now() - started) / 1000).toFixed(0)} s`);
  await finish(0);
}

main().catch((error) => {
  if (stopping) return;
  console.error(`\n[rakeline] npm test failed: ${error instanceof UserFacingError ? error.message : error.stack}`);
  void finish(1);
});
