// Fault tests: a private MariaDB of their own (own datadir and port), so stopping it in the middle of a
// request never touches the test database the other files share. The app's modules are imported only
// after DATABASE_URL points at it (db.server.ts makes its pool from the environment on first import).
import path from "node:path";
import mysql from "mysql2/promise";
import { startMariaDB, type MariaDBInstance } from "../../scripts/lib/mariadb.mjs";
import { applyMigrations } from "../../scripts/lib/migrate.mjs";

const offset = Number(process.env.RAKELINE_TEST_PORT_OFFSET || 0);
const dataDir = path.resolve(".data");

export const faultInstance: MariaDBInstance = {
  name: "test-fault",
  datadir: path.join(dataDir, "test-fault-db"),
  // 3900 + the worktree's offset: clear of the test instance (3308+), S3 fake (3600+), worker health (3700+).
  dbPort: 3900 + offset,
  database: "rakeline_fault",
  passwordFile: path.join(dataDir, "test-fault-db-password"),
};

import { until } from "./helpers/wait";

export { sleep, until } from "./helpers/wait";

export type PrivateDb = {
  url: string;
  pid: () => number;
  /** SIGKILL the server (a crash: InnoDB rolls back what was not committed when it starts again). */
  kill(): Promise<void>;
  /** Start it again on the same datadir (keeps every committed row). */
  restart(): Promise<void>;
  stop(): Promise<void>;
  connect(): Promise<mysql.Connection>;
};

/** Starts a fresh private database with the migrations applied, and points DATABASE_URL at it. */
export async function startPrivateDatabase(): Promise<PrivateDb> {
  let server = await startMariaDB(faultInstance, { fresh: true });
  await applyMigrations(server.url, path.resolve("drizzle"));
  const sharedUrl = process.env.DATABASE_URL;
  process.env.DATABASE_URL = server.url;
  let down = false;
  return {
    url: server.url,
    pid: () => server.pid,
    async kill() {
      const pid = server.pid;
      process.kill(pid, "SIGKILL");
      await until("mariadbd to exit", () => {
        try {
          process.kill(pid, 0);
          return false;
        } catch {
          return true;
        }
      }, 20_000);
      down = true;
    },
    async restart() {
      server = await startMariaDB(faultInstance);
      down = false;
    },
    async stop() {
      if (!down) await server.stop();
      // Whatever runs after this file in the same process talks to the shared test database again.
      // (db.server.ts keeps its pool on globalThis: the caller ends it; it is not kept for anything after.)
      delete (globalThis as { __rakelineDb?: unknown }).__rakelineDb;
      if (sharedUrl === undefined) delete process.env.DATABASE_URL;
      else process.env.DATABASE_URL = sharedUrl;
    },
    connect: () => mysql.createConnection({ uri: server.url, timezone: "Z" }),
  };
}

/** Waits until a statement of another connection waits for a lock (its text matching `query`); returns its state. */
export async function waitForBlockedQuery(conn: mysql.Connection, query: RegExp, timeoutMs = 30_000): Promise<string> {
  return until(`a statement matching ${query} to wait for a lock`, async () => {
    const [rows] = await conn.query<mysql.RowDataPacket[]>("SELECT state, info FROM information_schema.processlist WHERE info IS NOT NULL AND id <> CONNECTION_ID()");
    const hit = rows.find((r) => query.test(String(r.info)) && /lock/i.test(String(r.state)));
    return hit ? `${hit.state}: ${String(hit.info).slice(0, 60)}` : null;
  }, timeoutMs, 25);
}
