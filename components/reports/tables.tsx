"use client";

import type { ReactNode } from "react";
import { DataTable, type DataColumn } from "@/components/data-table";
import { alarmBenchmarks, priorityLevel, TEN_MINUTES_MS, type StaleAlarm, type TopAlarm } from "@/shared/alarm-load";
import {
  eventsHref,
  formatAvailability,
  formatDuration,
  formatHours,
  formatPercent,
  mtbfBasis,
  reportCsvHref,
  reportHref,
  type AlarmLoadSite,
  type AvailabilityRow,
  type CauseRow,
  type ComparisonRow,
  type CsvTable,
  type MonthlyReport,
  type OutageRow,
} from "@/shared/availability";
import type { BenchmarkResult } from "@/shared/alarm-load";
import { localDateTime, monthLabel } from "@/shared/month";
import { OpenTrip, rowFilter, Verdict, type ScopeFilter } from "./parts";

export function CsvLink({ table, month, scope }: { table: CsvTable; month: string; scope: string }) {
  return (
    <a href={reportCsvHref(table, month, scope)} download className="text-sm no-print" data-testid={`csv-${table}`}>
      Download CSV
    </a>
  );
}

export function TableSection({
  id,
  title,
  csv,
  children,
  note,
}: {
  id: string;
  title: string;
  csv?: ReactNode;
  children: ReactNode;
  note?: ReactNode;
}) {
  return (
    <section aria-labelledby={id} className="space-y-1.5" data-testid={`section-${id}`}>
      <div className="flex flex-wrap items-baseline gap-3">
        <h2 id={id} className="text-lg font-semibold">
          {title}
        </h2>
        {csv}
      </div>
      {note ? <p className="text-xs text-muted">{note}</p> : null}
      {children}
    </section>
  );
}

const hoursCell = (s: number, href?: string, label?: string) => {
  const text = formatHours(s);
  return href && s > 0 ? (
    <a href={href} aria-label={label} title={label}>
      {text}
    </a>
  ) : (
    text
  );
};

