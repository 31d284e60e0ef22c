// The API readers of `npm run bench:cluster`, in a process of their own so that the run's uploads and
// checks never delay the clock that times the readers' requests. Started with child_process.fork;
// the parent sends { type: "start", baseUrl, routes: [{ name, path, headers }], connections,
// ratePerConnection } and later { type: "stop", windows: { name: [fromMs, toMs] } }; this process
// answers { type: "started" } and then { type: "result", routes: [...] } and exits.
// One autocannon instance per route, the connections shared out evenly; every response time is kept
// with the moment it arrived, so the figures can be given for the whole run and for windows of it.
import autocannon from "autocannon";
import { latencyFigures } from "./cluster-bench.mjs";

const runs = [];

function startRoute(baseUrl, route, connections, ratePerConnection) {
  const record = { name: route.name, times: [], latencies: [], statuses: {}, errors: 0, errorKinds: {}, errorTimes: [], startedAt: Date.now(), result: null };
  const instance = autocannon({
    url: baseUrl + route.path,
    connections,
    headers: route.headers ?? {},
    duration: 24 * 3600,
    // A request that has no answer within 30 s counts as a timeout (a lost request).
    timeout: 30,
    ...(ratePerConnection > 0 ? { connectionRate: ratePerConnection } : {}),
  });
  instance.on("response", (_client, statusCode, _bytes, responseTime) => {
    record.times.push(Date.now());
    record.latencies.push(responseTime);
    record.statuses[statusCode] = (record.statuses[statusCode] ?? 0) + 1;
    if (statusCode >= 500) record.errorTimes.push(Date.now());
  });
  instance.on("reqError", (error) => {
    record.errors += 1;
    // When it failed (a timed-out request fails 30 s after it was sent).
    record.errorTimes.push(Date.now());
    const kind = error?.code ?? error?.message ?? String(error);
    record.errorKinds[kind] = (record.errorKinds[kind] ?? 0) + 1;
  });
  record.done = new Promise((resolve) => instance.on("done", (result) => resolve((record.result = result))));
  record.instance = instance;
  return record;
}

function figuresIn(record, from, to) {
  const picked = [];
  let statuses = 0;
  let failed = 0;
  for (let i = 0; i < record.times.length; i++) {
    if (record.times[i] < from || record.times[i] > to) continue;
    picked.push(record.latencies[i]);
    statuses += 1;
  }
  const seconds = Math.max(0.001, (Math.min(to, Date.now()) - from) / 1000);
  return { figures: latencyFigures(picked), rps: statuses / seconds, failed };
}

process.on("message", async (message) => {
  if (message.type === "start") {
    const { baseUrl, routes, connections, ratePerConnection } = message;
    const share = routes.map((_, i) => Math.floor(connections / routes.length) + (i < connections % routes.length ? 1 : 0));
    routes.forEach((route, i) => runs.push(startRoute(baseUrl, route, Math.max(1, share[i]), ratePerConnection)));
    process.send({ type: "started", connections: share });
  } else if (message.type === "stop") {
    const stoppedAt = Date.now();
    for (const run of runs) run.instance.stop();
    await Promise.all(runs.map((run) => run.done));
    const out = runs.map((run) => {
      const whole = figuresIn(run, run.startedAt, stoppedAt);
      const windows = Object.fromEntries(Object.entries(message.windows ?? {}).map(([name, [from, to]]) => [name, figuresIn(run, from, to)]));
      const non2xx = Object.entries(run.statuses).filter(([code]) => Number(code) < 200 || Number(code) > 299).reduce((n, [, c]) => n + c, 0);
      const serverErrors = Object.entries(run.statuses).filter(([code]) => Number(code) >= 500).reduce((n, [, c]) => n + c, 0);
      return {
        name: run.name,
        seconds: (stoppedAt - run.startedAt) / 1000,
        figures: whole.figures,
        rps: whole.rps,
        windows,
        statuses: run.statuses,
        non2xx,
        serverErrors,
        errors: run.result?.errors ?? run.errors,
        timeouts: run.result?.timeouts ?? 0,
        errorKinds: run.errorKinds,
        sent: run.result?.requests?.sent ?? null,
        errorTimes: run.errorTimes,
      };
    });
    process.send({ type: "result", routes: out }, () => process.exit(0));
  }
});

process.on("disconnect", () => process.exit(0));
