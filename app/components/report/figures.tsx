import type { ReactNode } from "react";
import type { BandSummary, SessionSummary } from "~/engine/summary-types";
import { bandLabel, fmt, interval, signed } from "~/lib/report/format";
import { flagWords, groupWarnings } from "~/lib/report/warnings";
import { sideOfZero } from "~/lib/report/verdict";
import { ScrollRegion } from "./accessible";

/** One headline figure; `figure` + `value` feed the data-figure contract (the unrounded summary value). */
function Headline({ label, figure, value, children, sub, tone }: { label: string; figure?: string; value?: number | null; children: ReactNode; sub?: ReactNode; tone?: "front" | "rear" }) {
  const edge = tone === "front" ? "border-l-front" : tone === "rear" ? "border-l-rear" : "border-l-rule";
  return (
    <div className={`border-l-4 ${edge} bg-panel px-3 py-2`}>
      <div className="text-xs text-ink-soft">{label}</div>
      <div className="num text-base font-semibold sm:text-lg" data-figure={figure} data-value={figure ? (value ?? "") : undefined}>
        {children}
      </div>
      {sub && <div className="num text-xs text-ink-soft">{sub}</div>}
    </div>
  );
}

export interface AirWords {
  density: number;
  source: string;
}

export function HeadlineFigures({ s, airWords, fuelWords }: { s: SessionSummary; airWords: string; fuelWords: string }) {
  const a = s.aero;
  const wb = s.car.wheelbase_mm;
  const behind = s.cop.cop_behind_cog_mm;
  const shift = a.balance_shift;
  const shiftSide = shift ? sideOfZero(shift.ci95_points) : "spans";
  return (
    <div className="grid grid-cols-2 gap-2 sm:grid-cols-3">
      <Headline label="ClA front" figure="cla_front_m2" value={a.cla_front_m2} tone="front" sub={`95 %: ${interval(a.cla_front_ci95_m2, 3)} m²`}>
        {fmt(a.cla_front_m2, 3)} m²
      </Headline>
      <Headline label="ClA rear" figure="cla_rear_m2" value={a.cla_rear_m2} tone="rear" sub={`95 %: ${interval(a.cla_rear_ci95_m2, 3)} m²`}>
        {fmt(a.cla_rear_m2, 3)} m²
      </Headline>
      <Headline label="ClA total" figure="cla_total_m2" value={a.cla_total_m2} sub={`${a.samples} samples in ${a.blocks} one-second blocks`}>
        {fmt(a.cla_total_m2, 3)} m²
      </Headline>
      <Headline label="Balance (% front)" figure="balance_front_pct" value={a.balance_front_pct} sub={`95 %: ${interval(a.balance_front_ci95_pct, 1)} %`}>
        {fmt(a.balance_front_pct, 1)} %
      </Headline>
      <Headline label="CoP against CoG" sub={behind === null ? "needs a balance" : `${fmt((Math.abs(behind) / wb) * 100, 1)} % of the ${fmt(wb, 0)} mm wheelbase`}>
        {behind === null ? "—" : `${fmt(Math.abs(behind), 0)} mm ${behind >= 0 ? "behind" : "ahead"}`}
      </Headline>
      <Headline
        label={shift ? `Balance shift ${shift.low_band_kmh.join("–")} → ${shift.high_band_kmh.join("–")} km/h` : "Balance shift with speed"}
        sub={shift ? `95 %: ${interval(shift.ci95_points, 1)} pt · CoP ${signed(shift.cop_shift_mm, 0)} mm (${interval(shift.cop_shift_ci95_mm, 0)}) forward` : "needs two bands with aero load"}
      >
        {shift ? (
          <span className={shiftSide === "spans" ? "text-ink-faint" : ""} title={shiftSide === "spans" ? "The interval spans zero: no clear change" : undefined}>
            {signed(shift.points, 1)} pt{shiftSide === "spans" ? " (not clear)" : ""}
          </span>
        ) : (
          "—"
        )}
      </Headline>
      <Headline label="Air density used" sub={airWords}>
        {fmt(s.air_density_kg_m3, 3)} kg/m³
      </Headline>
      <Headline label="Fuel used" sub={fuelWords}>
        {s.fuel.start_kg !== null && s.fuel.end_kg !== null ? `${fmt(s.fuel.start_kg - s.fuel.end_kg, 1)} kg` : "—"}
      </Headline>
    </div>
  );
}

const Td = ({ children, dim, title }: { children: ReactNode; dim?: boolean; title?: string }) => (
  <td className={`num whitespace-nowrap px-2 py-1 text-right ${dim ? "text-ink-faint" : ""}`} title={title}>
    {children}
  </td>
);