export function AvailabilityTable({ report }: { report: MonthlyReport }) {
  const span = { from: Math.min(...report.periods.map((p) => p.from)), to: Math.max(...report.periods.map((p) => p.to)) };
  const levelRank = { compressor: 0, site: 1, fleet: 2 } as const;
  const columns: DataColumn<AvailabilityRow>[] = [
    {
      id: "name",
      header: "Compressor / site",
      sortValue: (r) => `${levelRank[r.level]} ${r.name}`,
      cell: (r) => (
        <span className={r.level === "compressor" ? "" : "font-semibold"}>
          {r.level === "compressor" && r.compressorId ? <a href={reportHref(report.month, `compressor-${r.compressorId}`)}>{r.name}</a> : r.name}
          {r.level === "site" && report.scopeKind === "fleet" && r.siteId ? (
            <a href={reportHref(report.month, `site-${r.siteId}`)} className="ml-1 text-xs font-normal">
              site report ›
            </a>
          ) : null}
          {r.inService === false ? <span className="ml-1 text-xs text-muted">(not in service)</span> : null}
          <OpenTrip count={r.openTrips} />
        </span>
      ),
    },
    ...(report.scopeKind === "fleet"
      ? [
          {
            id: "site",
            header: "Site",
            className: "whitespace-nowrap",
            sortValue: (r: AvailabilityRow) => r.siteName ?? "",
            cell: (r: AvailabilityRow) => (r.level === "compressor" ? r.siteName : ""),
          },
        ]
      : []),
    { id: "running", header: "Running h", numeric: true, sortValue: (r) => r.split.runningS, cell: (r) => formatHours(r.split.runningS) },
    { id: "standby", header: "Standby h", numeric: true, sortValue: (r) => r.split.standbyS, cell: (r) => formatHours(r.split.standbyS) },
    {
      id: "fault",
      header: "Fault h",
      numeric: true,
      sortValue: (r) => r.split.faultS,
      cell: (r) => hoursCell(r.split.faultS, eventsHref({ ...rowFilter(r), kind: "trip", ...span }), `Trip events: ${r.name}`),
    },
    {
      id: "planned",
      header: "Planned service h",
      numeric: true,
      sortValue: (r) => r.split.plannedS,
      cell: (r) => hoursCell(r.split.plannedS, eventsHref({ ...rowFilter(r), kind: "service", ...span }), `Service events: ${r.name}`),
    },
    {
      id: "nodata",
      header: "No data h",
      numeric: true,
      sortValue: (r) => r.split.noDataS,
      cell: (r) => hoursCell(r.split.noDataS, eventsHref({ ...rowFilter(r), kind: "comms", ...span }), `Communication events: ${r.name}`),
    },
    {
      id: "availability",
      header: "Availability %",
      numeric: true,
      sortValue: (r) => r.figures.availability,
      cell: (r) => (
        <a href={eventsHref({ ...rowFilter(r), ...span })} aria-label={`Events of the month: ${r.name}`}>
          {formatAvailability(r.figures.availability)}
        </a>
      ),
    },
    {
      id: "availabilityEx",
      header: "Excl. planned %",
      numeric: true,
      sortValue: (r) => r.figures.availabilityExPlanned,
      cell: (r) => formatAvailability(r.figures.availabilityExPlanned),
    },
    { id: "coverage", header: "Data coverage %", numeric: true, sortValue: (r) => r.figures.coverage, cell: (r) => formatPercent(r.figures.coverage) },
    {
      id: "hourMeter",
      header: "Hour meter +h",
      numeric: true,
      sortValue: (r) => r.hourMeterAdvanceH,
      cell: (r) => (r.hourMeterAdvanceH == null ? "—" : r.hourMeterAdvanceH.toFixed(1)),
    },
    { id: "starts", header: "Starts", numeric: true, sortValue: (r) => r.starts, cell: (r) => r.starts ?? "—" },
    {
      id: "startsPerHour",
      header: "Starts / run h",
      numeric: true,
      sortValue: (r) => r.startsPerRunHour,
      cell: (r) => (r.startsPerRunHour == null ? "—" : r.startsPerRunHour.toFixed(2)),
    },
    {
      id: "failures",
      header: "Failures",
      numeric: true,
      sortValue: (r) => r.failures,
      cell: (r) =>
        r.failures > 0 ? (
          <a href={eventsHref({ ...rowFilter(r), kind: "trip", ...span })} aria-label={`Trips: ${r.name}`}>
            {r.failures}
          </a>
        ) : (
          0
        ),
    },
    { id: "mtbf", header: mtbfBasis.running.column, numeric: true, sortValue: (r) => r.mtbfS, cell: (r) => formatHours(r.mtbfS) },
    { id: "mtbf-up", header: mtbfBasis.up.column, numeric: true, sortValue: (r) => r.mtbfUpS, cell: (r) => formatHours(r.mtbfUpS) },
    { id: "mttr", header: "MTTR", numeric: true, sortValue: (r) => r.mttrS, cell: (r) => formatDuration(r.mttrS) },
    {
      id: "longest",
      header: "Longest outage",
      numeric: true,
      sortValue: (r) => r.longestOutage?.durationS,
      cell: (r) =>
        r.longestOutage ? (
          <a
            href={eventsHref({ compressor: r.longestOutage.compressorId, from: r.longestOutage.start - 600_000, to: (r.longestOutage.end ?? report.generatedAt) + 600_000 })}
            title={r.longestOutage.cause}
          >
            {formatDuration(r.longestOutage.durationS)}
          </a>
        ) : (
          "—"
        ),
    },
  ];
  return (
    <DataTable
      rows={report.rows}
      columns={columns}
      rowKey={(r) => r.key}
      caption="Availability by compressor, site and fleet"
      pageSize={100}
      data-testid="availability-table"
      rowProps={(r) => ({ className: r.level === "compressor" ? "" : "bg-panel", "data-testid": `availability-row-${r.key}` })}
    />
  );
}

