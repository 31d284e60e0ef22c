import type { SessionHead } from "~/server/report/session.server";
import { fmt } from "~/lib/report/format";
import { REANALYSIS_QUEUED_DETAIL } from "~/lib/sessions/status-words";

const STATE_WORDS: Record<string, string> = {
  received: "Received: the log is stored and waits to be read.",
  read: "Read: these are the browser's figures; the server's re-check is queued.",
  checked: "Checked: the server's re-run of the analysis agrees with these figures.",
  flagged: "Flagged: the server's result differs, or warnings need a look.",
};

const show = (v: unknown) => (typeof v === "number" ? String(Number(v.toPrecision(6))) : v === null || v === undefined ? "—" : typeof v === "string" ? v : JSON.stringify(v));

/** Render whatever the re-check stored as a short list of "figure: browser → server" lines. */
export function diffLines(diff: unknown): string[] {
  if (!diff) return [];
  const listed = (diff as { differences?: unknown }).differences;
  if (Array.isArray(listed)) {
    // The re-check's SummaryDiff (app/lib/sessions/summary-diff.ts).
    const lines = listed.slice(0, 12).map((d: { path?: string; browser?: unknown; server?: unknown }) => `${d.path}: browser ${show(d.browser)} → server ${show(d.server)}`);
    if ((diff as { truncated?: boolean }).truncated || listed.length > 12) lines.push("… and more");
    return lines;
  }
  if (Array.isArray(diff)) return diff.slice(0, 12).map((d) => (typeof d === "string" ? d : JSON.stringify(d)));
  if (typeof diff === "object") return Object.entries(diff as Record<string, unknown>).slice(0, 12).map(([k, v]) => `${k}: ${typeof v === "string" ? v : JSON.stringify(v)}`);
  return [String(diff)];
}

/** jobShown: a box above already says the open job's state, so the same "queued" detail is not said twice. */
export function ProcessingState({ head, compact, jobShown }: { head: SessionHead; compact?: boolean; jobShown?: boolean }) {
  const badge = (
    <span data-testid="session-state" data-state={head.status} className={`rounded border px-2 py-0.5 text-xs font-medium ${head.status === "flagged" ? "border-caution/40 bg-caution-bg text-caution" : "border-rule text-ink-soft"}`}>
      {head.status}
    </span>
  );
  if (compact) return badge;
  const lines = diffLines(head.recheckDiff);
  return (
    <div className="space-y-2 text-sm">
      <p>{STATE_WORDS[head.status]}</p>
      {head.statusDetail && !(jobShown && head.statusDetail === REANALYSIS_QUEUED_DETAIL) && <p className="text-ink-soft">{head.statusDetail}</p>}
      {head.checkedAt && <p className="text-ink-soft">Server re-check: {new Date(head.checkedAt).toISOString().slice(0, 16).replace("T", " ")} UTC{lines.length === 0 ? ", no figure differs beyond rounding." : ":"}</p>}
      {lines.length > 0 && (
        <ul className="num list-disc pl-5 text-xs">
          {lines.map((l) => (
            <li key={l}>{l}</li>
          ))}
        </ul>
      )}
      <p className="text-xs text-ink-faint">
        Engine {head.engineVersion ?? "unknown"} · summary v{head.summaryVersion ?? "?"} · from {head.source === "api" ? "the data API" : head.source === "seed" ? "the demo seed" : "Drop a log"}
        {head.rawFileName ? ` · ${head.rawFileName}${head.rawBytes ? ` (${fmt(head.rawBytes / 1e6, 1)} MB)` : ""}` : ""}
      </p>
    </div>
  );
}

export function SessionDetails({ head }: { head: SessionHead }) {
  const rows: [string, string][] = [
    ["Car", head.car.name],
    ["Setup", `${head.setup.sheetName}, version ${head.setup.version}${head.setup.changeNote ? ` (${head.setup.changeNote})` : ""}`],
    ["Date", head.sessionDate ?? "—"],
    ["Venue", head.venueName ?? "—"],
    ["Run", head.runLabel ?? "—"],
    ["Driver", head.driverName ?? "—"],
    ["Air", head.air.tempC !== null ? `${fmt(head.air.tempC, 1)} °C, ${fmt(head.air.pressureHpa, 1)} hPa${head.air.humidityPct !== null ? `, ${fmt(head.air.humidityPct, 0)} %` : ""}` : "not given"],
    ["Fuel", head.fuel.startL !== null ? `${fmt(head.fuel.startL, 1)} → ${fmt(head.fuel.endL, 1)} L` : "not given"],
    ["Tyres", head.tyreNotes || "—"],
  ];
  return (
    <div className="text-sm">
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-soft">{k}</dt>
            <dd>{v}</dd>
          </div>
        ))}
      </dl>
      {head.notes && <p className="mt-2 whitespace-pre-line">{head.notes}</p>}
    </div>
  );
}
