// Build the app with react-router and serve the build with react-router-serve.
import path from "node:path";
import { assertPortFree, info, packageBin, run, spawnService, terminatePid, UserFacingError, waitForHttp } from "./proc.mjs";

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
  const serveBin = packageBin(root, "@react-router/serve", "react-router-serve");
  const service = spawnService("app server", process.execPath, [serveBin, path.join("build", "server", "index.js")], {
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
    // react-router-serve may ignore the first SIGTERM while a database pool is open: escalate after 8 s.
    stop: () => terminatePid(service.child.pid, { timeoutMs: 8000, group: true }),
  };
}
