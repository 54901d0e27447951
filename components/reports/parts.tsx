import type { ReactNode } from "react";
import { alarmBenchmarks, alarmLoadTerms, type BenchmarkVerdict } from "@/shared/alarm-load";
import {
  AVAILABILITY_SOURCES,
  availabilityTerms,
  eventsHref,
  formatAvailability,
  formatDuration,
  formatHours,
  formatPercent,
  mtbfBasis,
  type AvailabilityRow,
  type EventsFilter,
  type MonthlyReport,
  type SitePeriod,
} from "@/shared/availability";
import { localDateTime } from "@/shared/month";

// Presentational pieces without hooks, shared by the report screen and its printable page.

/** Colours of the theme's tokens for SVG fills (charts cannot use class names). Colour only for the abnormal state. */
export const stateFills = {
  running: "#3d434a", // normal
  standby: "#b9bdc3", // line
  planned: "#7b828b", // faint
  fault: "#bd161c", // critical
  noData: "url(#report-hatch)",
} as const;

export const stateLabels = {
  running: "Running",
  standby: "Standby (ready)",
  fault: "Down: fault / trip",
  planned: "Down: planned service",
  noData: "No data (offline)",
} as const;

/** The diagonal hatch Airkeep uses for offline / stale, as an SVG pattern (id report-hatch). */
export function HatchDefs() {
  return (
    <defs>
      <pattern id="report-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
        <rect width="6" height="6" fill="#eceef0" />
        <line x1="0" y1="0" x2="0" y2="6" stroke="#7b828b" strokeWidth="2" />
      </pattern>
    </defs>
  );
}

export function Num({ children, unit, testId }: { children: ReactNode; unit?: string; testId?: string }) {
  return (
    <span className="whitespace-nowrap" data-testid={testId}>
      <span className="num">{children}</span>
      {unit ? <span className="text-muted"> {unit}</span> : null}
    </span>
  );
}

/** "Above" a benchmark is abnormal: warning colour, triangle and word. "Within" stays grey. */
export function Verdict({ verdict }: { verdict: BenchmarkVerdict }) {
  if (verdict === "above") {
    return (
      <span className="inline-flex items-center gap-1 rounded border border-warning bg-warning-soft px-1.5 py-0.5 text-xs font-semibold text-ink">
        <span aria-hidden className="shape-warning inline-block size-3 bg-warning" />
        Above target
      </span>
    );
  }
  return <span className="text-xs text-muted">{verdict === "within" ? "Within target" : "No alarms"}</span>;
}

/** A trip still not reset: the one abnormal state in the availability tables. */
export function OpenTrip({ count }: { count: number }) {
  if (count === 0) return null;
  return (
    <span className="ml-1 inline-flex items-center gap-1 rounded border border-critical bg-critical-soft px-1 text-xs font-semibold text-ink">
      <span aria-hidden className="shape-critical inline-block size-2.5 bg-critical" />
      {count === 1 ? "Tripped now" : `${count} trips open`}
    </span>
  );
}

export type ScopeFilter = Pick<EventsFilter, "site" | "compressor">;

export function scopeFilterOf(report: Pick<MonthlyReport, "scopeKind" | "periods" | "rows">): ScopeFilter {
  if (report.scopeKind === "site") return { site: report.periods[0]?.siteId };
  if (report.scopeKind === "compressor") return { compressor: report.rows[0]?.compressorId ?? undefined };
  return {};
}

export function rowFilter(row: AvailabilityRow): ScopeFilter {
  if (row.level === "compressor") return { compressor: row.compressorId ?? undefined };
  if (row.level === "site") return { site: row.siteId ?? undefined };
  return {};
}

/** Earliest start and latest end of the report's periods (fleet months differ by site). */
export function reportSpan(report: Pick<MonthlyReport, "periods">): { from: number; to: number } {
  const from = Math.min(...report.periods.map((p) => p.from));
  const to = Math.max(...report.periods.map((p) => p.to));
  return Number.isFinite(from) ? { from, to } : { from: 0, to: 0 };
}

