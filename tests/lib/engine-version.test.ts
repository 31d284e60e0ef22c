// One engine-version string for every path that stores a summary (the browser's first reading on Drop a log,
// the server's re-check, the API upload, the seed): the rule lives in app/lib/engine-version.ts and nowhere else.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { engineVersionOf } from "~/lib/engine-version";
import { SUMMARY_VERSION } from "~/engine/summary-types";
import { serverEngineVersion } from "~/server/ingest/recheck.server";

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return sources(path);
    return /\.(ts|tsx)$/.test(name) ? [path] : [];
  });
}

describe("engine version string", () => {
  it("names the summary's own version", () => {
    expect(engineVersionOf({ summary_version: SUMMARY_VERSION })).toBe(`summary-v${SUMMARY_VERSION}`);
    expect(engineVersionOf({ summary_version: 7 })).toBe("summary-v7");
  });

  it("the server's re-check uses the same function", () => {
    expect(serverEngineVersion).toBe(engineVersionOf);
  });

  it("no other module under app/ spells the string itself", () => {
    const spellers = sources("app").filter((f) => f !== join("app", "lib", "engine-version.ts") && readFileSync(f, "utf8").includes("summary-v${"));
    expect(spellers).toEqual([]);
  });
});
