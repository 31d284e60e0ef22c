// Fault: the upload store is full. The fs store's writes into `.partial/` fail with ENOSPC after a set
// number of bytes, as a full disk makes write(2) fail (POSIX write(): [ENOSPC] "no free space remaining on
// the device"; Node reports it as error.code "ENOSPC"). What must hold (issue 12, item 8): a clear answer
// to the user (507 Insufficient Storage, RFC 4918 section 11.5, with a sentence saying the store is full),
// no part file or half-written object left, no upload or session row; once there is room again the same
// upload works.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { Writable } from "node:stream";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it, vi } from "vitest";

/** Bytes the disk still takes before it is full; null = room enough. */
const disk = vi.hoisted(() => ({ roomBytes: null as number | null, failures: 0 }));

vi.mock("node:fs", async (importOriginal) => {
  const real = await importOriginal<typeof import("node:fs")>();
  const full = (filePath: unknown, options: unknown) => {
    // The real part file is created and takes what fits; the write that does not fit fails.
    const file = real.createWriteStream(filePath as string, options as never);
    let written = 0;
    return new Writable({
      write(chunk: Buffer, _enc, done) {
        const room = (disk.roomBytes ?? Infinity) - written;
        if (chunk.length > room) {
          disk.failures++;
          const error = Object.assign(new Error(`ENOSPC: no space left on device, write`), { code: "ENOSPC", errno: -28, syscall: "write" });
          file.write(chunk.subarray(0, Math.max(0, room)), () => file.close(() => done(error)));
          return;
        }
        written += chunk.length;
        file.write(chunk, done);
      },
      final(done) {
        file.end(done);
      },
    });
  };
  const createWriteStream = ((filePath: unknown, options: unknown) =>
    disk.roomBytes !== null && String(filePath).includes(`${path.sep}.partial${path.sep}`) ? full(filePath, options) : real.createWriteStream(filePath as string, options as never)) as typeof real.createWriteStream;
  return { ...real, default: { ...real, createWriteStream }, createWriteStream };
});

const { db } = await import("~/server/db.server");
const { analysisSessions, rawUploads } = await import("~/db/schema/sessions");
const { storage } = await import("~/server/storage.server");
const { createApiToken } = await import("~/server/api-tokens.server");
const uploadsRoute = await import("~/routes/api/uploads");
const apiSessionsRoute = await import("~/routes/api/sessions");
const { appUrl, args, outcome } = await import("./auth-support");
const { ingestWorld, LOGS, mapOf, uploadRequest } = await import("./ingest-support");

let w: Awaited<ReturnType<typeof ingestWorld>>;
let token = "";
beforeAll(async () => {
  w = await ingestWorld("full");
  const made = await createApiToken(w.userId, w.slug, "Pit laptop");
  if (!made.ok) throw new Error("token");
  token = made.token;
});

const LOG = "marlin-kestrel-comma";
const bytes = readFileSync(`${LOGS}/${LOG}.csv`);
const storeDir = () => (storage().config as { dir: string }).dir;
const list = (dir: string) => (existsSync(dir) ? readdirSync(dir) : []);
const snapshot = async () => ({
  parts: list(path.join(storeDir(), ".partial")).length,
  files: list(path.join(storeDir(), "teams", w.teamId)).length,
  uploads: (await db.select().from(rawUploads).where(eq(rawUploads.teamId, w.teamId))).length,
  sessions: (await db.select().from(analysisSessions).where(eq(analysisSessions.teamId, w.teamId))).length,
});

function apiRequest(): Request {
  const form = new FormData();
  form.set("meta", JSON.stringify({ car: "Marlin SR2", map: mapOf(LOG), date: "2026-05-16" }));
  form.set("file", new File([new Uint8Array(bytes)], `${LOG}.csv`, { type: "text/csv" }));
  return new Request(`${appUrl}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${token}` }, body: form });
}