export function PeriodLine({ p }: { p: SitePeriod }) {
  return (
    <li data-testid="report-period">
      <span className="font-semibold">{p.siteName}</span> — {p.timeZone}: {localDateTime(p.from, p.timeZone)} to{" "}
      {localDateTime(p.partial ? p.to : p.monthEnd, p.timeZone)} local time
      {p.partial ? " (month to date)" : ""} —{" "}
      {p.lengthNote && !p.partial ? (
        <span>{p.lengthNote}</span>
      ) : (
        <Num unit="h">{p.partial ? ((p.to - p.from) / 3_600_000).toFixed(1) : p.hours}</Num>
      )}
    </li>
  );
}

export type Headline = { id: string; label: string; value: string; unit?: string; note?: string; href?: string; hrefLabel?: string };

/** The scope's headline figures, each with the events behind it where there are any. */
export function headlines(report: MonthlyReport): Headline[] {
  const t = report.total;
  const f = t.figures;
  const span = reportSpan(report);
  const scope = scopeFilterOf(report);
  const lo = t.longestOutage;
  return [
    {
      id: "availability",
      label: "Availability (planned service counted as down)",
      value: formatAvailability(f.availability),
      unit: f.availability == null ? undefined : "%",
      note: `Data coverage ${formatPercent(f.coverage)} %; time without data is not counted as up.`,
      href: eventsHref({ ...scope, ...span }),
      hrefLabel: "All events of the month",
    },
    {
      id: "availability-ex-planned",
      label: "Availability (planned service excluded)",
      value: formatAvailability(f.availabilityExPlanned),
      unit: f.availabilityExPlanned == null ? undefined : "%",
      href: eventsHref({ ...scope, ...span }),
      hrefLabel: "All events of the month",
    },
    {
      id: "run-hours",
      label: "Run hours",
      value: formatHours(t.split.runningS),
      unit: "h",
      note: t.hourMeterAdvanceH != null ? `Hour meter advanced ${t.hourMeterAdvanceH.toFixed(1)} h` : "Hour meter not reported",
      href: eventsHref({ ...scope, kind: "state", ...span }),
      hrefLabel: "Run-state events of the month",
    },
    {
      id: "starts",
      label: "Starts",
      value: t.starts == null ? "—" : String(t.starts),
      note: t.startsPerRunHour == null ? undefined : `${t.startsPerRunHour.toFixed(2)} starts per running hour`,
      href: eventsHref({ ...scope, kind: "state", ...span }),
      hrefLabel: "Run-state events of the month",
    },
    {
      id: "fault",
      label: "Down: fault / trip",
      value: formatHours(t.split.faultS),
      unit: "h",
      href: eventsHref({ ...scope, kind: "trip", ...span }),
      hrefLabel: "Trip events of the month",
    },
    {
      id: "planned",
      label: "Down: planned service",
      value: formatHours(t.split.plannedS),
      unit: "h",
      note: report.plannedService.recorded ? undefined : report.plannedService.note,
      href: eventsHref({ ...scope, kind: "service", ...span }),
      hrefLabel: "Service events of the month",
    },
    {
      id: "nodata",
      label: "No data (offline)",
      value: formatHours(t.split.noDataS),
      unit: "h",
      href: eventsHref({ ...scope, kind: "comms", ...span }),
      hrefLabel: "Communication events of the month",
    },
    {
      id: "failures",
      label: "Failures (trips)",
      value: String(t.failures),
      note: t.openTrips ? `${t.openTrips} not reset at the end of the period` : undefined,
      href: eventsHref({ ...scope, kind: "trip", ...span }),
      hrefLabel: "Trip events of the month",
    },
    {
      id: "mtbf",
      label: mtbfBasis.running.label,
      value: t.mtbfS == null ? "—" : formatHours(t.mtbfS),
      unit: t.mtbfS == null ? undefined : "h",
      note: t.mtbfS == null ? "No failures in the period" : mtbfBasis.running.note,
    },
    {
      id: "mtbf-up",
      label: mtbfBasis.up.label,
      value: t.mtbfUpS == null ? "—" : formatHours(t.mtbfUpS),
      unit: t.mtbfUpS == null ? undefined : "h",
      note: t.mtbfUpS == null ? "No failures in the period" : mtbfBasis.up.note,
    },
    {
      id: "mttr",
      label: "MTTR (mean time to restoration)",
      value: t.mttrS == null ? "—" : formatDuration(t.mttrS),
      note: t.mttrS == null ? "No restored failure in the period" : `Over ${t.restorations} restoration${t.restorations === 1 ? "" : "s"}`,
      href: t.restorations ? eventsHref({ ...scope, kind: "trip", ...span }) : undefined,
      hrefLabel: "Trip events of the month",
    },
    {
      id: "longest",
      label: "Longest outage",
      value: lo ? formatDuration(lo.durationS) : "—",
      note: lo ? `${lo.cause}${lo.end == null ? ", not reset yet" : ""}` : "No trip in the period",
      href: lo ? eventsHref({ compressor: lo.compressorId, from: lo.start - 10 * 60_000, to: (lo.end ?? report.generatedAt) + 10 * 60_000 }) : undefined,
      hrefLabel: "Events around the longest outage",
    },
  ];
}

