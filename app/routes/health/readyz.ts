// Readiness: this app process can serve requests now (the database answers through its pool).
import { pool } from "~/server/db.server";
import { databaseCheck, readinessResponse } from "~/server/health.server";

export function loader() {
  return readinessResponse("app", { database: databaseCheck(pool) });
}