export function OutagesTable({ report }: { report: MonthlyReport }) {
  const kindWord = { trip: "Trip", comms: "Comms loss", planned: "Planned service" } as const;
  const columns: DataColumn<OutageRow>[] = [
    { id: "start", header: "Start (site time)", sortValue: (o) => o.start, cell: (o) => <span className="num">{localDateTime(o.start, o.timeZone)}</span> },
    {
      id: "end",
      header: "End",
      sortValue: (o) => o.end ?? Number.MAX_SAFE_INTEGER,
      cell: (o) => (o.end == null ? <span className="font-semibold">continuing</span> : <span className="num">{localDateTime(o.end, o.timeZone)}</span>),
    },
    { id: "duration", header: "Duration", numeric: true, sortValue: (o) => o.durationS, cell: (o) => formatDuration(o.durationS) },
    { id: "inPeriod", header: "In period h", numeric: true, sortValue: (o) => o.inPeriodS, cell: (o) => formatHours(o.inPeriodS, 2) },
    { id: "compressor", header: "Compressor", sortValue: (o) => o.compressorName, cell: (o) => o.compressorName },
    ...(report.scopeKind === "fleet" ? [{ id: "site", header: "Site", sortValue: (o: OutageRow) => o.siteName, cell: (o: OutageRow) => o.siteName }] : []),
    { id: "kind", header: "Kind", sortValue: (o) => o.kind, cell: (o) => kindWord[o.kind] },
    { id: "cause", header: "Cause", sortValue: (o) => o.cause, cell: (o) => o.cause },
    { id: "failure", header: "Failure", sortValue: (o) => o.failure, cell: (o) => (o.kind === "trip" ? (o.failure ? "yes" : "no (operator)") : "—") },
    {
      id: "events",
      header: "Events",
      cell: (o) => (
        <a
          href={eventsHref({ compressor: o.compressorId, from: o.start - 600_000, to: (o.end ?? report.generatedAt) + 600_000 })}
          data-testid="outage-events-link"
          aria-label={`Events around the ${kindWord[o.kind].toLowerCase()} of ${o.compressorName} at ${localDateTime(o.start, o.timeZone)}`}
        >
          events ›
        </a>
      ),
    },
  ];
  return (
    <DataTable
      rows={report.outages}
      columns={columns}
      rowKey={(o) => o.id}
      caption="Outages: trips, communication losses and planned service"
      initialSort={{ columnId: "start", direction: "asc" }}
      pageSize={25}
      emptyText="No trips, communication losses or planned service in this period."
      data-testid="outages-table"
      rowProps={(o) => ({ "data-testid": `outage-${o.kind}` })}
    />
  );
}

export function CausesTable({ report, scope }: { report: MonthlyReport; scope: ScopeFilter }) {
  const span = { from: Math.min(...report.periods.map((p) => p.from)), to: Math.max(...report.periods.map((p) => p.to)) };
  const kindOf = (c: CauseRow) => (c.kind === "trip" ? "trip" : c.kind === "planned" ? "service" : "comms");
  const columns: DataColumn<CauseRow>[] = [
    { id: "cause", header: "Cause", sortValue: (c) => c.cause, cell: (c) => c.cause },
    { id: "hours", header: "Hours", numeric: true, sortValue: (c) => c.seconds, cell: (c) => formatHours(c.seconds, 2) },
    { id: "outages", header: "Outages", numeric: true, sortValue: (c) => c.outages, cell: (c) => c.outages },
    { id: "events", header: "Events", cell: (c) => <a href={eventsHref({ ...scope, kind: kindOf(c), ...span })}>events ›</a> },
  ];
  return (
    <DataTable
      rows={report.causes}
      columns={columns}
      rowKey={(c) => c.key}
      caption="Down time by cause"
      initialSort={{ columnId: "hours", direction: "desc" }}
      pageSize={0}
      emptyText="No down time and no missing data."
      data-testid="causes-table"
    />
  );
}

