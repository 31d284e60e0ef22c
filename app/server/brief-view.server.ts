/**
 * What a Driver brief page sends to the browser: one session's summary, or a saved comparison's sessions
 * (name, date, summary each), with the team's name, the note and the expiry. Nothing else of the team; a
 * session without figures is left out, and a brief with nothing left to show is "not available".
 */
import type { SessionSummary } from "~/engine/summary-types";
import type { OpenedBrief } from "./brief.server";
import { summaryOf } from "./report/session.server";

export type BriefPayload =
  | { kind: "session"; sessionName: string; sessionDate: string | null; teamName: string; note: string | null; expiresAt: string; summary: SessionSummary }
  | { kind: "comparison"; comparisonName: string; teamName: string; note: string | null; expiresAt: string; sessions: { name: string; sessionDate: string | null; summary: SessionSummary }[] };

export function briefPayload(opened: OpenedBrief | null): BriefPayload | null {
  if (!opened) return null;
  const expiresAt = opened.expiresAt.toISOString();
  if (opened.kind === "session") {
    const summary = summaryOf(opened.summary);
    if (!summary) return null;
    return { kind: "session", sessionName: opened.sessionName, sessionDate: opened.sessionDate, teamName: opened.teamName, note: opened.note, expiresAt, summary: lean(summary) };
  }
  const sessions = opened.sessions.flatMap((x) => {
    const summary = summaryOf(x.summary);
    return summary ? [{ name: x.name, sessionDate: x.sessionDate, summary: lean(summary) }] : [];
  });
  if (sessions.length === 0) return null;
  return { kind: "comparison", comparisonName: opened.comparisonName, teamName: opened.teamName, note: opened.note, expiresAt, sessions };
}

/** Traces stay on the server (the brief draws band figures only). */
function lean(summary: SessionSummary): SessionSummary {
  const { traces: _traces, ...rest } = summary;
  return rest as SessionSummary;
}
