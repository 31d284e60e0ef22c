// Build the app with react-router and serve the build with scripts/serve.mjs (our HTTP server over React Router).
import path from "node:path";
import { assertPortFree, info, packageBin, run, spawnService, terminatePid, UserFacingError, waitForHttp } from "./proc.mjs";

/** What the app server's command line contains (for the run lock's clean-up of a killed run). */
export const SERVE_MARKER = "scripts/serve.mjs";

export async function buildApp(root, env) {
  const cli = packageBin(root, "@react-router/dev", "react-router");
  const { code } = await run(process.execPath, [cli, "build"], { cwd: root, env: { ...process.env, ...env } });
  return code;
}

/** Serve build/ and wait until it answers. Resolves with { url, pid, stop, exited }. */
export async function serveApp(root, env) {
  const host = env.HOST;
  const port = Number(env.PORT);
  await assertPortFree(host, port, "Another app server may be running; stop it or set PORT to another port.");
  const service = spawnService("app server", process.execPath, [path.join("scripts", "serve.mjs")], {
    cwd: root,
    env: { ...process.env, ...env },
  });
  const probeHost = host === "0.0.0.0" || host === "::" ? "127.0.0.1" : host;
  const url = `http://${probeHost.includes(":") ? `[${probeHost}]` : probeHost}:${port}`;
  try {
    await waitForHttp(`${url}/`, { timeoutMs: 60_000, service });
  } catch (error) {
    await terminatePid(service.child.pid, { group: true });
    throw error instanceof UserFacingError ? error : new UserFacingError(error.message);
  }
  info(`app server is up at ${url} (pid ${service.child.pid})`);
  return {
    url,
    pid: service.child.pid,
    exited: service.exited,
    marker: SERVE_MARKER,
    // The server finishes requests in flight for up to 10 s after SIGTERM; escalate after 12 s.
    stop: () => terminatePid(service.child.pid, { timeoutMs: 12_000, group: true }),
  };
}

/** What the job worker's command line contains (for the run lock). */
export const WORKER_MARKER = "scripts/job-worker.ts";

/**
 * One job worker process (scripts/job-worker.ts: the server's re-checks of uploaded logs), started with the
 * app's environment; resolves once its health listener answers. Resolves with { pid, stop, exited, marker }.
 */
export async function startJobWorker(root, env, { healthPort }) {
  await assertPortFree("127.0.0.1", healthPort, "Another job worker may be running; stop it first.");
  const service = spawnService("job worker", process.execPath, ["--import", "tsx", WORKER_MARKER], {
    cwd: root,
    env: { ...process.env, ...env, HEALTH_PORT: String(healthPort), JOB_WORKER_LABEL: "worker" },
  });
  try {
    await waitForHttp(`http://127.0.0.1:${healthPort}/healthz`, { timeoutMs: 60_000, service });
  } catch (error) {
    await terminatePid(service.child.pid, { group: true });
    throw error instanceof UserFacingError ? error : new UserFacingError(error.message);
  }
  info(`job worker is up (pid ${service.child.pid}, health on 127.0.0.1:${healthPort})`);
  return {
    pid: service.child.pid,
    exited: service.exited,
    marker: WORKER_MARKER,
    // The worker finishes its current job for up to 10 s after SIGTERM; escalate after 15 s.
    stop: () => terminatePid(service.child.pid, { timeoutMs: 15_000, group: true }),
  };
}