export function BenchmarkTable({ site }: { site: AlarmLoadSite }) {
  const columns: DataColumn<BenchmarkResult>[] = [
    { id: "metric", header: "Metric", sortValue: (r) => alarmBenchmarks.find((b) => b.id === r.id)!.metric, cell: (r) => alarmBenchmarks.find((b) => b.id === r.id)!.metric },
    { id: "value", header: "This site", cell: (r) => <span className="num">{r.value}</span> },
    {
      id: "verdict",
      header: "Against target",
      sortValue: (r) => r.verdict,
      cell: (r) => (
        <span>
          <Verdict verdict={r.verdict} />
          {r.note ? <span className="block text-xs text-muted">{r.note}</span> : null}
        </span>
      ),
    },
    { id: "target", header: "Target", cell: (r) => alarmBenchmarks.find((b) => b.id === r.id)!.target },
    {
      id: "source",
      header: "Source",
      cell: (r) => {
        const b = alarmBenchmarks.find((x) => x.id === r.id)!;
        return <span className="text-xs text-muted">{b.source}</span>;
      },
    },
    {
      id: "events",
      header: "Events",
      cell: (r) =>
        r.id === "rate" || r.id === "flood" || r.id === "priority" ? (
          <a href={eventsHref({ site: site.siteId, kind: "alarm", from: site.from, to: site.to })}>events ›</a>
        ) : r.id === "peak" && site.figures.peakTenMinuteAt != null ? (
          <a href={eventsHref({ site: site.siteId, kind: "alarm", from: site.figures.peakTenMinuteAt, to: site.figures.peakTenMinuteAt + TEN_MINUTES_MS })}>
            busiest 10 min ›
          </a>
        ) : null,
    },
  ];
  return (
    <DataTable
      rows={site.results}
      columns={columns}
      rowKey={(r) => r.id}
      caption={`Alarm load at ${site.siteName} against ISA-18.2 / EEMUA 191`}
      pageSize={0}
      data-testid={`alarm-benchmarks-${site.siteId}`}
    />
  );
}

export function TopAlarmsTable({ site }: { site: AlarmLoadSite }) {
  const columns: DataColumn<TopAlarm & { rank: number }>[] = [
    { id: "rank", header: "#", numeric: true, sortValue: (t) => t.rank, cell: (t) => t.rank },
    { id: "compressor", header: "Compressor", sortValue: (t) => t.compressorName, cell: (t) => t.compressorName },
    { id: "alarm", header: "Alarm", sortValue: (t) => t.key, cell: (t) => <span className="num text-xs">{t.key}</span> },
    { id: "priority", header: "Priority", sortValue: (t) => t.priority, cell: (t) => `${t.priority} (${priorityLevel[t.priority]})` },
    { id: "count", header: "Count", numeric: true, sortValue: (t) => t.count, cell: (t) => t.count },
    { id: "share", header: "Share %", numeric: true, sortValue: (t) => t.share, cell: (t) => formatPercent(t.share) },
    {
      id: "events",
      header: "Events",
      cell: (t) => <a href={eventsHref({ compressor: t.compressorId, kind: "alarm", from: site.from, to: site.to })}>events ›</a>,
    },
  ];
  return (
    <DataTable
      rows={site.figures.top.map((t, i) => ({ ...t, rank: i + 1 }))}
      columns={columns}
      rowKey={(t) => `${t.compressorId}:${t.key}`}
      caption={`Ten most frequent alarms at ${site.siteName}`}
      pageSize={0}
      emptyText="No alarms in this period."
      data-testid={`top-alarms-${site.siteId}`}
    />
  );
}

export function StaleAlarmsTable({ site, now }: { site: AlarmLoadSite; now: number }) {
  const columns: DataColumn<StaleAlarm>[] = [
    { id: "compressor", header: "Compressor", sortValue: (a) => a.compressorName, cell: (a) => a.compressorName },
    { id: "alarm", header: "Alarm", sortValue: (a) => a.key, cell: (a) => <span className="num text-xs">{a.key}</span> },
    { id: "priority", header: "Priority", sortValue: (a) => a.priority, cell: (a) => a.priority },
    { id: "raised", header: "Raised (site time)", sortValue: (a) => a.raisedAt, cell: (a) => <span className="num">{localDateTime(a.raisedAt, site.timeZone)}</span> },
    {
      id: "active",
      header: "Active for",
      numeric: true,
      sortValue: (a) => (a.clearedAt ?? now) - a.raisedAt,
      cell: (a) => `${formatDuration(((a.clearedAt ?? now) - a.raisedAt) / 1000)}${a.clearedAt == null ? " (still)" : ""}`,
    },
    {
      id: "events",
      header: "Events",
      cell: (a) => <a href={eventsHref({ compressor: a.compressorId, kind: "alarm", from: a.raisedAt - 600_000, to: (a.clearedAt ?? now) + 600_000 })}>events ›</a>,
    },
  ];
  return (
    <DataTable
      rows={site.figures.stale}
      columns={columns}
      rowKey={(a) => a.alarmId}
      caption={`Stale alarms at ${site.siteName} (active more than 24 h)`}
      pageSize={10}
      emptyText="No stale alarms."
      data-testid={`stale-alarms-${site.siteId}`}
    />
  );
}

