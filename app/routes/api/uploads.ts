// POST /api/t/:teamSlug/uploads — the Drop a log page's upload (Uppy xhr-upload, multipart part "file").
// Streams the file to storage with its SHA-256; 201 {"upload": {id, fileName, bytes, sha256}, "duplicate":
// null | {id, url}}; 413 (too large, refused from Content-Length before reading), 415 (not a text export),
// 400 (malformed or interrupted; nothing kept), 503 (database down; nothing kept).
import { requireMember } from "~/server/permissions.server";
import { databaseDownResponse, isDatabaseDown } from "~/server/ingest/db-errors.server";
import { registerUpload } from "~/server/ingest/raw-uploads.server";
import { receiveUpload, refuseDeclaredOversize, UploadRefusal } from "~/server/ingest/upload.server";
import type { Route } from "./+types/uploads";

export function loader() {
  return Response.json({ error: "POST a log file (multipart/form-data, part \"file\") to upload it." }, { status: 405, headers: { Allow: "POST" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return loader();
  try {
    // The declared size is refused before anything else, the body unread.
    refuseDeclaredOversize(request);
    const ctx = await requireMember(request, params.teamSlug, { session: ["upload"] });
    const { file } = await receiveUpload(request, `teams/${ctx.team.id}`);
    const answer = await registerUpload(ctx.team, ctx.user.id, file);
    return Response.json(answer, { status: 201 });
  } catch (error) {
    if (error instanceof UploadRefusal) return Response.json({ error: error.message }, { status: error.status });
    if (isDatabaseDown(error)) return databaseDownResponse();
    throw error;
  }
}
