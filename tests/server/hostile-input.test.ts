// Hostile input (issue 12 item 7): a corpus of malformed exports through the engine's parser and through the
// upload route, path tricks in file names, SQL and HTML in text fields, formula cells in the CSV download, and
// fast-check fuzzing of the Garage's car-file import. Each case gets a clear answer and changes nothing stored.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { Readable } from "node:stream";
import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import { analyseLog } from "~/engine/analyse";
import { isEngineError } from "~/engine/errors";
import { db } from "~/server/db.server";
import { cars } from "~/db/schema/garage";
import { rawUploads } from "~/db/schema/sessions";
import * as uploads from "~/routes/api/uploads";
import * as carNew from "~/routes/garage/car-new";
import * as bandsCsv from "~/routes/api/session-bands-csv";
import { importCarFile } from "~/server/garage-io.server";
import { appUrl, args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";

const LOG = "sample-data/logs/marlin-kestrel-comma";
const good = readFileSync(`${LOG}.csv`);
// Everything before the first data row: the logger's preamble, the column names and the units row.
const namesAt = good.indexOf("Elapsed,");
const unitsEnd = good.indexOf(0x0a, good.indexOf(0x0a, namesAt) + 1) + 1;
const header = good.subarray(0, unitsEnd);
const car = JSON.parse(readFileSync("sample-data/cars/marlin-sr2.json", "utf8"));
const map = JSON.parse(readFileSync(`${LOG}.map.json`, "utf8"));
const rows = (n: number, row: string) => Buffer.concat([header, Buffer.from(Array.from({ length: n }, () => row).join("\n") + "\n")]);
const firstRow = good.subarray(header.length, good.indexOf(0x0a, header.length) + 1).toString();
const cells = firstRow.trim().split(",").length;

/** 32 malformed or hostile exports, each named by what is wrong with it. */
const CORPUS: Array<[string, Buffer]> = [
  ["empty file", Buffer.alloc(0)],
  ["header only", header],
  ["byte-order mark only", Buffer.from([0xef, 0xbb, 0xbf])],
  ["PNG image", Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(2000, 7)])],
  ["gzip stream", Buffer.concat([Buffer.from([0x1f, 0x8b, 0x08, 0x00]), Buffer.alloc(3000, 0x55)])],
  ["zip archive", Buffer.concat([Buffer.from("PK\x03\x04"), Buffer.alloc(3000, 0x33)])],
  ["PDF document", Buffer.from("%PDF-1.7\n" + "stream\n".repeat(500))],
  ["random bytes", Buffer.from(Array.from({ length: 8192 }, (_, i) => (i * 7919 + 13) % 256))],
  ["NUL bytes in every row", rows(300, firstRow.trim().replace(/,/g, ",\0"))],
  ["UTF-16LE with BOM", Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(good.subarray(0, 40_000).toString("utf8"), "utf16le")])],
  ["UTF-16BE with BOM", Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(good.subarray(0, 40_000).toString("utf8"), "utf16le").swap16()])],
  ["cut in the middle of a row", good.subarray(0, header.length + 137)],
  ["truncated after 150 rows, mid-number", good.subarray(0, good.indexOf(0x0a, 20_000) + 9)],
  ["one 3 MB line without a line end", Buffer.alloc(3 * 1024 * 1024, 0x31)],
  ["10 000 columns", Buffer.from(Array.from({ length: 10_000 }, (_, i) => `c${i}`).join(",") + "\n" + Array.from({ length: 300 }, () => Array(10_000).fill("1").join(",")).join("\n"))],
  ["mixed line endings", Buffer.from(good.subarray(0, 60_000).toString().split("\n").map((l, i) => l + (i % 3 === 0 ? "\r\n" : i % 3 === 1 ? "\r" : "\n")).join(""))],
  ["formula cells (=)", rows(300, Array(cells).fill("=1+1").join(","))],
  ["formula cells (+)", rows(300, Array(cells).fill("+cmd|' /C calc'!A0").join(","))],
  ["formula cells (-)", rows(300, Array(cells).fill("-2+3+cmd|' /C calc'!A0").join(","))],
  ["formula cells (@)", rows(300, Array(cells).fill("@SUM(1+1)*cmd|' /C calc'!A0").join(","))],
  ["unbalanced quotes", rows(300, '"' + firstRow.trim())],
  ["text in every cell", rows(300, Array(cells).fill("n/a").join(","))],
  ["numbers past the double range", rows(300, Array(cells).fill("1e309").join(","))],
  ["NaN and Infinity words", rows(300, Array(cells).fill("Infinity").join(","))],
  ["rows with extra cells", rows(300, firstRow.trim() + ",1,2,3")],
  ["rows with too few cells", rows(300, "1,2")],
  ["only delimiters", Buffer.from(",,,,,\n".repeat(500))],
  ["HTML page", Buffer.from("<!doctype html><html><script>alert(1)</script><p>not a log</p></html>\n".repeat(50))],
  ["JSON document", Buffer.from(JSON.stringify({ rows: Array.from({ length: 500 }, (_, i) => ({ t: i, v: i * 2 })) }))],
  ["Latin-1 bytes in the header", Buffer.concat([Buffer.from([0x76, 0xe9, 0x6c, 0x6f, 0x2c]), good.subarray(0, 30_000)])],
  ["SQL in the header", Buffer.concat([Buffer.from("time'; DROP TABLE analysis_sessions; --,speed\n"), Buffer.from("0,1\n".repeat(400))])],
  ["control characters", Buffer.from(Array.from({ length: 400 }, (_, i) => `${i}\x1b[31m,\x07${i}\x08\n`).join(""))],
];

