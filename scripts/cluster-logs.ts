/**
 * Logs for `npm run bench:cluster`, made by the demo scenario's generator (sample-data/generate.ts:
 * back-to-back 20-lap stints of the Marlin SR2 at Kestrel Bank, as `npm run demo:generate -- --large`
 * writes them). The data rows of about `mb` MB are generated once and kept (`rows-<mb>mb.csv` in `out`);
 * each upload is its own preamble and header (the session named after the run's tag and the file's
 * number) followed by those rows, so every file of every run has its own SHA-256 and is a new session,
 * as different engineers' logs would be.
 *
 *   tsx scripts/cluster-logs.ts --mb 100 --count 8 --tag 2026-12-02T23:20 --out .data/bench/logs
 *
 * Prints one JSON line: { rowsFile, rowsBytes, heads: [text of each file's preamble and header], map, car }.
 */
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, renameSync, statSync, writeFileSync, writeSync } from "node:fs";
import path from "node:path";
import { exportColumns, LOGS, mapFor, simulate } from "../sample-data/generate";
import { exportHeaderText, exportRowsText } from "../sample-data/export-writer";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const mb = Number(arg("mb", "100"));
const count = Number(arg("count", "8"));
const tag = arg("tag", new Date().toISOString());
const out = path.resolve(arg("out", ".data/bench/logs"));
if (!(mb > 0 && mb <= 2000)) throw new Error("--mb takes a size in MB from 1 to 2000");
if (!(Number.isInteger(count) && count >= 1 && count <= 64)) throw new Error("--count takes a whole number from 1 to 64");

const spec = { ...LOGS[0], laps: 20 };
const rowsFile = path.join(out, `rows-${mb}mb.csv`);
const recordFile = `${rowsFile}.json`;

function cached(): boolean {
  if (!existsSync(recordFile) || !existsSync(rowsFile)) return false;
  try {
    return (JSON.parse(readFileSync(recordFile, "utf8")) as { bytes: number }).bytes === statSync(rowsFile).size;
  } catch {
    return false;
  }
}

const { columns } = simulate(spec);
const first = exportColumns(spec, columns);
if (!cached()) {
  mkdirSync(out, { recursive: true });
  const stintS = columns.time[columns.time.length - 1] + 1 / spec.rateHz;
  const partial = `${rowsFile}.part`;
  const fd = openSync(partial, "w");
  let bytes = 0;
  const target = mb * 1e6;
  let rows = exportRowsText(first, spec.dialect);
  for (let k = 1; bytes < target; k++) {
    for (const chunk of rows) {
      const buf = Buffer.from(chunk, "utf8");
      writeSync(fd, buf);
      bytes += buf.length;
      if (bytes >= target) break;
    }
    // The next copy of the stint, carried on in time (new dropout draws each time).
    rows = exportRowsText(exportColumns(spec, columns, k * stintS), spec.dialect);
  }
  closeSync(fd);
  renameSync(partial, rowsFile);
  writeFileSync(recordFile, JSON.stringify({ bytes }));
}

const heads = Array.from({ length: count }, (_, k) => exportHeaderText(first, { ...spec.metadata, Session: `Load run ${tag} ${k + 1}/${count}` }, spec.dialect));
console.log(JSON.stringify({ rowsFile, rowsBytes: statSync(rowsFile).size, heads, map: mapFor(spec), car: spec.car.name }));
