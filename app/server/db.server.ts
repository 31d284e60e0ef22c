import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import * as schema from "../db/schema/index";
import { env } from "./env.server";

function createDb() {
  const pool = mysql.createPool({ uri: env.DATABASE_URL, connectionLimit: 10, timezone: "Z" });
  // On SIGTERM/SIGINT an open pool must not keep the process alive for ever, but the requests in flight
  // still need it: our HTTP server (scripts/lib/http-server.mjs) finishes them for up to 10 s and then
  // exits by itself. Ending the pool at once answered them 500/503 (tests/e2e/fault-app-restart.test.ts);
  // it is ended after that drain instead, if the process is still there.
  for (const signal of ["SIGTERM", "SIGINT"] as const) {
    process.once(signal, () => {
      setTimeout(() => pool.end().catch(() => undefined), 12_000).unref();
    });
  }
  return { pool, db: drizzle(pool, { schema, mode: "default" }) };
}

// One pool per process, also across dev-server module reloads.
const globalForDb = globalThis as unknown as { __rakelineDb?: ReturnType<typeof createDb> };
const instance = (globalForDb.__rakelineDb ??= createDb());

export const pool = instance.pool;
export const db = instance.db;
export type Db = typeof db;
export { schema };
