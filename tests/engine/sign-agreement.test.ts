import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { checkChannelSigns } from "~/engine/sign-check";
import type { ChannelMap, ChannelName } from "~/engine/types";

// The start-of-log check (mapping step) and the session summary judge signs with one accumulator and
// one verdict (app/engine/sign-evidence.ts): on the same rows they must agree. Relations (common
// practice, kinematics): long_accel is dv/dt; braking compresses the front dampers and extends the
// rear; lat_accel, steer and yaw_rate share the sign of a left turn (ISO 8855 axes).
const LOGS = "sample-data/logs/";
const load = (name: string) => ({
  bytes: readFileSync(`${LOGS}${name}.csv`),
  map: JSON.parse(readFileSync(`${LOGS}${name}.map.json`, "utf8")) as ChannelMap,
  car: JSON.parse(readFileSync(`${LOGS}${JSON.parse(readFileSync(`${LOGS}${name}.truth.json`, "utf8")).car_file}`, "utf8")),
});
const flip = (map: ChannelMap, ...channels: ChannelName[]): ChannelMap => {
  const out = structuredClone(map) as Record<string, { column: string; unit: string; invert?: boolean }>;
  for (const c of channels) {
    if (out[c].invert) delete out[c].invert;
    else out[c].invert = true;
  }
  return out as unknown as ChannelMap;
};

/** Channels the summary's suspected_sign_error warnings name (by the channel names they quote). */
function summaryNames(messages: string[]): string[] {
  const names = ["long_accel", "damper_fl", "damper_fr", "damper_rl", "damper_rr", "lat_accel", "steer", "yaw_rate"];
  return names.filter((n) => messages.some((m) => new RegExp(`\\b${n}\\b`).test(m))).sort();
}

describe.each([
  ["vesper-kestrel-tab", ["long_accel"]],
  ["vesper-kestrel-tab", ["damper_rl", "damper_rr"]],
  ["marlin-kestrel-comma", ["damper_fl"]],
  ["marlin-kestrel-semicolon", ["steer"]],
  ["marlin-kestrel-semicolon", ["yaw_rate"]],
] as [string, ChannelName[]][])("%s with %j flipped", (name, flipped) => {
  it("the check proposes the flip and the summary names the same channels, on the same rows", async () => {
    const { bytes, map, car } = load(name);
    // A minute or two of log: the check reads it as a head, the summary as a whole (short) log.
    let end = Math.min(bytes.length, 600_000);
    while (bytes[end - 1] !== 10) end--;
    const head = bytes.subarray(0, end);
    const wrong = flip(map, ...flipped);
    const checks = await checkChannelSigns(head, wrong);
    const inverts = checks.filter((c) => c.verdict === "invert").map((c) => c.channel).sort();
    expect(inverts).toEqual([...flipped].sort());
    const s = await analyseLog((async function* () { yield head; })(), car, wrong);
    const signs = s.warnings.filter((w) => w.code === "suspected_sign_error").map((w) => w.message);
    expect(summaryNames(signs)).toEqual([...flipped].sort());
  });
});

describe("a clean map", () => {
  it.each(["marlin-kestrel-comma", "marlin-kestrel-semicolon", "vesper-kestrel-tab"])("%s: neither the check nor the summary finds a sign error", async (name) => {
    const { bytes, map, car } = load(name);
    let end = Math.min(bytes.length, 600_000);
    while (bytes[end - 1] !== 10) end--;
    const head = bytes.subarray(0, end);
    expect((await checkChannelSigns(head, map)).filter((c) => c.verdict === "invert")).toEqual([]);
    const s = await analyseLog((async function* () { yield head; })(), car, map);
    expect(s.warnings.filter((w) => w.code === "suspected_sign_error")).toEqual([]);
  });
});
