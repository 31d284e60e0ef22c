import { Link } from "react-router";
import { EmptyState } from "~/components/ui/panels";
import { Wordmark } from "~/components/ui/wordmark";
import { listMessages, requireDevMailbox } from "~/server/mailbox.server";
import type { Route } from "./+types/mailbox";

export async function loader() {
  requireDevMailbox();
  const messages = await listMessages();
  return { messages: messages.map(({ id, receivedAt, to, subject, from }) => ({ id, receivedAt, to, subject, from })) };
}

export default function Mailbox({ loaderData }: Route.ComponentProps) {
  return (
    <main className="mx-auto max-w-5xl px-4 py-6">
      <div className="mb-4 flex items-center gap-4">
        <Wordmark />
        <h1 className="text-xl font-semibold">Development mailbox</h1>
      </div>
      <p className="mb-4 text-sm text-ink-soft">Every message the app sent to the local catcher. This page does not exist in production.</p>
      {loaderData.messages.length === 0 ? (
        <EmptyState title="No mail yet">Sign up or invite someone: the messages appear here.</EmptyState>
      ) : (
        <table className="w-full text-sm">
          <thead className="text-left text-ink-faint">
            <tr className="border-b border-rule"><th className="py-1.5 pr-3 font-medium">Received (UTC)</th><th className="py-1.5 pr-3 font-medium">To</th><th className="py-1.5 font-medium">Subject</th></tr>
          </thead>
          <tbody>
            {loaderData.messages.map((m) => (
              <tr key={m.id} className="border-b border-rule-soft">
                <td className="num py-1.5 pr-3 whitespace-nowrap">{m.receivedAt.replace("T", " ").slice(0, 19)}</td>
                <td className="py-1.5 pr-3">{m.to.join(", ")}</td>
                <td className="py-1.5"><Link className="text-accent underline" to={`/dev/mailbox/${m.id}`}>{m.subject || "(no subject)"}</Link></td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </main>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Mailbox · Rakeline (development)" }];