/** "743" or, when the scope's sites have different month lengths, "743–744". */
export const hoursRange = (m: Pick<ComparisonRow, "hoursMin" | "hoursMax">) => (m.hoursMin === m.hoursMax ? `${m.hoursMin}` : `${m.hoursMin}–${m.hoursMax}`);

export function ComparisonTable({ rows, scope, current }: { rows: readonly ComparisonRow[]; scope: string; current: string }) {
  const columns: DataColumn<ComparisonRow>[] = [
    {
      id: "month",
      header: "Month",
      sortValue: (m) => m.month,
      cell: (m) =>
        m.month === current ? (
          <span className="font-semibold">{monthLabel(m.month)}</span>
        ) : (
          <a href={reportHref(m.month, scope)}>{monthLabel(m.month)}</a>
        ),
    },
    { id: "hours", header: "Hours", numeric: true, sortValue: (m) => m.hoursMax, cell: (m) => `${hoursRange(m)}${m.partial ? " (to date)" : ""}` },
    { id: "availability", header: "Availability %", numeric: true, sortValue: (m) => m.figures.availability, cell: (m) => formatAvailability(m.figures.availability) },
    { id: "ex", header: "Excl. planned %", numeric: true, sortValue: (m) => m.figures.availabilityExPlanned, cell: (m) => formatAvailability(m.figures.availabilityExPlanned) },
    { id: "coverage", header: "Coverage %", numeric: true, sortValue: (m) => m.figures.coverage, cell: (m) => formatPercent(m.figures.coverage) },
    { id: "running", header: "Running h", numeric: true, sortValue: (m) => m.split.runningS, cell: (m) => formatHours(m.split.runningS) },
    { id: "fault", header: "Fault h", numeric: true, sortValue: (m) => m.split.faultS, cell: (m) => formatHours(m.split.faultS) },
    { id: "planned", header: "Planned h", numeric: true, sortValue: (m) => m.split.plannedS, cell: (m) => formatHours(m.split.plannedS) },
    { id: "nodata", header: "No data h", numeric: true, sortValue: (m) => m.split.noDataS, cell: (m) => formatHours(m.split.noDataS) },
    { id: "starts", header: "Starts", numeric: true, sortValue: (m) => m.starts, cell: (m) => m.starts ?? "—" },
    { id: "failures", header: "Failures", numeric: true, sortValue: (m) => m.failures, cell: (m) => m.failures },
    { id: "mtbf", header: mtbfBasis.running.column, numeric: true, sortValue: (m) => m.mtbfS, cell: (m) => formatHours(m.mtbfS) },
    { id: "mtbf-up", header: mtbfBasis.up.column, numeric: true, sortValue: (m) => m.mtbfUpS, cell: (m) => formatHours(m.mtbfUpS) },
    { id: "mttr", header: "MTTR", numeric: true, sortValue: (m) => m.mttrS, cell: (m) => formatDuration(m.mttrS) },
    { id: "alarms", header: "Alarms", numeric: true, sortValue: (m) => m.alarms, cell: (m) => m.alarms },
    {
      id: "alarmsPerHour",
      header: "Alarms / site-h",
      numeric: true,
      sortValue: (m) => m.alarmsPerHour,
      cell: (m) => (m.alarmsPerHour == null ? "—" : m.alarmsPerHour.toFixed(2)),
    },
  ];
  return (
    <DataTable
      rows={rows}
      columns={columns}
      rowKey={(m) => m.month}
      caption="Month-to-month comparison, last 12 months"
      initialSort={{ columnId: "month", direction: "desc" }}
      pageSize={25}
      data-testid="comparison-table"
      rowProps={(m) => ({ className: m.month === current ? "bg-panel" : "" })}
    />
  );
}

