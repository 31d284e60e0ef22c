/**
 * The Balance report's write actions, shown only to roles that hold them (the server checks again):
 * re-analyse the stored file (engineer, owner), delete the session (owner), and the processing history.
 */
import { useEffect, useState } from "react";
import { Form, useFetcher, useRevalidator } from "react-router";
import type { OpenJob, ResultRow } from "~/server/report/history.server";

const when = (iso: string) => `${iso.slice(0, 16).replace("T", " ")} UTC`;

const REASON_WORDS: Record<string, string> = {
  upload: "first reading in the browser (Drop a log)",
  api: "first reading on upload (data API)",
  seed: "demo seed",
  recheck: "server re-check",
  reanalysis: "re-analysis",
};

/** While a job waits or runs, the page asks again every few seconds, so the result appears without a reload. */
function useRefreshWhile(active: boolean, everyMs = 4000) {
  const { revalidate, state } = useRevalidator();
  useEffect(() => {
    if (!active) return;
    const timer = window.setInterval(() => {
      if (state === "idle" && document.visibilityState === "visible") void revalidate();
    }, everyMs);
    return () => window.clearInterval(timer);
  }, [active, everyMs, revalidate, state]);
}

export function JobState({ job }: { job: OpenJob | null }) {
  useRefreshWhile(job !== null);
  if (!job) return null;
  const what = job.reason === "reanalysis" ? "Re-analysis" : "Server re-check";
  return (
    <p role="status" data-testid="job-state" data-job-status={job.status} className="mb-2 rounded border border-rule bg-rule-soft px-3 py-2 text-sm">
      {what} {job.status === "queued" ? "queued" : "running"} since {when(job.since)}
      {job.attempts > 1 ? ` (attempt ${job.attempts})` : ""}. The figures here change when it is done; this page updates by itself.
    </p>
  );
}

export function ReanalyseForm({ action, setups, currentSetupId, busy }: { action: string; setups: { id: string; sheetName: string; version: number }[]; currentSetupId: string; busy: boolean }) {
  const fetcher = useFetcher<{ jobId?: number; error?: string }>();
  const sending = fetcher.state !== "idle";
  const error = fetcher.data?.error;
  return (
    <fetcher.Form method="post" action={action} className="mt-3 space-y-2 border-t border-rule-soft pt-3 text-sm" aria-label="Re-analyse this session">
      <p className="text-xs text-ink-soft">
        Runs the engine again on the stored raw file. Name another setup version of this car if the wrong one was picked;
        every earlier result stays in the history below.
      </p>
      <div className="flex flex-wrap items-end gap-2">
        <label className="flex flex-col">
          <span className="text-xs text-ink-soft">Setup version</span>
          <select name="setupId" defaultValue={currentSetupId} className="rounded border border-rule px-2 py-1">
            {setups.map((s) => (
              <option key={s.id} value={s.id}>
                {s.sheetName} v{s.version}
                {s.id === currentSetupId ? " (current)" : ""}
              </option>
            ))}
          </select>
        </label>
        <button type="submit" disabled={sending || busy} className="rounded border border-accent bg-accent px-3 py-1 font-medium text-white hover:bg-accent-strong disabled:opacity-60">
          {sending ? "Queuing…" : busy ? "Queued" : "Re-analyse"}
        </button>
      </div>
      {error && <p role="alert" className="text-xs text-danger">{error}</p>}
    </fetcher.Form>
  );
}

export function ResultHistory({ results }: { results: ResultRow[] }) {
  if (results.length === 0) return <p className="mt-3 text-xs text-ink-soft">No stored result yet.</p>;
  return (
    <div className="mt-3">
      <h3 className="text-xs font-semibold text-ink-soft">Result history (newest first)</h3>
      <ol className="mt-1 space-y-1 text-xs" data-testid="result-history">
        {results.map((r) => (
          <li key={r.id} className="flex flex-wrap gap-x-2">
            <span className="num text-ink-soft">{when(r.at)}</span>
            <span>{REASON_WORDS[r.reason] ?? r.reason}</span>
            {r.setupVersion !== null && <span className="text-ink-soft">setup v{r.setupVersion}</span>}
            {r.engineVersion && <span className="num text-ink-faint">{r.engineVersion}</span>}
            {r.error ? <span className="text-caution">could not read: {r.error}</span> : r.origin === "server" && <span>{r.differs ? "differs from the first reading" : "agrees"}</span>}
            {r.by && <span className="text-ink-faint">by {r.by}</span>}
          </li>
        ))}
      </ol>
    </div>
  );
}

/** Deleting takes two steps: open the box, tick the confirmation, press Delete (the server asks for confirm=yes too). */
export function DeleteSession({ action, name }: { action: string; name: string }) {
  const [open, setOpen] = useState(false);
  if (!open)
    return (
      <button type="button" onClick={() => setOpen(true)} className="rounded border border-danger/50 px-3 py-1 text-sm text-danger hover:bg-danger/5">
        Delete session…
      </button>
    );
  return (
    <Form method="post" action={action} reloadDocument className="space-y-2 rounded border border-danger/40 p-3 text-sm" aria-label="Delete this session">
      <p>
        Deleting <strong>{name}</strong> removes its figures, bands, notes, result history and its raw log file from storage.
        It cannot be brought back. The setup version it used stays in the Garage.
      </p>
      <label className="flex items-start gap-2">
        <input type="checkbox" name="confirm" value="yes" required className="mt-1" />
        <span>I understand that this session and its raw file are deleted for good.</span>
      </label>
      <div className="flex flex-wrap gap-2">
        <button type="submit" className="rounded border border-danger bg-danger px-3 py-1 font-medium text-white hover:opacity-90">
          Delete for good
        </button>
        <button type="button" onClick={() => setOpen(false)} className="rounded border border-rule px-3 py-1 hover:bg-rule-soft">
          Keep it
        </button>
      </div>
    </Form>
  );
}
