// A large log read in parts over two engine workers (as the Drop a log page does on a machine with
// two cores) gives the CLI's summary on two threads: the same plan (app/engine/split.ts) for the same
// part count. The export is written by scripts/bench-browser.mjs (a demo log cut into a seamless loop).
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it, vi } from "vitest";
import { expose, proxy, transfer, wrap } from "comlink";
import { engineApi, type EngineApi, type ReadProgress } from "../../workers/engine-api";
// @ts-expect-error a plain-JS script without type declarations
import { largeExport } from "../../scripts/bench-browser.mjs";

vi.setConfig({ testTimeout: 300_000 });
const ROOT = join(__dirname, "..", "..");

function connect() {
  const { port1, port2 } = new MessageChannel();
  expose(engineApi, port1 as unknown as Parameters<typeof expose>[1]);
  return { api: wrap<EngineApi>(port2 as unknown as Parameters<typeof wrap>[0]), close: () => { port1.close(); port2.close(); } };
}

describe("engine workers reading one log in parts", () => {
  it("give the CLI's summary on as many threads, with progress to the last byte", async () => {
    // 40 MB: above the split's 16 MB minimum part, so two parts.
    const { file, car: carPath, map: mapPath } = (await largeExport(40)) as { file: string; car: string; map: string };
    const r = spawnSync(process.execPath, [join(ROOT, "scripts/analyse.mjs"), file, "--car", carPath, "--map", mapPath, "--threads", "2"], { cwd: ROOT, encoding: "utf8", maxBuffer: 64 << 20 });
    expect(r.stderr).toBe("");
    const expected = JSON.parse(r.stdout) as Record<string, unknown>;
    const main = connect(), helper = connect();
    try {
      // The page links its workers with a port each: the helper serves the engine on it (`connect`), the first uses it.
      const { port1, port2 } = new MessageChannel();
      await helper.api.connect(transfer(port1, [port1]) as unknown as MessagePort);
      // And a helper that counts the parts it is given, to see the log was read in parts.
      const counted = new MessageChannel();
      let helped = 0;
      expose({ ...engineApi, analysePart: (...a: Parameters<EngineApi["analysePart"]>) => { helped++; return engineApi.analysePart(...a); } }, counted.port1 as unknown as Parameters<typeof expose>[1]);
      const seen: ReadProgress[] = [];
      const blob = new Blob([readFileSync(file)]);
      const res = await main.api.analyseInParts(blob, JSON.parse(readFileSync(carPath, "utf8")), JSON.parse(readFileSync(mapPath, "utf8")), {}, 2,
        transfer([port2], [port2]) as unknown as MessagePort[], proxy((p: ReadProgress) => { seen.push(p); }));
      if (!res.ok) throw new Error(res.message);
      const again = await main.api.analyseInParts(blob, JSON.parse(readFileSync(carPath, "utf8")), JSON.parse(readFileSync(mapPath, "utf8")), {}, 2,
        transfer([counted.port2], [counted.port2]) as unknown as MessagePort[]);
      expect(helped).toBe(1);
      expect(again).toEqual(res);
      const got = JSON.parse(JSON.stringify(res.value)) as Record<string, unknown>;
      for (const key of Object.keys(expected)) expect({ key, value: got[key] }).toEqual({ key, value: expected[key] });
      expect(seen.at(-1)).toMatchObject({ bytes: blob.size, rows: (expected.log as { rows: number }).rows });
      // The whole-file run in one worker agrees within the last digits (summation order), as the CLI's README says.
      const whole = await main.api.analyse(blob, JSON.parse(readFileSync(carPath, "utf8")), JSON.parse(readFileSync(mapPath, "utf8")));
      if (!whole.ok) throw new Error(whole.message);
      expect(whole.value.aero.cla_total_m2!).toBeCloseTo(res.value.aero.cla_total_m2!, 4);
    } finally {
      main.close();
      helper.close();
    }
  });
});
