import { data } from "react-router";
import { openBrief } from "~/server/brief.server";
import { briefPayload } from "~/server/brief-view.server";
import { BriefView } from "~/components/brief/brief-view";
import { ComparisonBriefView } from "~/components/report/brief-comparison";
import { AuthCard } from "~/components/ui/panels";
import type { Route } from "./+types/brief";

// The link's token is in the URL: it must not leak through the Referer header, and no search engine may keep it.
const PRIVATE = { "X-Robots-Tag": "noindex, nofollow", "Referrer-Policy": "no-referrer", "Cache-Control": "no-store" };

export async function loader({ params }: Route.LoaderArgs) {
  const brief = briefPayload(await openBrief(params.token));
  if (!brief) return data({ brief: null }, { status: 404, headers: PRIVATE });
  return data({ brief }, { headers: PRIVATE });
}

export function headers({ loaderHeaders }: Route.HeadersArgs) {
  return loaderHeaders;
}

export default function Brief({ loaderData }: Route.ComponentProps) {
  const brief = loaderData.brief;
  if (!brief) {
    return (
      <AuthCard title="This brief is not available">
        <p className="text-ink-soft">The link has expired, was withdrawn by the team, or is not complete. Ask your engineer for a new one.</p>
      </AuthCard>
    );
  }
  return brief.kind === "comparison" ? <ComparisonBriefView brief={brief} /> : <BriefView brief={brief} />;
}

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data?.brief ? `Driver brief · ${data.brief.kind === "comparison" ? data.brief.comparisonName : data.brief.sessionName} · Rakeline` : "Driver brief · Rakeline" },
  { name: "robots", content: "noindex, nofollow" },
];
