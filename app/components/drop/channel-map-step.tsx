/**
 * Channel map step: which column of the file is which channel, in which unit and sign. Proposed from
 * a matching Logger profile or the engine's suggester; each mapped channel shows its first minutes;
 * the engine's sign and unit checks come back as proposals the engineer accepts with one click.
 */
import { useEffect, useMemo, useRef, useState } from "react";
import { isEngineError } from "~/engine/errors";
import { validateChannelMap } from "~/engine/mapping";
import type { SignCheck } from "~/engine/sign-check";
import { ALL_CHANNELS, REQUIRED_CHANNELS, type ChannelMap, type ChannelName } from "~/engine/types";
import { allowedUnits, canonicalUnit, CHANNEL_KIND, unitFactor } from "~/engine/units";
import { PreviewChart, type PreviewSeries } from "./preview-chart";
import type { DraftMap, DropItem } from "./types";
import type { ColumnPreview } from "../../../workers/column-preview";

export const CHANNEL_LABELS: Record<ChannelName, string> = {
  time: "Time", speed: "Speed", lat_accel: "Lateral acceleration", long_accel: "Longitudinal acceleration",
  steer: "Steering-wheel angle", damper_fl: "Damper FL", damper_fr: "Damper FR", damper_rl: "Damper RL", damper_rr: "Damper RR",
  ride_height_front: "Ride height front", ride_height_rear: "Ride height rear", yaw_rate: "Yaw rate",
};

function colourOf(channel: ChannelName): string {
  if (channel === "damper_fl" || channel === "damper_fr" || channel === "ride_height_front") return "#b4532a";
  if (channel === "damper_rl" || channel === "damper_rr" || channel === "ride_height_rear") return "#2f6f8f";
  return "#474c57";
}

/** The unit a check's sentence says the channel is "probably logged in", when it names exactly one we read. */
export function proposedUnit(channel: ChannelName, detail: string): string | null {
  const m = /probably logged in ([^\s,;]+) but mapped/.exec(detail);
  if (!m) return null;
  const unit = canonicalUnit(m[1]);
  return unitFactor(CHANNEL_KIND[channel], unit) === null ? null : unit;
}

/** Each mapped channel's preview in the file's units (sign as mapped) against seconds from the start; cached by what shapes it. */
function previewSeries(map: DraftMap, preview: ColumnPreview | null, cache: Map<string, PreviewSeries>): Partial<Record<ChannelName, PreviewSeries>> {
  const out: Partial<Record<ChannelName, PreviewSeries>> = {};
  const t = preview?.columns[preview.timeColumn];
  if (!preview || !t) return out;
  const timeFactor = map.time && map.time.column === preview.timeColumn ? unitFactor("time", map.time.unit) : null;
  for (const channel of ALL_CHANNELS) {
    const entry = map[channel];
    const col = entry && preview.columns[entry.column];
    if (!col) continue;
    const key = `${entry.column}\u0000${entry.invert ? 1 : 0}\u0000${timeFactor}`;
    let s = cache.get(key);
    if (!s) {
      const t0 = t.min[0];
      s = {
        xs: timeFactor !== null ? t.min.map((v) => (v - t0) * timeFactor) : t.min.map((_, i) => i * preview.bucketRows),
        min: entry.invert ? col.max.map((v) => -v) : col.min,
        max: entry.invert ? col.min.map((v) => -v) : col.max,
      };
      cache.set(key, s);
    }
    out[channel] = s;
  }
  return out;
}

function checkMap(map: DraftMap, item: DropItem): { map: ChannelMap | null; problem: string | null } {
  if (!item.inspection) return { map: null, problem: null };
  const missing = REQUIRED_CHANNELS.filter((c) => !map[c]);
  if (missing.length) return { map: null, problem: `Choose a column for ${missing.map((c) => CHANNEL_LABELS[c].toLowerCase()).join(", ")}.` };
  try {
    return { map: validateChannelMap(map, item.inspection.header), problem: null };
  } catch (e) {
    if (isEngineError(e)) return { map: null, problem: e.message.charAt(0).toUpperCase() + e.message.slice(1) + "." };
    throw e;
  }
}

interface Props {
  item: DropItem;
  onMap(map: DraftMap, source?: string): void;
  onProfileName(name: string): void;
  onChecks(map: ChannelMap): void;
  onConfirm(map: ChannelMap): void;
}

