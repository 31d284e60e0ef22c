// Readiness: this app process can serve requests now (the database answers through its pool, and the
// raw-file storage answers).
import { pool } from "~/server/db.server";
import { databaseCheck, readinessResponse, storageCheck } from "~/server/health.server";
import { storage } from "~/server/storage.server";

export function loader() {
  return readinessResponse("app", { database: databaseCheck(pool), storage: storageCheck(storage()) });
}
