/**
 * The channel-map suggester against every dialect Rakeline ships: the committed demo logs (as a user
 * drops them) and the demo generator's dialect specs (as written afresh). The generator's map.json is
 * the truth for which column holds which channel and in which unit; the suggester must find all of
 * them from the header alone. It never proposes an invert (signs are checked separately), so that
 * field is left out of the comparison.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { inspectLog, suggestChannelMap } from "~/engine/ingest";
import type { ChannelMap } from "~/engine/types";
import { writeExport } from "../../sample-data/export-writer";
import { LOGS, mapFor } from "../../sample-data/generate";

const LOG_DIR = "sample-data/logs";
const withoutInvert = (map: Partial<ChannelMap>) =>
  Object.fromEntries(Object.entries(map).map(([channel, e]) => [channel, { column: e!.column, unit: e!.unit }]));

const committed = readdirSync(LOG_DIR).filter((f) => f.endsWith(".csv")).sort();

describe("suggestChannelMap on the committed demo logs", () => {
  it("finds every log the generator declares", () => {
    expect(committed).toEqual(LOGS.map((l) => l.file).sort());
  });

  it.each(committed)("%s: proposes the complete committed map", (file) => {
    const header = inspectLog(readFileSync(join(LOG_DIR, file)).subarray(0, 64 * 1024));
    const expected = JSON.parse(readFileSync(join(LOG_DIR, file.replace(/\.csv$/, ".map.json")), "utf8")) as ChannelMap;
    const { map, notes } = suggestChannelMap(header);
    expect(withoutInvert(map)).toEqual(withoutInvert(expected));
    expect(notes.join(" ")).not.toMatch(/no column found|cannot read|has no unit/);
  });
});

describe("suggestChannelMap on the generator's dialects", () => {
  it.each(LOGS.map((l) => [l.file, l] as const))("%s: proposes the map the generator writes", (_file, spec) => {
    // Arbitrary finite values (not the simulation): only the header and the dialect matter here.
    const channels = spec.columns.map((c, j) => ({
      name: c.column, unit: c.unit, decimals: c.decimals,
      values: Float64Array.from({ length: 40 }, (_, i) => (c.channel === "time" ? i : Math.sin(i / 7 + j) * 10)),
    }));
    const text = [...writeExport(channels, spec.metadata, spec.dialect)].join("");
    const { map, notes } = suggestChannelMap(inspectLog(new TextEncoder().encode(text)));
    expect(withoutInvert(map)).toEqual(withoutInvert(mapFor(spec)));
    expect(notes.join(" ")).not.toMatch(/no column found/);
  });
});
