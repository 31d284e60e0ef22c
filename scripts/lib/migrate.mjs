// Apply the committed Drizzle migrations in drizzle/ with Drizzle's own migrator (never `push`).
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { info, UserFacingError } from "./proc.mjs";

export async function applyMigrations(databaseUrl, migrationsFolder) {
  const journal = path.join(migrationsFolder, "meta", "_journal.json");
  if (!existsSync(journal)) {
    info(`no migrations yet (${path.basename(migrationsFolder)}/meta/_journal.json is missing); skipping`);
    return 0;
  }
  const count = JSON.parse(readFileSync(journal, "utf8")).entries?.length ?? 0;
  // Imported here, not at the top: this module loads before `npm ci` has run on a fresh clone.
  const mysql = (await import("mysql2/promise")).default;
  const { drizzle } = await import("drizzle-orm/mysql2");
  const { migrate } = await import("drizzle-orm/mysql2/migrator");
  const connection = await mysql.createConnection(databaseUrl);
  try {
    await migrate(drizzle(connection), { migrationsFolder });
  } catch (error) {
    const cause = error.cause?.message ?? error.sqlMessage ?? "";
    throw new UserFacingError(`a migration in ${migrationsFolder} failed: ${error.message}${cause ? `\n${cause}` : ""}`);
  } finally {
    await connection.end();
  }
  info(`migrations applied (${count} in the journal)`);
  return count;
}