async function* chunks(bytes: Buffer): AsyncIterable<Uint8Array> {
  for (let i = 0; i < bytes.length; i += 65_536) yield bytes.subarray(i, i + 65_536);
}

describe("malformed exports through the engine's parser", () => {
  it("the corpus holds at least 30 exports", () => {
    expect(CORPUS.length).toBeGreaterThanOrEqual(30);
  });

  it.each(CORPUS)("%s: figures with warnings, or one clear EngineError line", async (name, bytes) => {
    let answer: string;
    try {
      const summary = await analyseLog(Readable.from(chunks(bytes)), car, map);
      expect(summary).toHaveProperty("samples");
      answer = `read, ${summary.samples} samples, ${summary.warnings.length} warnings`;
    } catch (error) {
      // Only the engine's own errors, each one readable line (errors.ts): never a TypeError or a stack.
      expect(isEngineError(error), `${name}: ${String(error)}`).toBe(true);
      const message = (error as Error).message;
      expect(message).not.toMatch(/\n|undefined|NaN|\[object /);
      expect(message.length).toBeLessThan(400);
      answer = `refused: ${message}`;
    }
    console.log(`tried: ${name} (${bytes.length} bytes) through analyseLog; held: ${answer}`);
  }, 60_000);
});

let w: Awaited<ReturnType<typeof garageWorld>>;
beforeAll(async () => {
  w = await garageWorld();
}, 120_000);

async function storedUploads(): Promise<number> {
  const [row] = await db.select({ n: count() }).from(rawUploads).where(eq(rawUploads.teamId, w.team.id));
  return Number(row.n);
}

function uploadRequest(bytes: Buffer, fileName: string): Request {
  const form = new FormData();
  form.append("file", new Blob([new Uint8Array(bytes)]), fileName);
  return new Request(`${appUrl}/api/t/${w.team.slug}/uploads`, { method: "POST", headers: { origin: appUrl, cookie: w.jars.engineer.header() }, body: form });
}

describe("malformed exports through the upload route", () => {
  it.each(CORPUS)("%s: stored (text) or refused with a message, and a refusal stores nothing", async (name, bytes) => {
    const before = await storedUploads();
    const answer = await outcome(() => uploads.action(args(uploadRequest(bytes, `${name.replace(/\W+/g, "-")}.csv`), { teamSlug: w.team.slug })));
    if (answer.status === 201) {
      const upload = (answer.body as { upload: { fileName: string; bytes: number } }).upload;
      expect(upload.bytes).toBe(bytes.length);
    } else {
      expect([400, 413, 415]).toContain(answer.status);
      expect(typeof (answer.body as { error: string }).error).toBe("string");
      expect(await storedUploads()).toBe(before);
    }
    console.log(`tried: ${name} through POST /api/t/:team/uploads; held: ${answer.status} ${answer.status === 201 ? "stored as text" : (answer.body as { error: string }).error}`);
  }, 60_000);

  it.each([
    "../../etc/passwd.csv",
    "..\\..\\windows\\win.ini.csv",
    "/absolute/path/log.csv",
    "%2e%2e%2fescape.csv",
    "stint\u0000.csv",
    `${"x".repeat(600)}.csv`,
    "<img src=x onerror=alert(1)>.csv",
  ])("a path trick in the file name (%s) never leaves the team's folder", async (fileName) => {
    const bytes = Buffer.concat([good.subarray(0, 30_000), Buffer.from(`# ${randomUUID()}\n`)]);
    const answer = await outcome(() => uploads.action(args(uploadRequest(bytes, fileName), { teamSlug: w.team.slug })));
    if (answer.status === 201) {
      const { id, fileName: stored } = (answer.body as { upload: { id: string; fileName: string } }).upload;
      expect(stored).not.toMatch(/[\\/]/);
      expect(stored.length).toBeLessThanOrEqual(255);
      const [row] = await db.select().from(rawUploads).where(eq(rawUploads.id, id));
      expect(row.storageKey.startsWith(`teams/${w.team.id}/`)).toBe(true);
      expect(row.storageKey).not.toContain("..");
    } else {
      expect([400, 415]).toContain(answer.status);
    }
    console.log(`tried: upload named ${JSON.stringify(fileName.slice(0, 40))}; held: ${answer.status}`);
  });
});

describe("SQL and HTML in text fields", () => {
  const HOSTILE = ["'; DROP TABLE cars; --", "Robert'); DELETE FROM member WHERE ('1'='1", "<script>alert(document.cookie)</script>", "\" onmouseover=\"alert(1)", "{{7*7}} ${7*7}"];

  it.each(HOSTILE)("a car named %j is stored exactly as typed and nothing else changes", async (name) => {
    const before = (await db.select({ n: count() }).from(cars))[0].n;
    const path = `/t/${w.team.slug}/garage/new`;
    const made = await outcome(() =>
      carNew.action(args(formRequest(path, { units: "metric", name, wheelbaseMm: "2450", cogHeightMm: "400", steeringRatio: "12", fuelDensityKgPerL: "0.745", massKg: "620", staticFrontWeightPct: "44" }, w.jars.engineer), { teamSlug: w.team.slug })),
    );
    expect(made.status).toBe(302);
    const id = made.location!.split("/").at(-1)!;
    const [row] = await db.select().from(cars).where(eq(cars.id, id));
    expect(row.name).toBe(name.normalize("NFC").trim());
    expect((await db.select({ n: count() }).from(cars))[0].n).toBe(before + 1);
    console.log(`tried: car name ${JSON.stringify(name)}; held: stored verbatim (parameterised SQL), one row added`);
  });

  it("formula cells are neutralised in the bands CSV download (OWASP CSV injection)", async () => {
    const { id } = await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "=HYPERLINK(\"http://evil.example\",\"x\")" });
    const response = (await bandsCsv.loader(args(getRequest(`/api/sessions/${id}/bands.csv?team=${w.team.slug}`, w.jars.analyst), { sessionId: id }))) as Response;
    expect(response.status).toBe(200);
    const text = await response.text();
    const lines = text.trim().split(/\r?\n/).slice(1);
    expect(lines.length).toBeGreaterThan(0);
    for (const line of lines) expect(line.startsWith("=")).toBe(false);
    expect(lines.every((l) => l.startsWith(`"'=HYPERLINK`) || l.startsWith(`'=HYPERLINK`))).toBe(true);
    console.log(`tried: a session named as a spreadsheet formula; held: ${lines.length} CSV rows, each name cell starting with a quote mark`);
  });
});

describe("fuzzing the car-file import (fast-check, fixed runs)", () => {
  it("any JSON value: a clear list of problems or a car; never an exception, never a partial car", async () => {
    const before = (await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.outsider.teamId)))[0].n;
    let created = 0;
    await fc.assert(
      fc.asyncProperty(fc.oneof(fc.json(), fc.jsonValue().map((v) => JSON.stringify({ ...car, garage: v }))), async (text) => {
        const result = await importCarFile(w.outsider.teamId, w.outsider.userId, text);
        if (result.ok) created++;
        else for (const e of result.errors) expect(typeof e === "string" && e.length > 0 && e.length < 600).toBe(true);
      }),
      { numRuns: 200, seed: 20261202 },
    );
    const after = (await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.outsider.teamId)))[0].n;
    expect(after - before).toBe(created);
    console.log(`tried: 200 generated car files (seed 20261202); held: every refusal a message list, ${created} cars created, no partial rows`);
  }, 120_000);
});
