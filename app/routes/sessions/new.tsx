import { Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { DropPage } from "~/components/drop/drop-page";
import { requireMember } from "~/server/permissions.server";
import { dropChoices } from "./drop-page.server";
import type { Route } from "./+types/new";

// Drop a log: the page only needs the team's choices for the form; the files go to the upload and
// sessions routes from the browser (app/components/drop/).
export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["upload"] });
  return { team: { slug: ctx.team.slug, name: ctx.team.name }, choices: await dropChoices(ctx.team.id) };
}

export default function NewSession({ loaderData }: Route.ComponentProps) {
  const { team, choices } = loaderData;
  return (
    <div className="space-y-6">
      <DropPage teamSlug={team.slug} choices={choices} />
      <Caution compact />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Drop a log · Rakeline" }];
