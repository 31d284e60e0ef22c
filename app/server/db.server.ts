import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import * as schema from "../db/schema/index";
import { env } from "./env.server";

function createDb() {
  const pool = mysql.createPool({ uri: env.DATABASE_URL, connectionLimit: 10, timezone: "Z" });
  // react-router-serve closes its HTTP server on SIGTERM/SIGINT; an open pool would keep the process alive.
  for (const signal of ["SIGTERM", "SIGINT"] as const) {
    process.once(signal, () => {
      pool.end().catch(() => undefined);
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
