// Every test file starts from an empty test database (the migrations stay applied): files run one at a
// time (vitest.config.ts) but share one database, so rows another file left behind (a demo session, a
// raw file's hash, a rate-limit bucket) must not change what this file sees. Files that need no database
// (the engine's) skip it: nothing is done when DATABASE_URL is unset, and an unreachable database is left
// for the file's own tests to report.
import { beforeAll } from "vitest";

beforeAll(async () => {
  const url = process.env.DATABASE_URL;
  if (!url) return;
  const mysql = await import("mysql2/promise");
  let conn: import("mysql2/promise").Connection;
  try {
    conn = await mysql.createConnection({ uri: url, connectTimeout: 5_000 });
  } catch {
    return;
  }
  try {
    const [rows] = await conn.query<import("mysql2/promise").RowDataPacket[]>(
      "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' AND table_name <> '__drizzle_migrations'",
    );
    await conn.query("SET FOREIGN_KEY_CHECKS = 0");
    for (const { t } of rows) await conn.query(`DELETE FROM \`${String(t).replace(/`/g, "``")}\``);
    await conn.query("SET FOREIGN_KEY_CHECKS = 1");
  } finally {
    await conn.end();
  }
}, 60_000);