describe("fault: the upload store is full", () => {
  it("Drop a log's upload: 507 with a sentence saying the store is full; no part file, object or row left; works once there is room", async () => {
    const before = await snapshot();
    disk.roomBytes = 256 * 1024;
    disk.failures = 0;
    const res = await outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, w.jar, `${LOG}.csv`, bytes), { teamSlug: w.slug }) as never));
    expect(disk.failures).toBe(1);
    expect(res.status).toBe(507);
    expect((res.body as { error: string }).error).toMatch(/file store is full, so the file was not stored/);
    expect(await snapshot()).toEqual(before);

    disk.roomBytes = null;
    const again = await outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, w.jar, `${LOG}.csv`, bytes), { teamSlug: w.slug }) as never));
    expect(again.status).toBe(201);
    const after = await snapshot();
    expect([after.files, after.uploads, after.parts]).toEqual([before.files + 1, before.uploads + 1, before.parts]);
    console.log(`fault: store full after 256 KiB of a ${bytes.length}-byte upload (page) → 507 "${(res.body as { error: string }).error.slice(0, 60)}…", no part file, object or row; with room again → 201: held`);
  });

  it("headless POST /api/sessions: 507, no session, upload row or file; the engine never runs on a half file", async () => {
    // A fresh team file state: the page test's upload of the same bytes is waiting; remove it so the API stores its own.
    await db.delete(rawUploads).where(eq(rawUploads.teamId, w.teamId));
    const before = await snapshot();
    disk.roomBytes = 100_000;
    disk.failures = 0;
    const res = await outcome(() => apiSessionsRoute.action(args(apiRequest()) as never));
    disk.roomBytes = null;
    expect(disk.failures).toBe(1);
    expect(res.status).toBe(507);
    expect((res.body as { error: string }).error).toMatch(/file store is full/);
    expect(await snapshot()).toEqual(before);
    console.log("fault: store full mid-upload (API) → 507, 0 sessions, 0 upload rows, no part file or object: held");
  });

  it("a real write refused by the operating system (RLIMIT_FSIZE via ulimit -f: EFBIG) is the same StorageFullError, nothing left", () => {
    // POSIX setrlimit(): writing past RLIMIT_FSIZE fails with EFBIG once SIGXFSZ is ignored (Node ignores it).
    const dir = mkdtempSync(path.join(os.tmpdir(), "rakeline-full-"));
    try {
      const script = `
        import { readdirSync } from "node:fs";
        import { Readable } from "node:stream";
        import { createStorage } from ${JSON.stringify(path.resolve("app/server/storage.server.ts"))};
        const dir = ${JSON.stringify(dir)};
        const store = createStorage({ kind: "fs", dir });
        const list = (d) => { try { return readdirSync(d, { recursive: true }); } catch { return []; } };
        try {
          await store.putStream(Readable.from([Buffer.alloc(2 * 1024 * 1024, 0x31)]), { keyPrefix: "teams/t1" });
          console.log(JSON.stringify({ stored: true }));
        } catch (e) {
          console.log(JSON.stringify({ name: e.name, code: e.code, status: e.status, message: e.message, parts: list(dir + "/.partial"), objects: list(dir + "/teams") }));
        }`;
      // ulimit -f counts 512-byte blocks in bash: 256 blocks = 128 KiB.
      const child = spawnSync("bash", ["-c", `ulimit -f 256 && exec "${process.execPath}" --import tsx --input-type=module -e "$SCRIPT"`], {
        env: { ...process.env, SCRIPT: script },
        encoding: "utf8",
        timeout: 30_000,
      });
      const outcome = JSON.parse(child.stdout.trim().split("\n").pop() || "{}");
      expect(outcome, child.stderr).toMatchObject({ name: "StorageFullError", code: "EFBIG", status: 507, parts: [], objects: [] });
      expect(outcome.message).toMatch(/file store is full/);
      console.log(`fault: a 2 MiB upload into a store limited to 128 KiB per file by the OS (EFBIG) → StorageFullError 507, no part file, no object: held`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
