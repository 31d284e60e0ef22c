// npm run bench:browser [-- --mb 200 --repeat 2]
//
// The browser's engine worker against the CLI on the same file. Writes (once, into the git-ignored
// sample-data/large/) an export of the given size by repeating a committed demo log with its clock
// running on, then:
//   - Chromium (Debian's, through playwright-core) reads it with File.stream() in the page's own engine
//     worker (workers/engine.worker.ts, bundled by esbuild) over comlink, as the Drop a log page does;
//   - the analyse CLI reads it as a whole process, on one thread and on its default threads.
// Chromium also reads it in parts over one worker per core, as the page does for a large file.
// Prints MB/s of each (wall time of the analysis; the CLI's includes its start-up). Figures only: a
// benchmark, never a pass/fail check.
import { spawnSync } from "node:child_process";
import { createReadStream, createWriteStream, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { createServer } from "node:http";
import os from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const SOURCE = "sample-data/logs/marlin-kestrel-comma";
const CAR_FILE = "sample-data/cars/marlin-sr2.json";

/**
 * The source log cut into a loop: the lines above the first data row, and a run of data rows [a, b)
 * whose end joins its start (row b is the row of a later lap nearest to row a over every channel,
 * scaled by each channel's spread), so copies laid end to end run on without a jump. A jump at each
 * seam (a car going from 180 km/h to a standstill in one sample) would read as a unit error.
 */
function sourceParts() {
  const text = readFileSync(path.join(ROOT, `${SOURCE}.csv`), "utf8");
  const lines = text.split("\n");
  if (lines.at(-1) === "") lines.pop();
  const first = lines.findIndex((l) => /^\d/.test(l));
  const data = lines.slice(first);
  const cells = data.map((l) => l.split(",").map(Number));
  const k = cells[0].length;
  const spread = Array.from({ length: k }, (_, j) => {
    let s = 0, ss = 0;
    for (const r of cells) { s += r[j]; ss += r[j] * r[j]; }
    const m = s / cells.length;
    return Math.sqrt(Math.max(ss / cells.length - m * m, 1e-12));
  });
  const a = Math.floor(cells.length / 6);
  let b = -1, best = Infinity;
  for (let i = Math.floor(cells.length / 2); i < cells.length; i++) {
    let d = 0;
    for (let j = 1; j < k; j++) {
      const x = (cells[i][j] - cells[a][j]) / spread[j];
      d += x * x;
      // the next row as well, so the slopes join too
      const y = (cells[Math.min(i + 1, cells.length - 1)][j] - cells[a + 1][j]) / spread[j];
      d += y * y;
    }
    if (d < best) { best = d; b = i; }
  }
  const rows = data.slice(a, b).map((l) => {
    const comma = l.indexOf(",");
    return { t: Number(l.slice(0, comma)), rest: l.slice(comma) };
  });
  return { head: lines.slice(0, first).join("\n") + "\n", rows, span: cells[b][0] - cells[a][0] };
}

/**
 * Writes an export of about `mb` MB to `file`: the demo log's header once, then its data rows again
 * and again with the time running on (seconds, three decimals as in the source). Same columns and map.
 */
export async function writeLargeExport(file, mb) {
  const { head, rows, span } = sourceParts();
  mkdirSync(path.dirname(file), { recursive: true });
  const out = createWriteStream(file);
  const write = (s) => (out.write(s) ? Promise.resolve() : new Promise((r) => out.once("drain", r)));
  let written = Buffer.byteLength(head);
  await write(head);
  for (let copy = 0; written < mb * 1e6; copy++) {
    const offset = copy * span - rows[0].t;
    let chunk = "";
    for (const r of rows) {
      chunk += (r.t + offset).toFixed(3) + r.rest + "\n";
      if (chunk.length > 1 << 20) {
        written += chunk.length;
        await write(chunk);
        chunk = "";
        if (written >= mb * 1e6) break;
      }
    }
    if (chunk) {
      written += chunk.length;
      await write(chunk);
    }
  }
  await new Promise((r) => out.end(r));
  return file;
}

/** The export of `mb` MB, written unless it is there already. */
export async function largeExport(mb) {
  const file = path.join(ROOT, "sample-data", "large", `drop-${SOURCE.split("/").pop()}-${mb}mb.csv`);
  if (!existsSync(file) || statSync(file).size < mb * 1e6) await writeLargeExport(file, mb);
  return { file, map: path.join(ROOT, `${SOURCE}.map.json`), car: path.join(ROOT, CAR_FILE) };
}

async function bundle(dir) {
  const { build } = await import("esbuild");
  await build({ entryPoints: [path.join(ROOT, "workers/engine.worker.ts")], bundle: true, format: "esm", outfile: path.join(dir, "engine.worker.js"), logLevel: "error" });
  await build({
    stdin: {
      contents: `import { transfer, wrap } from "comlink";
        window.runBench = async (car, map, parts) => {
          const file = document.querySelector("input").files[0];
          const start = () => new Worker("/engine.worker.js", { type: "module" });
          const worker = start();
          const api = wrap(worker);
          const helpers = [], ports = [];
          for (let k = 1; k < parts; k++) {
            const w = start();
            helpers.push(w);
            const { port1, port2 } = new MessageChannel();
            await wrap(w).connect(transfer(port1, [port1]));
            ports.push(port2);
          }
          const t0 = performance.now();
          const r = parts > 1 ? await api.analyseInParts(file, car, map, {}, parts, transfer(ports, ports)) : await api.analyse(file, car, map);
          const ms = performance.now() - t0;
          for (const w of [worker, ...helpers]) w.terminate();
          return { ms, bytes: file.size, ok: r.ok, message: r.ok ? null : r.message, rows: r.ok ? r.value.log.rows : 0, cla: r.ok ? r.value.aero.cla_total_m2 : null };
        };`,
      resolveDir: ROOT,
      loader: "js",
    },
    bundle: true, format: "esm", outfile: path.join(dir, "page.js"), logLevel: "error",
  });
  writeFileSync(path.join(dir, "index.html"), `<!doctype html><meta charset="utf-8"><input type="file"><script type="module" src="/page.js"></script>`);
}

function serve(dir) {
  const types = { ".html": "text/html", ".js": "text/javascript" };
  const server = createServer((req, res) => {
    const name = req.url === "/" ? "index.html" : req.url.slice(1);
    const file = path.join(dir, path.basename(name));
    if (!existsSync(file)) return res.writeHead(404).end();
    res.writeHead(200, { "content-type": types[path.extname(file)] ?? "application/octet-stream" });
    createReadStream(file).pipe(res);
  });
  return new Promise((r) => server.listen(0, "127.0.0.1", () => r(server)));
}

async function browserRuns(file, car, map, repeat, parts) {
  const { chromium } = await import("playwright-core");
  const dir = mkdtempSync(path.join(os.tmpdir(), "rakeline-bench-browser-"));
  await bundle(dir);
  const server = await serve(dir);
  const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", headless: true, args: ["--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking"] });
  try {
    const page = await browser.newPage();
    await page.goto(`http://127.0.0.1:${server.address().port}/`);
    await page.setInputFiles("input", file);
    const runs = [];
    for (let i = 0; i < repeat; i++) runs.push(await page.evaluate(([c, m, p]) => window.runBench(c, m, p), [car, map, parts]));
    return runs;
  } finally {
    await browser.close();
    server.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

function cliRun(file, carPath, mapPath, threads) {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [path.join(ROOT, "scripts/analyse.mjs"), file, "--car", carPath, "--map", mapPath, ...(threads ? ["--threads", String(threads)] : [])], { cwd: ROOT, encoding: "utf8", maxBuffer: 64 << 20 });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`CLI failed: ${r.stderr}`);
  const out = JSON.parse(r.stdout);
  return { ms, rows: out.log.rows, cla: out.aero.cla_total_m2 };
}

async function main() {
  const args = process.argv.slice(2);
  const flag = (name, fallback) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
  const mb = flag("--mb", 200), repeat = flag("--repeat", 2);
  process.stdout.write(`export of ${mb} MB … `);
  const t0 = performance.now();
  const { file, car: carPath, map: mapPath } = await largeExport(mb);
  const bytes = statSync(file).size;
  console.log(`${file} (${(bytes / 1e6).toFixed(0)} MB, ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
  const car = JSON.parse(readFileSync(carPath, "utf8")), map = JSON.parse(readFileSync(mapPath, "utf8"));
  const rate = (ms) => `${(bytes / 1e6 / (ms / 1000)).toFixed(1).padStart(7)} MB/s`;
  const line = (label, r) => console.log(`${label.padEnd(44)} ${rate(r.ms)}  ${(r.ms / 1000).toFixed(2).padStart(7)} s  rows ${r.rows}  ClA total ${r.cla?.toFixed(4) ?? "—"}`);
  console.log(`\n${os.cpus().length} cores (${os.cpus()[0]?.model ?? "?"}), best of ${repeat}`);
  // As the Drop a log page: one worker per core, at most 4 (the CLI's default threads).
  const parts = Math.max(1, Math.min(4, os.availableParallelism()));
  for (const [label, n] of [["Chromium, one engine worker (File.stream())", 1], [`Chromium, ${parts} engine workers in parts (the page)`, parts]]) {
    if (n === 1 && label.includes("parts")) continue;
    const runs = await browserRuns(file, car, map, repeat, n);
    const failed = runs.find((r) => !r.ok);
    if (failed) throw new Error(`the browser's engine refused the file: ${failed.message}`);
    line(label, runs.reduce((a, b) => (a.ms <= b.ms ? a : b)));
  }
  const best = (threads) => Array.from({ length: repeat }, () => cliRun(file, carPath, mapPath, threads)).reduce((a, b) => (a.ms <= b.ms ? a : b));
  line("CLI, --threads 1", best(1));
  line(`CLI, default threads (${os.cpus().length})`, best(0));
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().catch((e) => {
    console.error(`error: ${e instanceof Error ? e.message : String(e)}`);
    process.exitCode = 1;
  });
}
