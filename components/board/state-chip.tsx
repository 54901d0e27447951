import type { Condition } from "@/shared/board";

/**
 * The state word, always as text. Normal states are greys (solid for Running, outlined otherwise); Tripped is the
 * one abnormal state here and carries the critical colour with its octagon; Offline and Stale are grey hatch.
 */
export function StateChip({ condition, tripLabel }: { condition: Condition; tripLabel?: string }) {
  const { word, freshness } = condition;
  const base =
    "inline-flex items-center gap-[0.35em] rounded-[0.2em] border px-[0.5em] py-[0.1em] font-semibold uppercase tracking-wide leading-tight";
  let look = "border-line bg-raised text-ink";
  if (freshness !== "live") look = "hatch-stale border-dashed border-faint bg-panel text-muted";
  else if (word === "Running") look = "border-ink bg-ink text-raised";
  else if (word === "Tripped") look = "border-critical bg-critical text-critical-ink";
  else if (word === "Starting") look = "border-dashed border-ink bg-raised text-ink";
  else if (word === "Stopped") look = "border-line bg-panel text-muted";
  return (
    <span className={`${base} ${look}`} data-testid="state-word" title={tripLabel}>
      {word === "Tripped" && freshness === "live" && (
        <span aria-hidden className="shape-critical inline-block size-[0.8em] bg-critical-ink" />
      )}
      {word}
    </span>
  );
}
