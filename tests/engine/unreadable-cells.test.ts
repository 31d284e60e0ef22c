import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";

// A cell past the double range (IEEE 754 binary64 tops out near 1.8e308) is no measurement: it
// must not enter the figures as Infinity, and the summary names the column it came from.
const DIR = join(__dirname, "..", "..", "sample-data");

describe("a number past the double range in a data cell", () => {
  it("is left out as a dropout, with a warning naming the column", async () => {
    const text = readFileSync(join(DIR, "logs", "marlin-kestrel-comma.csv"), "utf8");
    const lines = text.split("\n");
    // A data row well past the header: its last cell (rear-right damper) becomes 1e309.
    const i = 500;
    lines[i] = lines[i].replace(/,[^,\r]*(\r?)$/, ",1e309$1");
    const car = JSON.parse(readFileSync(join(DIR, "cars", "marlin-sr2.json"), "utf8"));
    const map = JSON.parse(readFileSync(join(DIR, "logs", "marlin-kestrel-comma.map.json"), "utf8"));
    const bytes = new TextEncoder().encode(lines.join("\n"));
    const s = await analyseLog((async function* () { yield bytes; })(), car, map);
    const column = map.damper_rr.column as string;
    expect(s.log.dropped_cells[column]).toBe(1);
    const w = s.warnings.find((x) => x.code === "unreadable_cells");
    expect(w?.message).toContain(`"${column}" 1`);
    expect(JSON.stringify(s)).not.toMatch(/Infinity|NaN/);
    expect(s.aero.cla_front_m2).not.toBeNull();
  });
});
