import { data, Link } from "react-router";
import { getMessage, requireDevMailbox } from "~/server/mailbox.server";
import type { Route } from "./+types/message";

export async function loader({ params }: Route.LoaderArgs) {
  requireDevMailbox();
  const message = await getMessage(params.id);
  if (!message) throw data("No such message in the development mailbox.", { status: 404 });
  return { message };
}

export default function Message({ loaderData }: Route.ComponentProps) {
  const m = loaderData.message;
  const links = Array.from(new Set((m.text ?? "").match(/https?:\/\/[^\s<>"]+/g) ?? []));
  return (
    <main className="mx-auto max-w-4xl px-4 py-6">
      <Link to="/dev/mailbox" className="text-sm text-accent underline">← Mailbox</Link>
      <h1 className="mt-2 text-xl font-semibold">{m.subject || "(no subject)"}</h1>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 text-sm">
        <dt className="text-ink-faint">From</dt><dd>{m.from}</dd>
        <dt className="text-ink-faint">To</dt><dd>{m.to.join(", ")}</dd>
        <dt className="text-ink-faint">Received</dt><dd className="num">{m.receivedAt}</dd>
      </dl>
      {links.length > 0 && (
        <section className="mt-4">
          <h2 className="text-sm font-semibold text-ink-soft">Links in this message</h2>
          <ul className="mt-1 space-y-1 text-sm">
            {links.map((href) => <li key={href}><a className="num break-all text-accent underline" href={href}>{href}</a></li>)}
          </ul>
        </section>
      )}
      {m.html && (
        <section className="mt-4">
          <h2 className="text-sm font-semibold text-ink-soft">HTML part</h2>
          {/* Rendered in a sandbox without scripts: the message cannot act on this page. */}
          <iframe title="HTML part" sandbox="" srcDoc={m.html} className="mt-1 h-96 w-full rounded border border-rule bg-white" />
        </section>
      )}
      <section className="mt-4">
        <h2 className="text-sm font-semibold text-ink-soft">Text part</h2>
        <pre className="num mt-1 whitespace-pre-wrap rounded border border-rule bg-panel p-3 text-sm">{m.text}</pre>
      </section>
    </main>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Message · Rakeline (development)" }];
