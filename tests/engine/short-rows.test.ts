import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { analyseLogSplit } from "~/engine/split";
import type { LogFileAccess } from "~/engine/split";

// A data row with fewer cells than the header (a file cut mid-row, or a row that lost a delimiter)
// cannot say which of its values belong to which column: it is left out whole and named by its time,
// never read with its values moved into the neighbouring columns (RFC 4180 §2.4: every record holds
// the same number of fields as the header).
const DIR = join(__dirname, "..", "..", "sample-data");
const car = JSON.parse(readFileSync(join(DIR, "cars", "marlin-sr2.json"), "utf8"));
const map = JSON.parse(readFileSync(join(DIR, "logs", "marlin-kestrel-comma.map.json"), "utf8"));
const lines = readFileSync(join(DIR, "logs", "marlin-kestrel-comma.csv"), "utf8").split("\n");
const firstData = lines.findIndex((l) => /^\d/.test(l));

/** The log with the given data rows (0-based, after the header) cut by `edit`. */
function withRows(edit: Record<number, (line: string) => string>): { bytes: Uint8Array; times: string[] } {
  const out = lines.slice();
  const times: string[] = [];
  for (const [k, f] of Object.entries(edit)) {
    const i = firstData + Number(k);
    times.push(out[i].split(",")[0]);
    out[i] = f(out[i]);
  }
  return { bytes: new TextEncoder().encode(out.join("\n")), times };
}
const run = (bytes: Uint8Array) => analyseLog((async function* () { yield bytes; })(), car, map);
const warning = (s: Awaited<ReturnType<typeof run>>) => s.warnings.find((w) => w.code === "short_rows");

describe("rows with fewer cells than the header", () => {
  it("are left out, counted, and named by their time in a warning", async () => {
    const clean = await run(withRows({}).bytes);
    // Row 1200 loses its second cell (every later value would move one column left); row 3000 is cut after four cells.
    const { bytes, times } = withRows({
      1200: (l) => l.split(",").filter((_, j) => j !== 1).join(","),
      3000: (l) => l.split(",").slice(0, 4).join(","),
    });
    const s = await run(bytes);
    expect(clean.samples - s.samples).toBe(2);
    expect(warning(clean)).toBeUndefined();
    const w = warning(s)!;
    expect(w.message).toMatch(/^2 rows with fewer cells than the header were left out/);
    for (const t of times) expect(w.message).toContain(`${Number(t)} s`);
    // Left out, not shifted: no cell of those rows counts as a dropout either.
    expect(s.log.dropped_cells).toEqual(clean.log.dropped_cells);
    expect(Math.abs(s.aero.cla_front_m2! - clean.aero.cla_front_m2!)).toBeLessThan(0.002);
  });

  it("a file that ends mid-row loses that row with the warning", async () => {
    const out = lines.slice(0, firstData + 5000);
    const last = out[out.length - 1].split(",");
    out[out.length - 1] = last.slice(0, 3).join(",") + "," + last[3].slice(0, 2);
    const s = await run(new TextEncoder().encode(out.join("\n")));
    expect(s.samples).toBe(4999);
    expect(warning(s)?.message).toMatch(/^1 row with fewer cells than the header was left out/);
  });

  it("gives the same count and warning when the log is analysed in parts", async () => {
    const { bytes } = withRows({ 300: (l) => l.split(",").slice(0, 6).join(","), 15000: (l) => l.split(",").slice(0, 2).join(","), 28000: (l) => l.split(",").slice(0, 8).join(",") });
    const access: LogFileAccess = {
      size: bytes.length,
      readAt: async (o, l) => bytes.slice(o, Math.min(bytes.length, o + l)),
      open: (o) => (async function* () { for (let p = o; p < bytes.length; p += 1 << 15) yield bytes.slice(p, Math.min(bytes.length, p + (1 << 15))); })(),
    };
    const a = await run(bytes);
    const b = await analyseLogSplit(access, car, map, { parts: 3, minPartBytes: 96 << 10, leadInBytes: 48 << 10 });
    expect(warning(a)!.message).toMatch(/^3 rows/);
    expect(warning(b)).toEqual(warning(a));
    expect(b.samples).toBe(a.samples);
  });
});
