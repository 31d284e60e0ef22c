// GET /api/openapi.json — the data API described in OpenAPI 3.1 (public: it holds no team data).
import { openApiDocument } from "~/server/report/openapi.server";

export function loader() {
  return Response.json(openApiDocument(), { headers: { "Cache-Control": "public, max-age=300" } });
}
