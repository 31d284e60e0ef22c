import { data } from "react-router";
import { requireUser } from "~/server/permissions.server";
import { openBriefFor } from "~/server/brief.server";
import { summaryOf } from "~/server/report/session.server";
import { BriefView } from "~/components/brief/brief-view";
import { AuthCard } from "~/components/ui/panels";
import type { Route } from "./+types/shared";

// A brief shared with the signed-in user (listed on their dashboard): the same read-only view as the link.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const brief = await openBriefFor({ id: user.id, email: user.email }, params.briefId);
  const summary = brief ? summaryOf(brief.summary) : null;
  const headers = { "X-Robots-Tag": "noindex, nofollow", "Cache-Control": "no-store" };
  if (!brief || !summary) return data({ brief: null }, { status: 404, headers });
  return data({ brief: { sessionName: brief.sessionName, sessionDate: brief.sessionDate, teamName: brief.teamName, note: brief.note, expiresAt: brief.expiresAt.toISOString(), summary } }, { headers });
}

export default function SharedBrief({ loaderData }: Route.ComponentProps) {
  if (!loaderData.brief)
    return (
      <AuthCard title="This brief is not available">
        <p className="text-ink-soft">It has expired, was withdrawn by the team, or was not shared with you.</p>
      </AuthCard>
    );
  return <BriefView brief={loaderData.brief} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Driver brief · Rakeline" }, { name: "robots", content: "noindex, nofollow" }];
