// Liveness: the process runs and answers. Touches nothing shared (see app/server/health.server.ts).
import { livenessResponse } from "~/server/health.server";

export function loader() {
  return livenessResponse("app");
}
