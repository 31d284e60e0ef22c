/**
 * Logs for `npm run bench:cluster`: `count` different exports of about `mb` MB each, made by the demo
 * scenario's generator (sample-data/generate.ts: back-to-back 20-lap stints of the Marlin SR2 at
 * Kestrel Bank, as `npm run demo:generate -- --large` writes). The rows are generated once; each file
 * gets its own preamble (a different run label), so every file has its own SHA-256 and is a new session,
 * as eight engineers' logs would be.
 *
 *   tsx scripts/cluster-logs.ts --mb 100 --count 8 --out .data/bench/logs
 *
 * Prints one JSON line: { files: [{ path, bytes }], map: <MAP.json>, car: "Marlin SR2" }. Files already
 * there with the same size and count are reused.
 */
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, statSync, writeFileSync, writeSync } from "node:fs";
import path from "node:path";
import { exportColumns, LOGS, mapFor, simulate } from "../sample-data/generate";
import { exportHeaderText, exportRowsText } from "../sample-data/export-writer";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const mb = Number(arg("mb", "100"));
const count = Number(arg("count", "8"));
const out = path.resolve(arg("out", ".data/bench/logs"));
if (!(mb > 0 && mb <= 2000)) throw new Error("--mb takes a size in MB from 1 to 2000");
if (!(Number.isInteger(count) && count >= 1 && count <= 64)) throw new Error("--count takes a whole number from 1 to 64");

const spec = { ...LOGS[0], laps: 20 };
const names = Array.from({ length: count }, (_, i) => path.join(out, `load-${mb}mb-${i + 1}.csv`));
const recordFile = path.join(out, `load-${mb}mb.json`);

function metadataFor(k: number): Record<string, string> {
  return { ...spec.metadata, Session: `Load run ${k + 1} of ${count}` };
}

function alreadyThere(): boolean {
  if (!existsSync(recordFile)) return false;
  try {
    const record = JSON.parse(readFileSync(recordFile, "utf8")) as { files: { path: string; bytes: number }[] };
    return record.files.length === count && record.files.every((f, i) => f.path === names[i] && existsSync(f.path) && statSync(f.path).size === f.bytes);
  } catch {
    return false;
  }
}

if (!alreadyThere()) {
  mkdirSync(out, { recursive: true });
  const { columns } = simulate(spec);
  const stintS = columns.time[columns.time.length - 1] + 1 / spec.rateHz;
  const fds = names.map((name) => openSync(name, "w"));
  const sizes = names.map(() => 0);
  const write = (text: string) => {
    const bytes = Buffer.from(text, "utf8");
    fds.forEach((fd, i) => {
      writeSync(fd, bytes);
      sizes[i] += bytes.length;
    });
  };
  // Each file's own header; the same rows in all of them.
  const first = exportColumns(spec, columns);
  fds.forEach((fd, i) => {
    const header = Buffer.from(exportHeaderText(first, metadataFor(i), spec.dialect), "utf8");
    writeSync(fd, header);
    sizes[i] += header.length;
  });
  let k = 0;
  let rows = exportRowsText(first, spec.dialect);
  const target = mb * 1e6;
  for (;;) {
    let done = false;
    for (const chunk of rows) {
      write(chunk);
      if (sizes[0] >= target) {
        done = true;
        break;
      }
    }
    if (done) break;
    k++;
    // The next copy of the stint, carried on in time (new dropout draws each time).
    rows = exportRowsText(exportColumns(spec, columns, k * stintS), spec.dialect);
  }
  fds.forEach((fd) => closeSync(fd));
  writeFileSync(recordFile, JSON.stringify({ files: names.map((p, i) => ({ path: p, bytes: sizes[i] })) }));
}

const record = JSON.parse(readFileSync(recordFile, "utf8")) as { files: { path: string; bytes: number }[] };
console.log(JSON.stringify({ files: record.files, map: mapFor(spec), car: spec.car.name }));
