// Fault: a process killed while a raw file streams into the store. The fs store writes under
// `.partial/<id>.part` and renames into place only when the file is complete, so a killed process never
// leaves a visible half-file, but it does leave the part file on disk. The job worker sweeps part files
// not written for a lease period (at start-up and with the stale-upload sweep); live uploads and stored
// objects are left alone.
import { spawn } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { PassThrough, Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import { startJobLoop } from "~/server/ingest/job-loop.server";
import { createStorage, storage } from "~/server/storage.server";
import { sleep, until } from "./helpers/wait";

const dirs: string[] = [];
afterAll(() => {
  for (const dir of dirs) rmSync(dir, { recursive: true, force: true });
});

const storageModule = path.resolve("app/server/storage.server.ts");

/** A child process streaming an endless file into the store at `dir`; resolves once bytes reach the part file. */
async function writerKilledMidStream(dir: string): Promise<string> {
  const script = `
    import { createStorage } from ${JSON.stringify(storageModule)};
    const store = createStorage({ kind: "fs", dir: ${JSON.stringify(dir)} });
    async function* endless() { for (;;) { yield Buffer.alloc(64 * 1024, 0x31); await new Promise((r) => setTimeout(r, 5)); } }
    await store.putStream(endless(), { keyPrefix: "teams/t1" });`;
  const child = spawn(process.execPath, ["--import", "tsx", "--input-type=module", "-e", script], { stdio: "ignore" });
  const parts = path.join(dir, ".partial");
  const name = await until("the child's part file", () => existsSync(parts) && readdirSync(parts)[0], 20_000);
  await sleep(300);
  child.kill("SIGKILL");
  await new Promise((r) => child.once("exit", r));
  return name;
}

describe("fault: a process killed while storing an upload", () => {
  it("leaves only a part file; the sweep removes it once stale, and keeps live uploads and stored objects", async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "rakeline-sweep-"));
    dirs.push(dir);
    const store = createStorage({ kind: "fs", dir });
    const kept = await store.putStream(Readable.from([Buffer.from("time,speed\n0,1\n")]), { keyPrefix: "teams/t1" });

    const orphan = await writerKilledMidStream(dir);
    // Nothing visible as an object: only the stored file is under teams/t1.
    expect(readdirSync(path.join(dir, "teams", "t1"))).toEqual([kept.key.split("/").pop()]);

    // A live upload in this process, still streaming while the sweep runs.
    const live = new PassThrough();
    const storing = store.putStream(live, { keyPrefix: "teams/t1" });
    live.write("time,speed\n");
    await until("the live part file", () => readdirSync(path.join(dir, ".partial")).length === 2, 20_000);

    const fresh = await store.sweepLeftovers({ partialOlderThanMs: 60_000, spoolOlderThanMs: 60_000 });
    expect(fresh.partial).toEqual([]);

    // The killed writer's part file was last written two minutes ago (more than the 60 s lease).
    const old = new Date(Date.now() - 120_000);
    utimesSync(path.join(dir, ".partial", orphan), old, old);
    mkdirSync(path.join(dir, ".spool"), { recursive: true });
    writeFileSync(path.join(dir, ".spool", "left.csv"), "time\n");
    utimesSync(path.join(dir, ".spool", "left.csv"), old, old);
    const swept = await store.sweepLeftovers({ partialOlderThanMs: 60_000, spoolOlderThanMs: 60_000 });
    expect(swept).toEqual({ partial: [orphan], spool: ["left.csv"] });

    live.end("0,1\n");
    const second = await storing;
    expect(readdirSync(path.join(dir, ".partial"))).toEqual([]);
    expect((await store.withLocalFile("fs", kept.key, async (p) => existsSync(p)))).toBe(true);
    expect((await store.withLocalFile("fs", second.key, async (p) => existsSync(p)))).toBe(true);
    console.log(`fault: process killed mid-upload → part file ${orphan} left, no object visible; swept once 2 min stale; live upload and stored files kept: held`);
  }, 60_000);

  it("the job worker's loop sweeps stale part files at start-up", async () => {
    const dir = storage().config.kind === "fs" ? (storage().config as { dir: string }).dir : (storage().config as { spoolDir: string }).spoolDir;
    const parts = path.join(dir, ".partial");
    mkdirSync(parts, { recursive: true });
    const orphan = path.join(parts, `sweep-test-${process.pid}.part`);
    writeFileSync(orphan, "time,speed\n0,");
    const old = new Date(Date.now() - 3600_000);
    utimesSync(orphan, old, old);
    const lines: string[] = [];
    const loop = startJobLoop({ label: "sweep-test", pollMs: 100, log: (l) => lines.push(l), analyseFile: async () => { throw new Error("no job expected"); } });
    try {
      await until("the part file swept", () => !existsSync(orphan), 20_000);
    } finally {
      await loop.stop(5_000);
    }
    expect(lines.some((l) => /removed [1-9][0-9]* half-written upload/.test(l))).toBe(true);
    console.log("fault: stale part file at job worker start-up → removed by the start-up sweep: held");
  }, 30_000);
});
