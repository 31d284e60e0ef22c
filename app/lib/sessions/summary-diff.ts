/**
 * How the server's summary of a log differs from the browser's, beyond rounding. Both run the same
 * engine on the same bytes, but the server may analyse in parts on threads, where sums run in another
 * order: figures then agree to within rounding of their last digits, and a sample lying exactly on a
 * gate's edge may fall the other way, so counts may differ by a few (app/engine/split.ts).
 *
 * Rules (ours): a number differs when |a − b| > 1e-4 · max(1, |a|, |b|) (0.01 %, far below what any
 * screen shows); a count (a key naming samples, blocks, segments or rows) when it differs by more
 * than max(5, 0.1 %); null against a number, a different string or boolean, or a different warning
 * code always differs. Traces are not compared (they are drawn, not reported).
 */

export type FigureDifference = { path: string; browser: unknown; server: unknown };
export type SummaryDiff = { differences: FigureDifference[]; compared: number; truncated: boolean };

const RELATIVE = 1e-4;
const COUNT_KEY = /(^|_)(samples|blocks|segments|rows|count)$/;
const SKIP_KEYS = new Set(["traces"]);
const MAX_LISTED = 40;

function numbersDiffer(key: string, a: number, b: number): boolean {
  if (Number.isNaN(a) && Number.isNaN(b)) return false;
  if (COUNT_KEY.test(key) && Number.isInteger(a) && Number.isInteger(b)) return Math.abs(a - b) > Math.max(5, 0.001 * Math.max(Math.abs(a), Math.abs(b)));
  return Math.abs(a - b) > RELATIVE * Math.max(1, Math.abs(a), Math.abs(b));
}

/** Warnings are compared by their codes (their messages quote figures, compared on their own). */
function warningCodes(list: unknown): string[] | null {
  if (!Array.isArray(list)) return null;
  return list.map((w) => (w && typeof w === "object" && typeof (w as { code?: unknown }).code === "string" ? (w as { code: string }).code : JSON.stringify(w))).sort();
}

export function diffSummaries(browser: unknown, server: unknown): SummaryDiff {
  const differences: FigureDifference[] = [];
  let compared = 0;
  const add = (path: string, a: unknown, b: unknown) => differences.push({ path, browser: a, server: b });

  function walk(path: string, key: string, a: unknown, b: unknown): void {
    if (key === "warnings" || key === "cautions") {
      const ca = warningCodes(a);
      const cb = warningCodes(b);
      compared++;
      if (JSON.stringify(ca) !== JSON.stringify(cb)) add(path, ca, cb);
      return;
    }
    if (typeof a === "number" && typeof b === "number") {
      compared++;
      if (numbersDiffer(key, a, b)) add(path, a, b);
      return;
    }
    if (Array.isArray(a) && Array.isArray(b)) {
      if (a.length !== b.length) {
        compared++;
        add(`${path}.length`, a.length, b.length);
        return;
      }
      a.forEach((item, i) => walk(`${path}[${i}]`, key, item, b[i]));
      return;
    }
    if (a && b && typeof a === "object" && typeof b === "object") {
      for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) {
        if (SKIP_KEYS.has(k)) continue;
        walk(path ? `${path}.${k}` : k, k, (a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]);
      }
      return;
    }
    compared++;
    if (a !== b && !(a === undefined && b === null) && !(a === null && b === undefined)) add(path, a ?? null, b ?? null);
  }

  walk("", "", browser, server);
  return { differences: differences.slice(0, MAX_LISTED), compared, truncated: differences.length > MAX_LISTED };
}

/** One sentence for the session's status detail, naming the first figures that differ. */
export function describeDiff(diff: SummaryDiff): string {
  if (diff.differences.length === 0) return "The server's re-check of the stored file agrees with the browser's figures.";
  const shown = diff.differences.slice(0, 3).map((d) => `${d.path} (browser ${fmt(d.browser)}, server ${fmt(d.server)})`);
  const more = diff.differences.length - shown.length + (diff.truncated ? 1 : 0);
  return `The server's re-check differs from the browser's figures beyond rounding: ${shown.join("; ")}${more > 0 ? ` and ${more}${diff.truncated ? "+" : ""} more` : ""}. The server's figures are shown.`;
}

function fmt(value: unknown): string {
  if (typeof value === "number") return Number.isInteger(value) ? String(value) : value.toPrecision(6);
  const text = JSON.stringify(value) ?? "none";
  return text.length > 60 ? `${text.slice(0, 57)}…` : text;
}
