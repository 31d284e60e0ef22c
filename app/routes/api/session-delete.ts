// POST /api/t/:teamSlug/sessions/:sessionId/delete — deletes a session (owner: session delete) after a
// confirmation: a form post with confirm=yes (the report page's delete form) is answered with a redirect to
// the Sessions list; a request that asks for JSON (Accept: application/json) gets 200 { deleted, fileRemoved }.
// Without confirm=yes: 400 and nothing is deleted.
import { data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import { deleteSession } from "~/server/sessions-delete.server";
import type { Route } from "./+types/session-delete";

const ID = /^[A-Za-z0-9-]{1,36}$/;

export async function loader() {
  return Response.json({ error: "POST confirm=yes to delete the session." }, { status: 405, headers: { Allow: "POST" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["delete"] });
  const wantsJson = (request.headers.get("accept") ?? "").includes("application/json");
  if (!ID.test(params.sessionId)) return Response.json({ error: "No such session in this team." }, { status: 404 });
  const fields = await readFormFields(request);
  if (fields.confirm !== "yes") {
    const message = "Tick the box to confirm: a deleted session and its raw file cannot be brought back.";
    return wantsJson ? Response.json({ error: message }, { status: 400 }) : data({ error: message }, { status: 400 });
  }
  try {
    const done = await deleteSession(ctx.team.id, ctx.user.id, params.sessionId);
    if (wantsJson) return Response.json({ deleted: done.sessionId, fileRemoved: done.fileRemoved });
    return redirect(`/t/${ctx.team.slug}/sessions?deleted=${encodeURIComponent(done.sessionId)}`);
  } catch (error) {
    if ((error as { init?: { status?: number } })?.init?.status === 404) return Response.json({ error: "No such session in this team." }, { status: 404 });
    throw error;
  }
}
