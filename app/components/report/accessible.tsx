/** Small pieces that keep the report's tables and cautions usable from the keyboard and a screen reader. */
import type { ReactNode } from "react";

/**
 * A table wider than a phone scrolls sideways inside this region; it takes keyboard focus (so arrow keys
 * scroll it, WCAG 2.1 SC 2.1.1) and names itself for the screen reader's landmark list.
 */
export function ScrollRegion({ label, id, children, className = "" }: { label: string; id?: string; children: ReactNode; className?: string }) {
  return (
    <div id={id} role="region" aria-label={label} tabIndex={0} className={`overflow-x-auto rounded focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-accent ${className}`}>
      {children}
    </div>
  );
}

/** The cautions as a list inside a note: the note role sits on the wrapper, so the list keeps its own semantics. */
export function CautionList({ cautions, className = "mt-3" }: { cautions: readonly string[]; className?: string }) {
  return (
    <div role="note" aria-label="Cautions" className={`rounded border border-caution/30 bg-caution-bg py-2 pl-7 pr-3 text-xs text-caution ${className}`}>
      <ul className="list-disc space-y-0.5" data-testid="cautions">
        {cautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </div>
  );
}