export function ChannelMapStep({ item, onMap, onProfileName, onChecks, onConfirm }: Props) {
  const { inspection, map } = item;
  const [tried, setTried] = useState(false);
  const checked = useMemo(() => checkMap(map, item), [map, item.inspection]); // eslint-disable-line react-hooks/exhaustive-deps
  const mapKey = JSON.stringify(checked.map);
  // Charts redraw only when their own channel's column, unit, sign or the time axis changes (not on
  // every upload or read progress tick that re-renders the page).
  const cache = useRef(new Map<string, PreviewSeries>());
  const series = useMemo(() => previewSeries(map, inspection?.preview ?? null, cache.current), [map, inspection]);

  // The checks follow the map: a short pause after the last change, then the worker reads the first minutes again.
  useEffect(() => {
    if (!checked.map) return;
    const t = setTimeout(() => onChecks(checked.map!), 350);
    return () => clearTimeout(t);
  }, [mapKey]); // eslint-disable-line react-hooks/exhaustive-deps

  if (!inspection) return null;
  const { header, preview } = inspection;
  const setEntry = (channel: ChannelName, entry: DraftMap[ChannelName]) => {
    const next = { ...map };
    if (entry) next[channel] = entry;
    else delete next[channel];
    onMap(next);
  };
  const pickColumn = (channel: ChannelName, column: string) => {
    if (!column) return setEntry(channel, undefined);
    const logged = header.units[header.columns.indexOf(column)];
    const kind = CHANNEL_KIND[channel];
    const unit = logged && unitFactor(kind, logged) !== null ? canonicalUnit(logged) : map[channel]?.unit ?? allowedUnits(kind)[0];
    setEntry(channel, { column, unit, ...(map[channel]?.invert ? { invert: true } : {}) });
  };
  const proposals = [...item.checks.signs, ...item.checks.units].filter((c) => c.verdict === "invert" || c.verdict === "check_unit");
  const notes = [...header.notes, ...inspection.suggestion.notes];

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2 text-sm text-ink-soft">
        <p>
          Map {item.mapSource ? <>{item.mapSource}</> : null}. Check each channel against its preview
          {preview ? <> (first <span className="num">{preview.rows.toLocaleString("en")}</span> rows)</> : null}.
        </p>
        {item.profiles.length > 0 && (
          <label className="flex items-center gap-2">
            <span>Logger profile</span>
            <select
              className="rounded border border-rule bg-panel px-2 py-1 text-ink"
              value=""
              onChange={(e) => {
                const p = item.profiles.find((x) => x.id === e.target.value);
                if (p) onMap(p.map as DraftMap, `Logger profile "${p.name}"`);
              }}
            >
              <option value="">Apply…</option>
              {item.profiles.map((p) => <option key={p.id} value={p.id}>{p.name}{p.matches ? " (this header)" : ""}</option>)}
            </select>
          </label>
        )}
      </div>
      <FileFacts item={item} />
      {notes.length > 0 && (
        <ul className="list-disc space-y-0.5 pl-5 text-sm text-ink-soft">
          {notes.map((n) => <li key={n}>{n}</li>)}
        </ul>
      )}
      {proposals.length > 0 && (
        <div className="rounded border border-caution/40 bg-caution-bg px-3 py-2 text-sm" role="status" aria-live="polite">
          <p className="mb-1 font-medium text-caution">The first minutes of the log suggest a change</p>
          <ul className="space-y-1.5">
            {proposals.map((c) => <Proposal key={`${c.channel}-${c.verdict}-${c.detail}`} check={c} map={map} setEntry={setEntry} />)}
          </ul>
        </div>
      )}
      <ol className="divide-y divide-rule-soft rounded border border-rule bg-panel" aria-label="Channel map">
        {ALL_CHANNELS.map((channel) => {
          const entry = map[channel];
          const required = (REQUIRED_CHANNELS as readonly string[]).includes(channel);
          const chart = series[channel];
          const verdicts = [...item.checks.signs, ...item.checks.units].filter((c) => c.channel === channel && c.verdict === "consistent");
          const id = `map-${channel}`;
          return (
            <li key={channel} className="grid gap-x-4 gap-y-1.5 px-3 py-2.5 md:grid-cols-[15rem_1fr]" data-channel={channel}>
              <div className="space-y-1.5">
                <label htmlFor={`${id}-column`} className="block text-sm font-medium">
                  {CHANNEL_LABELS[channel]} {required ? null : <span className="font-normal text-ink-faint">(optional)</span>}
                </label>
                <select id={`${id}-column`} className="block w-full rounded border border-rule bg-panel px-2 py-1 text-sm" value={entry?.column ?? ""} onChange={(e) => pickColumn(channel, e.target.value)}>
                  <option value="">{required ? "Choose a column…" : "Not logged"}</option>
                  {header.numericColumns.map((c) => {
                    const u = header.units[header.columns.indexOf(c)];
                    // The unit beside the name, unless the name already carries it ("Speed [km/h]").
                    return <option key={c} value={c}>{c}{u && !c.includes(u) ? ` [${u}]` : ""}</option>;
                  })}
                </select>
                <div className="flex items-center gap-3">
                  <select aria-label={`${CHANNEL_LABELS[channel]} unit`} id={`${id}-unit`} className="w-28 rounded border border-rule bg-panel px-2 py-1 text-sm" disabled={!entry} value={entry?.unit ?? ""} onChange={(e) => entry && setEntry(channel, { ...entry, unit: e.target.value })}>
                    {!entry && <option value="">unit</option>}
                    {allowedUnits(CHANNEL_KIND[channel]).map((u) => <option key={u} value={u}>{u}</option>)}
                  </select>
                  <label className="flex items-center gap-1.5 text-sm whitespace-nowrap">
                    <input type="checkbox" id={`${id}-invert`} disabled={!entry} checked={!!entry?.invert} onChange={(e) => entry && setEntry(channel, { column: entry.column, unit: entry.unit, ...(e.target.checked ? { invert: true } : {}) })} />
                    Flip sign
                  </label>
                </div>
              </div>
              <div className="min-w-0">
                {chart ? <PreviewChart series={chart} colour={colourOf(channel)} label={`${CHANNEL_LABELS[channel]}, first minutes`} /> : entry ? <p className="text-xs text-ink-faint">No preview for this column.</p> : null}
                {verdicts.map((v) => <p key={v.detail} className="text-xs text-ink-faint">Sign check: {v.detail}.</p>)}
              </div>
            </li>
          );
        })}
      </ol>
      <p className="text-xs text-ink-faint" aria-live="polite">
        {item.checks.state === "running" ? "Checking signs and units on the first minutes…" : item.checks.state === "failed" ? `The checks could not run: ${item.checks.error}` : null}
      </p>
      <div className="flex flex-wrap items-end gap-3">
        <label className="block text-sm">
          <span className="mb-1 block font-medium">Save as Logger profile <span className="font-normal text-ink-faint">(optional)</span></span>
          <input id="map-profile-name" className="w-64 max-w-full rounded border border-rule bg-panel px-2 py-1.5" maxLength={80} value={item.profileName} placeholder="e.g. Marlin data box, 50 Hz" onChange={(e) => onProfileName(e.target.value)} />
        </label>
        <button type="button" className="rounded border border-accent bg-accent px-3 py-2 text-sm font-medium text-white hover:bg-accent-strong" onClick={() => { setTried(true); if (checked.map) onConfirm(checked.map); }}>
          Confirm map
        </button>
      </div>
      {tried && checked.problem && <p role="alert" className="text-sm text-danger">{checked.problem}</p>}
    </div>
  );
}

