import { Link } from "react-router";
import { Caution, EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { can, ROLE_LABELS } from "~/lib/access";
import { requireMember } from "~/server/permissions.server";
import { listMembers } from "~/server/teams.server";
import type { Route } from "./+types/dashboard";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug);
  const members = await listMembers(ctx.team.id);
  return { team: ctx.team, role: ctx.role, memberCount: members.length };
}

export default function Dashboard({ loaderData }: Route.ComponentProps) {
  const { team, role, memberCount } = loaderData;
  const base = `/t/${team.slug}`;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="text-2xl font-semibold">{team.name}</h1>
        <p className="text-sm text-ink-soft">
          You are <strong className="text-ink">{ROLE_LABELS[role]}</strong> ·{" "}
          <Link className="underline" to={`${base}/settings`}>
            <span className="num">{memberCount}</span> {memberCount === 1 ? "member" : "members"}
          </Link>
        </p>
      </div>
      <div className="grid gap-4 md:grid-cols-2">
        <Panel title="Garage">
          <EmptyState
            title="Add your first car"
            action={can(role, { car: ["create"] }) ? { to: `${base}/garage`, label: "Open the Garage" } : undefined}
          >
            The Garage keeps each car's dimensions, weights and setup sheets. Every Balance report starts from a car, so add one
            first{can(role, { car: ["create"] }) ? "." : " — ask an engineer or the owner of the team to add it."}
          </EmptyState>
        </Panel>
        <Panel title="Sessions">
          <EmptyState title="Drop a log">
            Uploading logger exports is coming in the next release. Once it is here, you drop the export after each stint and its
            Balance report appears in this list.
          </EmptyState>
        </Panel>
      </div>
      {role === "driver" && (
        <p className="text-sm text-ink-soft">As a driver you see the team's cars and the Driver briefs your engineers share with you.</p>
      )}
      <Caution compact />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.team.name ?? "Team"} · Rakeline` }];
