/**
 * One dropped file: its reading (the engine worker) and its upload (to the team's storage), each with
 * a bar, bytes, rate and time left; cancel and retry; and where it stands on the way to a session.
 */
import type { ReactNode } from "react";
import { formatBytes, formatDuration, formatRate, timeLeftS } from "./format";
import type { DropItem, FileProgress } from "./types";

function Bar({ label, done, total, tone, children }: { label: string; done: number; total: number; tone: "read" | "upload"; children: ReactNode }) {
  const pct = total > 0 ? Math.min(100, (done / total) * 100) : 0;
  return (
    <div>
      <div className="flex flex-wrap justify-between gap-x-3 text-xs text-ink-soft">
        <span>{label}</span>
        <span className="num">{children}</span>
      </div>
      <div className="mt-0.5 h-1.5 rounded bg-rule-soft" role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(pct)}>
        <div className={`h-1.5 rounded ${tone === "read" ? "bg-ink-soft" : "bg-accent"}`} style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}

function left(done: number, total: number, elapsedMs: number): string {
  const s = timeLeftS(done, total, elapsedMs);
  return s === null ? "" : ` · ${formatDuration(s)} left`;
}

interface Props {
  item: DropItem;
  progress: FileProgress | undefined;
  active: boolean;
  onSelect(): void;
  onCancel(): void;
  onRetryUpload(): void;
  onCancelRead(): void;
}

export function FileCard({ item, progress, active, onSelect, onCancel, onRetryUpload, onCancelRead }: Props) {
  const { upload, read, store } = item;
  const sent = progress?.sent ?? 0;
  const reading = progress?.read;
  const uploadElapsed = progress?.startedAt ? Date.now() - progress.startedAt : 0;
  const stored = store.state === "stored";
  const status = item.inspectError
    ? "Cannot be read"
    : stored ? "Stored"
    : store.state === "failed" ? "Not stored yet: see the message"
    : store.state === "storing" ? "Storing the session…"
    : store.state === "waiting" ? "Waiting for the upload to finish…"
    : read.state === "reading" ? "Reading the whole file…"
    : !item.inspection ? "Reading the header…"
    : item.step === "map" ? "Step 1: Channel map" : "Step 2: Session details";
  return (
    <li className={`rounded border bg-panel px-3 py-2 ${active ? "border-accent" : "border-rule"}`} data-file={item.name}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <button type="button" onClick={onSelect} className="min-w-0 truncate text-left font-medium text-ink hover:underline" aria-current={active ? "step" : undefined}>
          {item.name}
        </button>
        <span className="num text-xs text-ink-faint">{formatBytes(item.bytes)}</span>
      </div>
      <p className="text-sm text-ink-soft" data-testid="file-status">{status}</p>
      <div className="mt-1.5 space-y-1.5">
        {(read.state === "reading" || read.state === "done") && reading && (
          <Bar label="Reading (in this browser)" done={reading.bytes} total={reading.totalBytes} tone="read">
            {formatBytes(reading.bytes)} of {formatBytes(reading.totalBytes)} · {reading.rows.toLocaleString("en")} rows · {formatDuration(reading.elapsedMs / 1000)}
            {read.state === "reading" ? ` · ${formatRate(reading.bytes, reading.elapsedMs)}${left(reading.bytes, reading.totalBytes, reading.elapsedMs)}` : ""}
          </Bar>
        )}
        {upload.state !== "failed" && (
          <Bar label={upload.state === "done" ? "Uploaded" : upload.state === "queued" ? "Upload waiting" : "Uploading"} done={upload.state === "done" ? item.bytes : sent} total={item.bytes} tone="upload">
            {formatBytes(upload.state === "done" ? item.bytes : sent)} of {formatBytes(item.bytes)}
            {upload.state === "uploading" ? ` · ${formatRate(sent, uploadElapsed)}${left(sent, item.bytes, uploadElapsed)}` : ""}
          </Bar>
        )}
      </div>
      {item.inspectError && <p role="alert" className="mt-1 text-sm text-danger">This file cannot be read: {item.inspectError}. Nothing was stored from it.</p>}
      {upload.state === "failed" && !item.inspectError && <p role="alert" className="mt-1 text-sm text-danger">Upload failed: {upload.error}</p>}
      {read.state === "failed" && <p role="alert" className="mt-1 text-sm text-danger">Reading failed: {read.error}</p>}
      {read.state === "cancelled" && <p className="mt-1 text-sm text-ink-soft">Reading cancelled. Your map and details are kept.</p>}
      {upload.answer?.duplicate && !stored && (
        <p className="mt-1 text-sm">
          This file is already stored in this team. <a className="text-accent underline" href={upload.answer.duplicate.url}>Open the existing session</a>
        </p>
      )}
      {stored && store.session && (
        <p className="mt-1 text-sm">
          {store.session.duplicate ? "Already stored: " : ""}<a className="text-accent underline" href={store.session.url}>Open its Balance report</a>
        </p>
      )}
      <div className="mt-2 flex flex-wrap gap-2 text-sm">
        {upload.state === "failed" && upload.retryable && !item.inspectError && <button type="button" className="rounded border border-rule px-2 py-0.5 hover:bg-rule-soft" onClick={onRetryUpload}>Retry upload</button>}
        {read.state === "reading" && <button type="button" className="rounded border border-rule px-2 py-0.5 hover:bg-rule-soft" onClick={onCancelRead}>Stop reading</button>}
        {!stored && store.state !== "storing" && <button type="button" className="rounded border border-rule px-2 py-0.5 text-danger hover:bg-danger-bg" onClick={onCancel}>Cancel this file</button>}
      </div>
    </li>
  );
}