function Proposal({ check, map, setEntry }: { check: SignCheck; map: DraftMap; setEntry(channel: ChannelName, entry: DraftMap[ChannelName]): void }) {
  const entry = map[check.channel];
  const name = CHANNEL_LABELS[check.channel];
  if (check.verdict === "invert") {
    return (
      <li className="flex flex-wrap items-center gap-2">
        <span><strong>{name}</strong> looks inverted ({check.detail}) — flip it?</span>
        {entry && <button type="button" className="rounded border border-rule bg-panel px-2 py-0.5 text-ink hover:bg-rule-soft" onClick={() => setEntry(check.channel, { column: entry.column, unit: entry.unit, ...(entry.invert ? {} : { invert: true }) })}>Flip {name.charAt(0).toLowerCase() + name.slice(1)}</button>}
      </li>
    );
  }
  const unit = proposedUnit(check.channel, check.detail);
  return (
    <li className="flex flex-wrap items-center gap-2">
      <span><strong>{name}</strong>: {check.detail}.</span>
      {entry && unit && unit !== entry.unit && <button type="button" className="rounded border border-rule bg-panel px-2 py-0.5 text-ink hover:bg-rule-soft" onClick={() => setEntry(check.channel, { ...entry, unit })}>Use {unit}</button>}
    </li>
  );
}

function FileFacts({ item }: { item: DropItem }) {
  const h = item.inspection!.header;
  const delim = h.delimiter === "\t" ? "tab" : h.delimiter === ";" ? "semicolon" : "comma";
  const meta = Object.entries(h.metadata);
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-sm sm:grid-cols-[auto_1fr_auto_1fr]">
      <dt className="text-ink-soft">Columns</dt>
      <dd className="num">{h.columns.length} ({h.numericColumns.length} numeric)</dd>
      <dt className="text-ink-soft">Format</dt>
      <dd>{delim}-separated{h.decimalComma ? ", decimal comma" : ""}{h.unitsRow ? ", units row" : ""}</dd>
      {meta.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-soft">{k}</dt>
          <dd className="truncate">{v}</dd>
        </div>
      ))}
    </dl>
  );
}
