import { data } from "react-router";
import { openBrief } from "~/server/brief.server";
import { summaryOf } from "~/server/report/session.server";
import { BriefView } from "~/components/brief/brief-view";
import { AuthCard } from "~/components/ui/panels";
import type { Route } from "./+types/brief";

// The link's token is in the URL: it must not leak through the Referer header, and no search engine may keep it.
const PRIVATE = { "X-Robots-Tag": "noindex, nofollow", "Referrer-Policy": "no-referrer", "Cache-Control": "no-store" };

export async function loader({ params }: Route.LoaderArgs) {
  const brief = await openBrief(params.token);
  const summary = brief ? summaryOf(brief.summary) : null;
  if (!brief || !summary) return data({ brief: null }, { status: 404, headers: PRIVATE });
  return data(
    { brief: { sessionName: brief.sessionName, sessionDate: brief.sessionDate, teamName: brief.teamName, note: brief.note, expiresAt: brief.expiresAt.toISOString(), summary } },
    { headers: PRIVATE },
  );
}

export function headers({ loaderHeaders }: Route.HeadersArgs) {
  return loaderHeaders;
}

export default function Brief({ loaderData }: Route.ComponentProps) {
  if (!loaderData.brief) {
    return (
      <AuthCard title="This brief is not available">
        <p className="text-ink-soft">The link has expired, was withdrawn by the team, or is not complete. Ask your engineer for a new one.</p>
      </AuthCard>
    );
  }
  return <BriefView brief={loaderData.brief} />;
}

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data?.brief ? `Driver brief · ${data.brief.sessionName} · Rakeline` : "Driver brief · Rakeline" },
  { name: "robots", content: "noindex, nofollow" },
];
