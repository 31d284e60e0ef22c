// `npm start`: provision everything on a fresh clone (npm deps, MariaDB from Debian, a private database,
// migrations, demo seed, mail catcher), build, and serve on http://127.0.0.1:3000 until SIGINT/SIGTERM.
// Plain Node ESM with no top-level package imports: it runs before node_modules exists.
import { mkdirSync } from "node:fs";
import path from "node:path";
import { ensureDebianPackages, mariadbPackage } from "./lib/apt.mjs";
import { ensureNodeModules } from "./lib/deps.mjs";
import { appEnvironment, instances, repoRoot } from "./lib/env.mjs";
import { startMariaDB } from "./lib/mariadb.mjs";
import { applyMigrations } from "./lib/migrate.mjs";
import { buildApp, serveApp, startJobWorker } from "./lib/app-server.mjs";
import { assertPortFree, banner, createStack, info, packageBin, run, UserFacingError, watchParent } from "./lib/proc.mjs";
import { acquireRunLock } from "./lib/run-lock.mjs";
import { stopAndConfirm } from "./lib/shutdown.mjs";

const instance = instances.dev;
const stack = createStack();
/** Every long-running process started here, checked again before "nothing left running" is said. */
const children = [];
let lock = null;
let stopping = false;

async function shutdown(exitCode, reason) {
  if (stopping) return;
  stopping = true;
  if (reason) info(reason);
  const closing = await stopAndConfirm(stack, children);
  lock?.release();
  info(closing);
  process.exit(exitCode);
}

for (const signal of ["SIGINT", "SIGTERM", "SIGHUP"]) {
  process.on(signal, () => void shutdown(0, `${signal} received: stopping server, mail catcher and MariaDB`));
}
watchParent(() => void shutdown(0, "the parent process (npm) is gone: stopping server, mail catcher and MariaDB"));

/** Throw when a stop was requested while a step ran, so nothing new starts during shutdown. */
function checkNotStopping() {
  if (stopping) throw new UserFacingError("stopping");
}

async function seedDemo(env) {
  const tsx = packageBin(repoRoot, "tsx", "tsx");
  const { code } = await run(process.execPath, [tsx, path.join("scripts", "seed.ts")], {
    cwd: repoRoot,
    env: { ...process.env, ...env },
  });
  // The app still serves without demo rows, so a failed seed is a loud warning, not a stop.
  if (code !== 0) console.error(`[rakeline] WARNING: the demo seed failed (exit ${code}); the app starts without demo data`);
  return code === 0;
}

async function main() {
  lock = await acquireRunLock("start", path.join("scripts", "start.mjs"));
  banner("Rakeline: npm start");
  // Fail in the first second, not after the install and build, when a port is taken.
  await assertPortFree(instance.appHost, instance.appPort, "Another app server may be running; stop it or set PORT to another port.");
  await assertPortFree("127.0.0.1", instance.smtpPort, "Another mail catcher (or npm start) may be running; stop it first.");
  await ensureNodeModules(repoRoot);
  checkNotStopping();
  await ensureDebianPackages([mariadbPackage]);
  checkNotStopping();

  banner(`MariaDB (private, ${path.relative(repoRoot, instance.datadir)}, 127.0.0.1:${instance.dbPort})`);
  const db = await startMariaDB(instance);
  stack.push("MariaDB", db.stop);
  lock.record("mariadbd", db.pid, instance.datadir);
  children.push({ name: "MariaDB", pid: db.pid });
  checkNotStopping();

  banner("Database migrations (drizzle/)");
  await applyMigrations(db.url, path.join(repoRoot, "drizzle"));
  checkNotStopping();

  const env = appEnvironment(instance, { databaseUrl: db.url });
  banner("Demo seed");
  const seeded = await seedDemo(env);
  checkNotStopping();

  banner(`Mail catcher (127.0.0.1:${instance.smtpPort} -> ${path.relative(repoRoot, instance.mailDir)})`);
  mkdirSync(instance.mailDir, { recursive: true });
  const { startMailCatcher } = await import("./lib/mail-catcher.mjs");
  const catcher = await startMailCatcher({
    port: instance.smtpPort,
    dir: instance.mailDir,
    onMessage: (message) => info(`mail caught for ${message.to.join(", ")}: ${message.subject}`),
  });
  stack.push("mail catcher", catcher.close);
  info(`mail catcher listening on 127.0.0.1:${catcher.port}`);
  checkNotStopping();

  banner("Build (react-router build)");
  const { NODE_ENV: _ignored, ...buildEnv } = process.env;
  const buildCode = await buildApp(repoRoot, buildEnv);
  if (buildCode !== 0) throw new UserFacingError(`react-router build failed (exit ${buildCode}); see above`);
  checkNotStopping();

  banner(`Serve (scripts/serve.mjs on ${env.HOST}:${env.PORT})`);
  const server = await serveApp(repoRoot, env);
  stack.push("app server", server.stop);
  lock.record("app server", server.pid, server.marker);
  children.push({ name: "app server", pid: server.pid });
  server.exited.then(({ code, signal }) => {
    if (!stopping) void shutdown(1, `the app server exited on its own (code ${code}, signal ${signal}); stopping the rest`);
  });

  banner("Job worker (scripts/job-worker.ts: the server's re-checks of uploaded logs)");
  const worker = await startJobWorker(repoRoot, env, { healthPort: instance.workerHealthPort });
  stack.push("job worker", worker.stop);
  lock.record("job worker", worker.pid, worker.marker);
  children.push({ name: "job worker", pid: worker.pid });
  worker.exited.then(({ code, signal }) => {
    if (!stopping) void shutdown(1, `the job worker exited on its own (code ${code}, signal ${signal}); stopping the rest`);
  });

  banner("Rakeline is running");
  console.log(`  App:          ${env.APP_URL}`);
  if (seeded) console.log("  Demo sign-in: demo@harrowgate.example / kestrel-bank-2026");
  console.log(`  Mailbox:      ${env.APP_URL}/dev/mailbox (messages also in ${path.relative(repoRoot, instance.mailDir)}/)`);
  console.log(`  Database:     mysql://rakeline@127.0.0.1:${instance.dbPort}/${instance.database} (password in .data/db-password)`);
  console.log("  Stop:         Ctrl-C (or SIGTERM) stops the server, the mail catcher and MariaDB\n");
}

main().catch((error) => {
  if (stopping) return;
  const message = error instanceof UserFacingError ? error.message : error.stack ?? String(error);
  console.error(`\n[rakeline] npm start failed: ${message}`);
  void shutdown(1);
});
