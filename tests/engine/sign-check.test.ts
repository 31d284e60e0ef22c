import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { checkChannelSigns } from "~/engine/sign-check";
import type { ChannelMap, ChannelName } from "~/engine/types";

// The sign check against the demo generator's logs, whose maps (written with the logs) are the truth
// for which channels the logger records with the other sign. Relations it rests on:
// - longitudinal acceleration is the rate of change of speed (kinematics, by definition);
// - braking pitches a car nose-down: front dampers compress, rear ones extend; downforce compresses
//   all four (common practice);
// - left turn positive for lateral acceleration, steering and yaw rate, as in the ISO 8855 vehicle
//   axis system (x forward, y to the left, z up; checked against a restatement of the standard in an
//   inertial measurement unit's manual, not against the standard itself).
const LOGS = "sample-data/logs/";
const load = (name: string) => ({
  head: readFileSync(`${LOGS}${name}.csv`).subarray(0, 300_000), // about a lap: a preview, cut mid-row
  map: JSON.parse(readFileSync(`${LOGS}${name}.map.json`, "utf8")) as ChannelMap,
});
const flip = (map: ChannelMap, ...channels: ChannelName[]): ChannelMap => {
  const out = structuredClone(map) as Record<string, { column: string; unit: string; invert?: boolean }>;
  for (const c of channels) {
    if (out[c].invert) delete out[c].invert;
    else out[c].invert = true;
  }
  return out as unknown as ChannelMap;
};
const inverts = async (head: Uint8Array, map: ChannelMap) => (await checkChannelSigns(head, map)).filter((c) => c.verdict === "invert").map((c) => c.channel).sort();

describe("channel sign check on the start of a log", () => {
  it.each(["marlin-kestrel-comma", "marlin-kestrel-semicolon", "vesper-kestrel-tab", "vesper-coldwater-comma"])("finds every channel consistent with the map written for %s", async (name) => {
    const { head, map } = load(name);
    const checks = await checkChannelSigns(head, map);
    expect(checks.filter((c) => c.verdict !== "consistent")).toEqual([]);
    // Every mapped channel that has a sign test is reported.
    const tested = ["long_accel", "damper_fl", "damper_fr", "damper_rl", "damper_rr", "lat_accel", "steer", "yaw_rate"].filter((c) => c in map);
    expect(checks.map((c) => c.channel).sort()).toEqual(tested.sort());
  });

  it("proposes flipping exactly the channels the logger records the other way (the map's inverts undone)", async () => {
    const tab = load("vesper-kestrel-tab");
    expect(await inverts(tab.head, flip(tab.map, "long_accel", "damper_rl", "damper_rr"))).toEqual(["damper_rl", "damper_rr", "long_accel"]);
    const semi = load("marlin-kestrel-semicolon");
    expect(await inverts(semi.head, flip(semi.map, "steer"))).toEqual(["steer"]);
  });

  it("names a single wrong damper corner, and the odd one out of lateral, steering and yaw", async () => {
    const comma = load("marlin-kestrel-comma");
    expect(await inverts(comma.head, flip(comma.map, "damper_fl"))).toEqual(["damper_fl"]);
    expect(await inverts(comma.head, flip(comma.map, "damper_rr"))).toEqual(["damper_rr"]);
    const semi = load("marlin-kestrel-semicolon");
    expect(await inverts(semi.head, flip(semi.map, "lat_accel"))).toEqual(["lat_accel"]);
    expect(await inverts(semi.head, flip(semi.map, "yaw_rate"))).toEqual(["yaw_rate"]);
  });

  it("names a unit slip on speed or long_accel by the size of dv/dt (kinematics; NIST SP 811 factors)", async () => {
    const comma = load("marlin-kestrel-comma");
    const unitOf = async (map: ChannelMap) => (await checkChannelSigns(comma.head, map)).filter((c) => c.verdict === "check_unit").map((c) => [c.channel, c.detail]);
    const withUnit = (channel: "speed" | "long_accel", unit: string) => ({ ...comma.map, [channel]: { ...comma.map[channel], unit } }) as ChannelMap;
    expect(await unitOf(comma.map)).toEqual([]);
    expect(await unitOf(withUnit("speed", "m/s"))).toEqual([["speed", expect.stringMatching(/logged in km\/h but mapped as m\/s/)]]);
    expect(await unitOf(withUnit("long_accel", "m/s2"))).toEqual([["long_accel", expect.stringMatching(/logged in g but mapped as m\/s²/)]]);
  });

  it("does not guess which of two disagreeing channels is wrong", async () => {
    // Without yaw rate, steering against lateral acceleration cannot tell which one is flipped.
    const comma = load("marlin-kestrel-comma");
    const checks = await checkChannelSigns(comma.head, flip(comma.map, "steer"));
    const lateral = checks.filter((c) => c.channel === "steer" || c.channel === "lat_accel");
    expect(lateral.map((c) => c.verdict)).toEqual(["unclear", "unclear"]);
    expect(lateral[0].detail).toMatch(/opposite signs.*cannot tell which/);
  });

  it("says unclear, not a verdict, when the start of the log holds too little running", async () => {
    const { head, map } = load("marlin-kestrel-comma");
    const checks = await checkChannelSigns(head.subarray(0, 20_000), map);
    expect(checks.every((c) => c.verdict === "unclear")).toBe(true);
    expect(checks.find((c) => c.channel === "long_accel")!.detail).toMatch(/too little braking/);
  });
});
