import { bandGeometry, type BandMark } from "@/shared/board";

/**
 * An analog value as a horizontal band from `min` to `max` (in the unit shown), with setpoints marked as ticks,
 * an optional normal range drawn as a lighter strip, and the value as a filled run plus a marker line.
 * Not current (stale or offline): the fill is hatched and the marker hollow, so it never reads as live.
 */
export function Band({
  label,
  min,
  max,
  value,
  marks = [],
  normal = null,
  current,
  valueText,
  testId,
  minLabel,
  maxLabel,
  fill = true,
}: {
  label: string;
  min: number;
  max: number;
  value: number | null;
  marks?: readonly BandMark[];
  normal?: { from: number; to: number } | null;
  current: boolean;
  /** What a screen reader says, e.g. "387.2 bar; restart 370, stop 414, rated 420 bar". */
  valueText: string;
  testId?: string;
  minLabel?: string;
  maxLabel?: string;
  /** Fill from the start to the value (a level, e.g. bank pressure); off for values read against a normal range. */
  fill?: boolean;
}) {
  const g = bandGeometry({ min, max, value, marks, normal });
  return (
    <div
      role="meter"
      aria-label={label}
      aria-valuemin={min}
      aria-valuemax={max}
      aria-valuenow={value == null ? undefined : Math.min(max, Math.max(min, value))}
      aria-valuetext={valueText}
      data-testid={testId}
      data-value-pct={g.valuePct == null ? "" : g.valuePct.toFixed(1)}
      className="relative"
    >
      {g.marks.length > 0 && (
        <div aria-hidden className="relative mb-[0.35em] h-[1em] text-[0.7em] leading-none">
          {g.marks.map((m) => (
            <span key={m.key} className="num absolute -translate-x-1/2 font-semibold text-ink" style={{ left: `${m.pct}%` }}>
              {m.label}
            </span>
          ))}
        </div>
      )}
      <div className="relative h-[0.9em] overflow-visible rounded-[0.15em] border border-line bg-raised">
        {g.normal && (
          <div
            aria-hidden
            className="absolute inset-y-0 bg-line/70"
            style={{ left: `${g.normal.fromPct}%`, width: `${Math.max(0, g.normal.toPct - g.normal.fromPct)}%` }}
          />
        )}
        {fill && g.valuePct != null && (
          <div
            aria-hidden
            className={`absolute inset-y-0 left-0 ${current ? "bg-normal/45" : "hatch-stale bg-faint/20"}`}
            style={{ width: `${g.valuePct}%` }}
          />
        )}
        {g.marks.map((m) => (
          <div
            key={m.key}
            aria-hidden
            title={m.label}
            className="absolute -top-[0.25em] -bottom-[0.25em] w-[0.14em] -translate-x-1/2 bg-ink"
            style={{ left: `${m.pct}%` }}
          />
        ))}
        {g.valuePct != null && (
          <div
            aria-hidden
            data-testid={testId ? `${testId}-marker` : undefined}
            className={`absolute -top-[0.4em] -bottom-[0.4em] w-[0.32em] -translate-x-1/2 rounded-[0.08em] border-[0.08em] border-ink ${
              current ? "bg-ink" : "bg-raised"
            }`}
            style={{ left: `${g.valuePct}%` }}
          />
        )}
        {(g.over || g.under) && (
          <span
            aria-hidden
            className={`absolute top-1/2 -translate-y-1/2 text-[0.8em] font-bold leading-none text-ink ${g.over ? "-right-[1.1em]" : "-left-[1.1em]"}`}
          >
            {g.over ? "▶" : "◀"}
          </span>
        )}
      </div>
      <div aria-hidden className="relative mt-[0.3em] h-[1em] text-[0.7em] leading-none text-muted">
        <span className="num absolute left-0">{minLabel ?? min}</span>
        <span className="num absolute right-0">{maxLabel ?? max}</span>
      </div>
    </div>
  );
}
