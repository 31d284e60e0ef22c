import { Form, Link } from "react-router";
import { z } from "zod";
import { requireMember } from "~/server/permissions.server";
import { AUDIT_ACTIONS, listAudit } from "~/server/audit.server";
import { Panel, EmptyState } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/audit";

const PAGE = 50;
const searchSchema = z.object({
  action: z.string().regex(/^[a-z][a-z0-9_]{1,63}$/).optional().catch(undefined),
  // "<ISO time>_<id>" of the last entry of the page before.
  before: z
    .string()
    .regex(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(\.\d+)?Z_[A-Za-z0-9-]{1,36}$/)
    .optional()
    .catch(undefined),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  // The audit log is the owner's (team: update, as the team's settings).
  const ctx = await requireMember(request, params.teamSlug, { team: ["update"] });
  const query = searchSchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  const before = query.before ? { at: new Date(query.before.split("_")[0]), id: query.before.split("_")[1] } : undefined;
  const entries = await listAudit(ctx.team.id, { limit: PAGE + 1, before, action: query.action });
  const page = entries.slice(0, PAGE);
  const last = page.at(-1);
  return {
    team: ctx.team,
    action: query.action ?? "",
    entries: page.map((e) => ({ ...e, at: e.at.toISOString(), words: AUDIT_ACTIONS[e.action] ?? e.action })),
    older: entries.length > PAGE && last ? `${last.at.toISOString()}_${last.id}` : null,
    actions: Object.entries(AUDIT_ACTIONS).map(([value, label]) => ({ value, label })),
  };
}

function detailText(detail: Record<string, string | number | boolean | null> | null): string {
  if (!detail) return "";
  return Object.entries(detail)
    .filter(([, v]) => v !== null && v !== "")
    .map(([k, v]) => `${k}: ${String(v)}`)
    .join(" · ");
}

export default function AuditLog({ loaderData }: Route.ComponentProps) {
  const { team, entries, older, actions, action } = loaderData;
  return (
    <div className="space-y-4">
      <header>
        <h1 className="text-2xl font-semibold">Audit log · {team.name}</h1>
        <p className="text-sm text-ink-soft">
          Who did what to the team's data, and when (UTC), newest first: uploads, deletions, re-analyses, setup versions, members
          and roles, exports, Brief links. Only owners see it.
        </p>
      </header>
      <Form method="get" className="flex flex-wrap items-end gap-2 text-sm">
        <label htmlFor="f-action" className="flex flex-col">
          <span className="text-ink-soft">What</span>
          <select id="f-action" name="action" defaultValue={action} className="rounded border border-rule bg-panel px-2 py-1">
            <option value="">everything</option>
            {actions.map((a) => (
              <option key={a.value} value={a.value}>{a.label}</option>
            ))}
          </select>
        </label>
        <button className="rounded border border-rule bg-panel px-3 py-1 hover:bg-rule-soft">Show</button>
      </Form>
      <Panel>
        {entries.length === 0 ? (
          <EmptyState title="Nothing recorded yet">Changes to the team's data appear here as they happen.</EmptyState>
        ) : (
          <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Audit entries">
            <table className="w-full text-sm">
              <thead className="border-b border-rule text-left">
                <tr>
                  <th className="px-2 py-1.5 font-medium">When (UTC)</th>
                  <th className="px-2 py-1.5 font-medium">Who</th>
                  <th className="px-2 py-1.5 font-medium">What</th>
                  <th className="px-2 py-1.5 font-medium">Details</th>
                </tr>
              </thead>
              <tbody>
                {entries.map((e) => (
                  <tr key={e.id} className="border-b border-rule-soft align-top last:border-0">
                    <td className="num whitespace-nowrap px-2 py-1.5">{e.at.slice(0, 19).replace("T", " ")}</td>
                    <td className="px-2 py-1.5">{e.actor ? e.actor.name : e.action.startsWith("brief_") ? "a Brief link holder" : "a former member or the system"}</td>
                    <td className="px-2 py-1.5">{e.words}</td>
                    <td className="px-2 py-1.5 text-ink-soft">{detailText(e.detail)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Panel>
      {older && (
        <Link to={`?${new URLSearchParams({ ...(action ? { action } : {}), before: older })}`} className="text-sm text-accent underline">
          Older entries
        </Link>
      )}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Audit log · ${data?.team.name ?? "Team"} · Rakeline` }];
