import { Outlet } from "react-router";
import { AppShell } from "~/components/ui/shell";
import { ErrorView } from "~/components/ui/error-view";
import { listTeamsOf, requireMember } from "~/server/permissions.server";
import { teamPath } from "~/lib/team-schemas";
import { can } from "~/lib/access";
import type { Route } from "./+types/layout";

// The frame of every /t/:teamSlug page. Child loaders run in parallel with this one, so each of
// them calls requireMember itself; this loader only feeds the header.
export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug);
  const teams = await listTeamsOf(ctx.user.id, request);
  return {
    user: { name: ctx.user.name, email: ctx.user.email },
    team: { ...ctx.team, role: ctx.role },
    teams: teams.map((t) => ({ name: t.name, slug: t.slug, role: t.role })),
  };
}

export default function TeamLayout({ loaderData }: Route.ComponentProps) {
  const base = teamPath(loaderData.team.slug);
  return (
    <AppShell
      user={loaderData.user}
      teams={loaderData.teams}
      current={loaderData.team}
      nav={[
        { to: base, label: "Dashboard", end: true },
        ...(can(loaderData.team.role, { session: ["read"] })
          ? [{ to: `${base}/sessions`, label: "Sessions" }, { to: `${base}/compare`, label: "Compare" }]
          : []),
        { to: `${base}/garage`, label: "Garage" },
        { to: `${base}/settings`, label: "Team" },
      ]}
    >
      <Outlet />
    </AppShell>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}
