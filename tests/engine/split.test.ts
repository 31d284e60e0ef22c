import { createReadStream, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { analyseLogSplit, analysePart } from "~/engine/split";
import type { LogFileAccess, PartRunner, SplitReport } from "~/engine/split";
import type { SessionSummary } from "~/engine/summary";
import type { CarInput, ChannelMap } from "~/engine/types";
import { LOGS } from "../../sample-data/generate";
import { analyseFileInParts, fileAccess } from "../../scripts/lib/part-threads";

// A log analysed in parts (one per thread) must give what the whole-log run gives, and the
// generator's truth must still come out within the engine issue's tolerances (ClA 5 %, balance
// 1 point). Parts are made small here (the product's smallest part is 16 MB) so the committed demo
// logs split into three.
const ROOT = join(__dirname, "..", "..");
const LOG_DIR = join(ROOT, "sample-data", "logs");
const SMALL_PARTS = { minPartBytes: 96 << 10, leadInBytes: 48 << 10 };
const tmp = mkdtempSync(join(tmpdir(), "rakeline-split-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function inputs(file: string): { path: string; car: CarInput; map: ChannelMap; truth: Record<string, number> } {
  const base = file.replace(/\.csv$/, "");
  const truth = JSON.parse(readFileSync(join(LOG_DIR, `${base}.truth.json`), "utf8"));
  return {
    path: join(LOG_DIR, file),
    car: JSON.parse(readFileSync(join(LOG_DIR, truth.car_file), "utf8")),
    map: JSON.parse(readFileSync(join(LOG_DIR, `${base}.map.json`), "utf8")),
    truth,
  };
}

function bytesAccess(bytes: Uint8Array): LogFileAccess {
  return {
    size: bytes.length,
    readAt: async (o, l) => bytes.slice(o, Math.min(bytes.length, o + l)),
    open: (o) =>
      (async function* () {
        for (let p = o; p < bytes.length; p += 1 << 15) yield bytes.slice(p, Math.min(bytes.length, p + (1 << 15)));
      })(),
  };
}

const whole = (path: string, car: CarInput, map: ChannelMap) => analyseLog(createReadStream(path, { highWaterMark: 1 << 16 }), car, map);

/**
 * Every figure of `b` equal to `a`'s. The smoothing's window sums restart at every time block
 * (app/engine/filters.ts), so a part computes each sample exactly as the whole-log run; the parts'
 * sums are added in another order, which moves a figure by about 1e-15 of itself, far below the
 * digits the summary prints.
 */
function expectSameSummary(a: unknown, b: unknown): void {
  expect(JSON.stringify(b)).toBe(JSON.stringify(a));
}

function expectSameTraces(a: SessionSummary["traces"], b: SessionSummary["traces"]): void {
  expect(b.t_s.length).toBeGreaterThan(100);
  expect(b.t_s.length).toBeLessThanOrEqual(2048);
  for (let i = 1; i < b.t_s.length; i++) expect(b.t_s[i]).toBeGreaterThan(b.t_s[i - 1]);
  expect(b.t_s[0]).toBe(a.t_s[0]);
  for (const [name, ch] of Object.entries(a.channels)) {
    const lo = (v: (number | null)[]) => Math.min(...v.filter((x): x is number => x !== null));
    const hi = (v: (number | null)[]) => Math.max(...v.filter((x): x is number => x !== null));
    if (ch.min.every((x) => x === null)) {
      expect(b.channels[name].min.every((x) => x === null), name).toBe(true);
      continue;
    }
    // The extremes of each trace survive any bucketing.
    expect(Math.abs(lo(b.channels[name].min) - lo(ch.min)), name).toBeLessThan(0.01 + 1e-3 * Math.abs(lo(ch.min)));
    expect(Math.abs(hi(b.channels[name].max) - hi(ch.max)), name).toBeLessThan(0.01 + 1e-3 * Math.abs(hi(ch.max)));
  }
}

describe.each(LOGS.map((l) => l.file))("analysis in parts: %s", (file) => {
  it("gives the whole-log summary, in three parts, and the generator's truth", async () => {
    const { path, car, map, truth } = inputs(file);
    const a = await whole(path, car, map);
    const reports: SplitReport[] = [];
    const b = await analyseLogSplit(bytesAccess(readFileSync(path)), car, map, { parts: 3, ...SMALL_PARTS }, (r) => reports.push(r));
    expect(reports).toEqual([{ parts: 3, whole: null }]);
    const { traces: ta, ...ra } = a;
    const { traces: tb, ...rb } = b;
    expectSameSummary(ra, rb);
    expectSameTraces(ta, tb);
    expect(b.samples).toBe(a.samples);
    expect(b.log).toEqual(a.log);
    expect(Math.abs(b.aero.cla_front_m2! / truth.cla_front_m2_q2 - 1)).toBeLessThan(0.05);
    expect(Math.abs(b.aero.balance_front_pct! - truth.balance_front_pct_q2)).toBeLessThan(1);
  });
});

describe("analysis in parts: order and fallbacks", () => {
  it("without static readings, each part starts only once the part before has settled the static reference", async () => {
    const { path, car, map } = inputs("marlin-kestrel-semicolon.csv");
    expect(car.static_damper_mm).toBeUndefined();
    const file = bytesAccess(readFileSync(path));
    const events: string[] = [];
    const runner: PartRunner = async (plan, k, run) => {
      events.push(`start ${k} seed ${run.seed ? run.seed.estN : "none"}`);
      const r = await analysePart(file.open(plan.parts[k].readFrom), car, map, {}, plan, k, {
        seed: run.seed,
        onSeed: (s) => {
          events.push(`seed ${k}`);
          run.onSeed?.(s);
        },
      });
      events.push(`end ${k}`);
      return r;
    };
    const b = await analyseLogSplit(file, car, map, { parts: 3, runner, ...SMALL_PARTS });
    const a = await whole(path, car, map);
    expect(events[0]).toBe("start 0 seed none");
    // Part 1 starts after part 0's seed (or end), with a reference learned from samples.
    const start1 = events.findIndex((e) => e.startsWith("start 1"));
    expect(events.slice(0, start1).some((e) => e === "seed 0" || e === "end 0")).toBe(true);
    expect(Number(events[start1].split(" ").pop())).toBeGreaterThan(0);
    const { traces: _a, ...ra } = a;
    const { traces: _b, ...rb } = b;
    expectSameSummary(ra, rb);
  });

  it("a log with quoted cells is analysed whole (a quoted line break cannot be told from a row end mid-file)", async () => {
    const { path, car, map } = inputs("marlin-kestrel-comma.csv");
    const lines = readFileSync(path, "utf8").split("\n");
    // Quote the time cell of every row in the second half.
    const quoted = lines.map((l, i) => (i > lines.length / 2 && /^\d/.test(l) ? l.replace(/^([^,]*)/, '"$1"') : l)).join("\n");
    const reports: SplitReport[] = [];
    const b = await analyseLogSplit(bytesAccess(new TextEncoder().encode(quoted)), car, map, { parts: 3, ...SMALL_PARTS }, (r) => reports.push(r));
    expect(reports).toEqual([{ parts: 1, whole: "the log has quoted cells" }]);
    const a = await whole(path, car, map);
    expect(b.aero).toEqual(a.aero);
  });

  it("an input error in a later part is reported exactly as the whole-log run reports it (its file line)", async () => {
    const { path, car, map } = inputs("marlin-kestrel-comma.csv");
    const lines = readFileSync(path, "utf8").split("\n");
    const bad = Math.floor(lines.length * 0.8);
    lines[bad] = lines[bad].replace(/^[^,]*/, "0.5"); // time jumps back
    const bytes = new TextEncoder().encode(lines.join("\n"));
    const badPath = join(tmp, "time-back.csv");
    writeFileSync(badPath, bytes);
    const expected = await whole(badPath, car, map).then(() => null, (e: Error) => e.message);
    expect(expected).toMatch(/time is not increasing at data row \d+ \(line \d+\)/);
    await expect(analyseLogSplit(bytesAccess(bytes), car, map, { parts: 3, ...SMALL_PARTS })).rejects.toThrow(expected!);
  });

  it("a part that fails for any other reason (a worker lost, say) makes the log run whole, with the same figures", async () => {
    const { path, car, map } = inputs("vesper-kestrel-tab.csv");
    const file = bytesAccess(readFileSync(path));
    const runner: PartRunner = async (plan, k, run) => {
      if (k === 1) throw new Error("worker thread stopped");
      return analysePart(file.open(plan.parts[k].readFrom), car, map, {}, plan, k, run);
    };
    const reports: SplitReport[] = [];
    const b = await analyseLogSplit(file, car, map, { parts: 3, runner, ...SMALL_PARTS }, (r) => reports.push(r));
    expect(reports).toHaveLength(1);
    expect(reports[0].parts).toBe(1);
    expect(reports[0].whole).toMatch(/a part stopped \(worker thread stopped\)/);
    const a = await whole(path, car, map);
    expect(b.aero).toEqual(a.aero);
    expect(b.bands).toEqual(a.bands);
  });

  it("reports progress in bytes over the whole file, never going back, ending at its size", async () => {
    const { path, car, map } = inputs("marlin-kestrel-comma.csv");
    const bytes = readFileSync(path);
    const seen: number[] = [];
    await analyseLogSplit(bytesAccess(bytes), car, map, { parts: 3, ...SMALL_PARTS, onProgress: (b) => seen.push(b) });
    expect(seen.length).toBeGreaterThan(10);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen.at(-1)).toBe(bytes.length);
    expect(Math.max(...seen)).toBe(bytes.length);
  });

  it("a small file is analysed whole, and says why", async () => {
    const { path, car, map } = inputs("vesper-coldwater-comma.csv");
    const reports: SplitReport[] = [];
    await analyseLogSplit(bytesAccess(readFileSync(path)), car, map, { parts: 4 }, (r) => reports.push(r));
    expect(reports[0].parts).toBe(1);
    expect(reports[0].whole).toMatch(/too small to split/);
  });
});

describe("analysis in parts on worker threads (the CLI's host)", () => {
  it("three threads give the whole-log summary", async () => {
    const { path, car, map } = inputs("marlin-kestrel-comma.csv");
    const reports: SplitReport[] = [];
    const b = await analyseFileInParts(path, car, map, { threads: 3, ...SMALL_PARTS }, (r) => reports.push(r));
    expect(reports).toEqual([{ parts: 3, whole: null }]);
    const a = await whole(path, car, map);
    const { traces: _a, ...ra } = a;
    const { traces: _b, ...rb } = b;
    expectSameSummary(ra, rb);
    const f = fileAccess(path);
    expect((await f.readAt(f.size - 10, 100)).length).toBe(10);
    f.close();
  }, 60_000);
});