export function HeadlineGrid({ report, compact = false }: { report: MonthlyReport; compact?: boolean }) {
  return (
    <dl className={`grid gap-2 ${compact ? "grid-cols-4" : "grid-cols-2 sm:grid-cols-3 lg:grid-cols-4 xl:grid-cols-6"}`} data-testid="report-headlines">
      {headlines(report).map((h) => (
        <div key={h.id} className="flex flex-col rounded border border-line bg-raised px-2 py-1.5" data-testid={`headline-${h.id}`}>
          <dt className="text-xs text-muted">{h.label}</dt>
          <dd className="text-xl font-semibold">
            <Num unit={h.unit}>{h.value}</Num>
          </dd>
          {h.note ? <dd className="text-xs text-muted">{h.note}</dd> : null}
          {h.href && !compact ? (
            <dd className="mt-auto pt-0.5 text-xs no-print">
              <a href={h.href} aria-label={h.hrefLabel}>
                events ›
              </a>
            </dd>
          ) : null}
        </div>
      ))}
    </dl>
  );
}

export function Definitions({ compact = false }: { compact?: boolean }) {
  return (
    <section aria-labelledby="report-definitions" className="space-y-2" data-testid="report-definitions">
      <h2 id="report-definitions" className="text-lg font-semibold">
        Definitions
      </h2>
      <dl className={`grid gap-x-4 gap-y-1 text-sm ${compact ? "grid-cols-1" : "md:grid-cols-2"}`}>
        {availabilityTerms.map((t) => (
          <div key={t.term} className="break-inside-avoid">
            <dt className="font-semibold">
              {t.term}
              {t.iev ? (
                <span className="font-normal text-muted">
                  {" "}
                  — IEV {t.iev}
                  {t.ievNote ? ` (${t.ievNote})` : ""}
                </span>
              ) : null}
            </dt>
            <dd>{t.definition}</dd>
          </div>
        ))}
        {alarmLoadTerms.map((t) => (
          <div key={t.term} className="break-inside-avoid">
            <dt className="font-semibold">Alarm load: {t.term.toLowerCase()}</dt>
            <dd>{t.definition}</dd>
          </div>
        ))}
      </dl>
      <p className="text-xs text-muted">{AVAILABILITY_SOURCES}</p>
      <h3 className="font-semibold">Alarm-load benchmarks and their sources</h3>
      <ul className="list-disc space-y-0.5 pl-5 text-sm">
        {alarmBenchmarks.map((b) => (
          <li key={b.id} className="break-inside-avoid">
            <span className="font-semibold">{b.metric}:</span> {b.target}. <span className="text-muted">Source: {b.source}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}
