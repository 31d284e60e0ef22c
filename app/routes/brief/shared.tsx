import { data } from "react-router";
import { requireUser } from "~/server/permissions.server";
import { openBriefFor } from "~/server/brief.server";
import { briefPayload } from "~/server/brief-view.server";
import { BriefView } from "~/components/brief/brief-view";
import { ComparisonBriefView } from "~/components/report/brief-comparison";
import { AuthCard } from "~/components/ui/panels";
import type { Route } from "./+types/shared";

// A brief shared with the signed-in user (listed on their dashboard): the same read-only view as the link.
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const brief = briefPayload(await openBriefFor({ id: user.id, email: user.email }, params.briefId));
  const headers = { "X-Robots-Tag": "noindex, nofollow", "Cache-Control": "no-store" };
  if (!brief) return data({ brief: null }, { status: 404, headers });
  return data({ brief }, { headers });
}

export default function SharedBrief({ loaderData }: Route.ComponentProps) {
  const brief = loaderData.brief;
  if (!brief)
    return (
      <AuthCard title="This brief is not available">
        <p className="text-ink-soft">It has expired, was withdrawn by the team, or was not shared with you.</p>
      </AuthCard>
    );
  return brief.kind === "comparison" ? <ComparisonBriefView brief={brief} /> : <BriefView brief={brief} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Driver brief · Rakeline" }, { name: "robots", content: "noindex, nofollow" }];