function rough(b: BandSummary) {
  if (b.understeer_gradient_deg_per_g !== null && b.steady_cornering_s < 15) return `rests on ${fmt(b.steady_cornering_s, 1)} s of steady cornering (under 15 s)`;
  return undefined;
}

export function BandTable({ bands, id }: { bands: BandSummary[]; id?: string }) {
  return (
    <ScrollRegion label="Speed bands" id={id}>
      <table className="w-full border-collapse text-sm">
        <caption className="sr-only">Speed bands</caption>
        <thead className="border-b border-rule text-xs text-ink-soft">
          <tr>
            <th scope="col" className="px-2 py-1 text-left font-medium">Band km/h</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Samples</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Time s</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Mean km/h</th>
            <th scope="col" className="px-2 py-1 text-right font-medium text-front">Aero load F N</th>
            <th scope="col" className="px-2 py-1 text-right font-medium text-rear">Aero load R N</th>
            <th scope="col" className="px-2 py-1 text-right font-medium text-front">ClA F m²</th>
            <th scope="col" className="px-2 py-1 text-right font-medium text-rear">ClA R m²</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Balance % front (95 %)</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Understeer deg/g (95 %)</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Ride height F / R mm</th>
            <th scope="col" className="px-2 py-1 text-right font-medium">Rake mm</th>
          </tr>
        </thead>
        <tbody>
          {bands.map((b) => {
            const rh = b.ride_height_front_mm !== null;
            return (
              <tr key={b.min_kmh} className="border-b border-rule-soft" data-band={bandLabel(b)}>
                <th scope="row" className="num whitespace-nowrap px-2 py-1 text-left font-medium">{bandLabel(b)}</th>
                <Td>{b.samples}</Td>
                <Td>{fmt(b.duration_s, 1)}</Td>
                <Td>{fmt(b.mean_speed_kmh, 0)}</Td>
                <Td>{fmt(b.aero_load_front_n, 0)}</Td>
                <Td>{fmt(b.aero_load_rear_n, 0)}</Td>
                <Td>{fmt(b.cla_front_m2, 3)}</Td>
                <Td>{fmt(b.cla_rear_m2, 3)}</Td>
                <Td dim={b.balance_front_pct === null} title={b.balance_front_pct === null ? "Too little aero load in this band to split between the axles" : undefined}>
                  {fmt(b.balance_front_pct, 1)} <span className="text-xs text-ink-soft">({interval(b.balance_front_ci95_pct, 1)})</span>
                </Td>
                <Td dim={b.understeer_gradient_deg_per_g === null || rough(b) !== undefined} title={b.understeer_gradient_deg_per_g === null ? "Under 5 s of steady cornering in this band" : rough(b)}>
                  {fmt(b.understeer_gradient_deg_per_g, 2)} <span className="text-xs text-ink-soft">({interval(b.understeer_ci95_deg_per_g, 2)})</span>
                </Td>
                <Td title={rh ? "From the ride-height sensors" : "Change from static, worked out from the dampers (tyre left out)"}>
                  {rh ? `${fmt(b.ride_height_front_mm, 1)} / ${fmt(b.ride_height_rear_mm, 1)}` : `Δ ${fmt(b.ride_height_change_front_mm, 1)} / ${fmt(b.ride_height_change_rear_mm, 1)}`}
                </Td>
                <Td>{rh ? fmt(b.rake_mm, 1) : `Δ ${fmt(b.rake_change_mm, 1)}`}</Td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-ink-soft">Δ = change from static, worked out from the dampers. Greyed figures are missing or rest on little data (hover for why).</p>
    </ScrollRegion>
  );
}

export function WarningsList({ s }: { s: SessionSummary }) {
  const items = groupWarnings(s.warnings);
  return (
    <div>
      {items.length === 0 ? (
        <p className="text-sm text-ink-soft">No warnings: the log had what the analysis needs.</p>
      ) : (
        <ul className="space-y-2" data-testid="warnings">
          {items.map(({ code, words, messages }) => (
            <li key={code} className={`border-l-4 pl-3 text-sm ${words.weight === "figures" ? "border-l-caution" : "border-l-rule"}`} data-warning={code}>
              <div className="font-medium">{words.title}</div>
              <div>{words.todo}</div>
              {messages.map((m, i) => (
                <div key={i} className="text-xs text-ink-soft">{m}</div>
              ))}
            </li>
          ))}
        </ul>
      )}
      {s.quality.flags.length > 0 && (
        <>
          <h3 className="mt-3 text-sm font-semibold">How these figures were made</h3>
          <ul className="mt-1 list-disc pl-5 text-sm text-ink-soft">
            {s.quality.flags.map((f) => (
              <li key={f}>{flagWords(f)}</li>
            ))}
          </ul>
        </>
      )}
    </div>
  );
}
