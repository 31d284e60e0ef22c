/**
 * The OpenAPI 3.1 document of the data API (served at /api/openapi.json). Response schemas come from
 * app/lib/report/api-schemas.ts, which the contract tests also parse real answers with.
 */
import { z } from "zod";
import { env } from "~/server/env.server";
import {
  carsResponseSchema,
  compareResponseSchema,
  errorSchema,
  sessionListSchema,
  sessionResponseSchema,
  setupsResponseSchema,
  tracesSchema,
} from "~/lib/report/api-schemas";

// Importing the schemas registers them (by their meta id) in zod's global registry.
void [errorSchema, sessionResponseSchema, tracesSchema, compareResponseSchema, carsResponseSchema, setupsResponseSchema, sessionListSchema];

function components(): Record<string, unknown> {
  const out = z.toJSONSchema(z.globalRegistry, { target: "draft-2020-12", uri: (id: string) => `#/components/schemas/${id}`, unrepresentable: "any" });
  const schemas: Record<string, unknown> = {};
  for (const [id, schema] of Object.entries(out.schemas)) {
    const { $schema: _drop, $id: _id, ...rest } = schema as Record<string, unknown>;
    schemas[id] = rest;
  }
  return schemas;
}

const ref = (id: string) => ({ $ref: `#/components/schemas/${id}` });
const json = (id: string, description: string) => ({ description, content: { "application/json": { schema: ref(id) } } });
const errors = (...codes: number[]) =>
  Object.fromEntries(
    codes.map((c) => [
      String(c),
      json("Error", { 400: "Bad query", 401: "No valid API token or signed-in session", 403: "Your role does not allow this", 404: "Not found in your team", 409: "Not read yet", 413: "Too large", 415: "Not a log file", 422: "The engine refused the file", 503: "Database or file store unavailable; send the same request again", 507: "The file store is full; nothing was kept" }[c] ?? "Error"),
    ]),
  );
const sessionId = { name: "sessionId", in: "path", required: true, schema: { type: "string" } };
const etag = { ETag: { description: "Weak validator of the session's version; send it back as If-None-Match.", schema: { type: "string" } }, "Cache-Control": { schema: { type: "string", const: "private, no-cache" } } };
const ifNoneMatch = { name: "If-None-Match", in: "header", required: false, schema: { type: "string" }, description: "An ETag from an earlier answer: 304 without a body when unchanged." };
const team = { name: "team", in: "query", required: false, schema: { type: "string" }, description: "Team slug (cookie sessions of users in several teams; a token always works in its own team)." };

export function openApiDocument() {
  return {
    openapi: "3.1.0",
    info: {
      title: "Rakeline data API",
      version: "1",
      description:
        "Sessions, their summaries, speed bands, traces and comparisons of one team. Authenticate with `Authorization: Bearer <token>` (make a token on your account page) or a signed-in browser session. Another team's ids answer 404. Figures are estimates from logged data, not safety margins.",
    },
    servers: [{ url: env.APP_URL }],
    security: [{ bearer: [] }, { cookie: [] }],
    components: {
      securitySchemes: {
        bearer: { type: "http", scheme: "bearer", description: "A Rakeline API token (rkl_…), scoped to one team." },
        cookie: { type: "apiKey", in: "cookie", name: "better-auth.session_token", description: "The browser's signed-in session." },
      },
      schemas: components(),
    },
    paths: {
      "/api/sessions": {
        get: {
          summary: "List the team's sessions, newest first",
          parameters: [
            ...["car", "setup", "venue", "driver"].map((name) => ({ name, in: "query", required: false, schema: { type: "string" }, description: `Filter by ${name} (id or name).` })),
            { name: "from", in: "query", required: false, schema: { type: "string", format: "date" } },
            { name: "to", in: "query", required: false, schema: { type: "string", format: "date" } },
            { name: "state", in: "query", required: false, schema: { type: "string", enum: ["received", "read", "checked", "flagged"] } },
            { name: "limit", in: "query", required: false, schema: { type: "integer", minimum: 1, maximum: 200, default: 50 } },
            { name: "cursor", in: "query", required: false, schema: { type: "string" }, description: "`next` of the previous page." },
            team,
          ],
          responses: { "200": json("SessionList", "One page of sessions; `next` is null on the last page"), ...errors(400, 401, 403, 503) },
        },
        post: {
          summary: "Upload a log with an API token (headless ingest)",
          security: [{ bearer: [] }],
          requestBody: {
            required: true,
            content: {
              "multipart/form-data": {
                schema: {
                  type: "object",
                  required: ["file", "meta"],
                  properties: {
                    file: { type: "string", format: "binary", description: "The logger export (.csv, .tsv, .txt)." },
                    meta: { type: "string", description: 'JSON: {"car", "setup"?, "map"? | "profile"?, "date"?, "venue"?, "run"?, "driver"?, "air"?: {"temp_c", "pressure_hpa", "humidity_pct"?}, "fuel_l"?: {"start", "end"}}' },
                  },
                },
              },
            },
          },
          responses: {
            "201": { description: "Stored and analysed", content: { "application/json": { schema: { type: "object", required: ["id", "url"], properties: { id: { type: "string" }, url: { type: "string" }, summary: { type: "object" } } } } } },
            "200": { description: "The same file was already stored in this team", content: { "application/json": { schema: { type: "object", properties: { id: { type: "string" }, url: { type: "string" }, duplicate: { type: "boolean" } } } } } },
            ...errors(400, 401, 404, 413, 415, 422, 503, 507),
          },
        },
      },
      "/api/sessions/{sessionId}": {
        get: {
          summary: "A session's details and its summary of record",
          parameters: [sessionId, ifNoneMatch, team],
          responses: { "200": { ...json("SessionResponse", "The session"), headers: etag }, "304": { description: "Unchanged since the ETag you sent" }, ...errors(401, 403, 404) },
        },
      },
      "/api/sessions/{sessionId}/bands.csv": {
        get: {
          summary: "The speed-band table as CSV (RFC 4180; text cells that a spreadsheet would run as a formula start with a quote mark)",
          parameters: [sessionId, ifNoneMatch, team],
          responses: { "200": { description: "CSV with a header row", headers: etag, content: { "text/csv": { schema: { type: "string" } } } }, "304": { description: "Unchanged" }, ...errors(401, 403, 404, 409) },
        },
      },
      "/api/sessions/{sessionId}/traces": {
        get: {
          summary: "The stint's decimated traces, columnar",
          parameters: [sessionId, ifNoneMatch, team],
          responses: { "200": { ...json("Traces", "Traces"), headers: etag }, "304": { description: "Unchanged" }, ...errors(401, 403, 404, 409) },
        },
      },
      "/api/compare": {
        get: {
          summary: "Sessions side by side, each against the first, with 95 % intervals flagged clear or not",
          parameters: [{ name: "ids", in: "query", required: true, schema: { type: "string" }, description: "2 to 8 session ids, comma-separated; the first is the baseline." }, team],
          responses: { "200": json("Comparison", "The comparison"), ...errors(400, 401, 403, 404) },
        },
      },
      "/api/cars": { get: { summary: "The team's cars", parameters: [team], responses: { "200": json("Cars", "Cars"), ...errors(401, 403) } } },
      "/api/cars/{carId}/setups": {
        get: {
          summary: "Every setup version of one car",
          parameters: [{ name: "carId", in: "path", required: true, schema: { type: "string" } }, team],
          responses: { "200": json("Setups", "Setup versions, by sheet and version"), ...errors(401, 403, 404) },
        },
      },
    },
  };
}
