// CPU per server render, measured in-process against the built app (build/server/index.js) through
// React Router's own request handler: no HTTP server, compression or request log in the figure, so it
// is what one page costs the app itself. Used by `npm run bench:render` (and the API bench).
import path from "node:path";
import { pathToFileURL } from "node:url";

/**
 * Renders each page `warmup` times, then `runs` times, and returns per page the status, the CPU time
 * per render (user + system, ms) and the wall time per render (ms). Pages: [{ name, url, cookie? }].
 */
export async function measureRenderCpu(root, pages, { warmup = 40, runs = 300 } = {}) {
  const { createRequestHandler } = await import("react-router");
  const build = await import(pathToFileURL(path.join(root, "build", "server", "index.js")).href);
  const handler = createRequestHandler(build, "production");
  const render = async (page) => {
    const response = await handler(new Request(page.url, { headers: page.cookie ? { cookie: page.cookie } : {} }));
    await response.arrayBuffer();
    return response.status;
  };
  const results = [];
  for (const page of pages) {
    let status = 0;
    for (let i = 0; i < warmup; i++) status = await render(page);
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    for (let i = 0; i < runs; i++) status = await render(page);
    const cpu = process.cpuUsage(cpu0);
    results.push({ name: page.name, status, cpuMs: (cpu.user + cpu.system) / 1000 / runs, wallMs: (performance.now() - t0) / runs, runs });
  }
  return results;
}
