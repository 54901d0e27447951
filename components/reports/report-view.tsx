"use client";

import { AirQualityReportSection } from "./air-quality-section";
import { useQuery } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useId } from "react";
import { reportHref, type MonthlyReport } from "@/shared/availability";
import { monthLabel } from "@/shared/month";
import { reportQueries } from "../queries/reports";
import { CauseChart, ComparisonChart, DailyChart, PrioritySplitChart } from "./charts";
import { DELIVERY_NOTE, DeliveryTable } from "./delivery-table";
import { Definitions, HeadlineGrid, PeriodLine, reportSpan, scopeFilterOf } from "./parts";
import {
  AvailabilityTable,
  BenchmarkTable,
  CausesTable,
  ComparisonTable,
  CsvLink,
  OutagesTable,
  StaleAlarmsTable,
  TableSection,
  TopAlarmsTable,
} from "./tables";

export type ScopeOptions = {
  sites: { id: number; name: string }[];
  compressors: { id: number; name: string; siteId: number }[];
};

/** The monthly report screen: month and scope pickers, headline figures, charts, tables, CSV links, comparison. */
export function ReportView({ month, scope, options, latestMonth }: { month: string; scope: string; options: ScopeOptions; latestMonth: string }) {
  const router = useRouter();
  const ids = useId();
  const report = useQuery(reportQueries.report(month, scope));
  const comparison = useQuery(reportQueries.comparison(month, scope));
  const go = (m: string, s: string) => router.push(reportHref(m, s));
  const data = report.data;

  return (
    <div className="mx-auto max-w-[1400px] space-y-5" data-testid="reports">
      <header className="flex flex-wrap items-end gap-x-6 gap-y-2">
        <div>
          <h1 className="text-2xl font-semibold">Monthly report</h1>
          <p className="text-sm text-muted">
            Availability, down time and alarm load, per compressor, site and fleet. Month boundaries are in each site’s own time zone.
          </p>
        </div>
        <form
          className="flex flex-wrap items-end gap-3"
          onSubmit={(e) => {
            e.preventDefault();
          }}
          aria-label="Choose the report"
        >
          <label className="flex flex-col text-sm">
            <span className="text-muted">Month</span>
            <input
              type="month"
              id={`${ids}-month`}
              value={month}
              max={latestMonth}
              required
              onChange={(e) => {
                if (/^\d{4}-\d{2}$/.test(e.target.value)) go(e.target.value, scope);
              }}
              className="num rounded border border-line bg-white px-1 py-0.5"
              data-testid="report-month"
            />
          </label>
          <label className="flex flex-col text-sm">
            <span className="text-muted">Scope</span>
            <select value={scope} onChange={(e) => go(month, e.target.value)} className="rounded border border-line bg-white px-1 py-0.5" data-testid="report-scope">
              <option value="fleet">Fleet (every site you can see)</option>
              <optgroup label="Site">
                {options.sites.map((s) => (
                  <option key={s.id} value={`site-${s.id}`}>
                    {s.name}
                  </option>
                ))}
              </optgroup>
              {options.sites.map((s) => (
                <optgroup key={s.id} label={`Compressors at ${s.name}`}>
                  {options.compressors
                    .filter((c) => c.siteId === s.id)
                    .map((c) => (
                      <option key={c.id} value={`compressor-${c.id}`}>
                        {c.name}
                      </option>
                    ))}
                </optgroup>
              ))}
            </select>
          </label>
          <a href={reportHref(month, scope, true)} className="rounded border border-line bg-raised px-2 py-1 text-sm no-underline hover:bg-panel" data-testid="report-print-link">
            Printable page
          </a>
        </form>
      </header>

      {report.error ? (
        <p role="alert" className="rounded border border-line bg-raised p-3">
          {report.error.message}
        </p>
      ) : !data ? (
        <p className="text-muted">Loading the report…</p>
      ) : (
        <ReportBody report={data} dim={report.isPlaceholderData} />
      )}

      <TableSection
        id="comparison"
        title="Month to month"
        csv={<CsvLink table="comparison" month={month} scope={scope} />}
        note="The 12 months ending with the chosen month, same scope. Each site's months in its own time zone."
      >
        {comparison.data ? (
          <>
            <ComparisonChart rows={comparison.data.months} />
            <ComparisonTable rows={comparison.data.months} scope={scope} current={month} />
          </>
        ) : comparison.error ? (
          <p role="alert">{comparison.error.message}</p>
        ) : (
          <p className="text-muted">Loading…</p>
        )}
      </TableSection>

      {data ? <Definitions /> : null}
    </div>
  );
}

function ReportBody({ report, dim }: { report: MonthlyReport; dim: boolean }) {
  const scope = scopeFilterOf(report);
  const span = reportSpan(report);
  return (
    <div className={`space-y-5 ${dim ? "opacity-60" : ""}`} aria-busy={dim || undefined}>
      <section aria-labelledby="report-title" className="space-y-2">
        <h2 id="report-title" className="text-xl font-semibold" data-testid="report-title">
          {monthLabel(report.month)} — {report.scopeLabel}
        </h2>
        <ul className="space-y-0.5 text-sm">
          {report.periods.map((p) => (
            <PeriodLine key={p.siteId} p={p} />
          ))}
        </ul>
        <HeadlineGrid report={report} />
        <p className="text-sm" data-testid="planned-service-line">
          <span className="font-semibold">Planned service:</span> {(report.total.split.plannedS / 3600).toFixed(1)} h.{" "}
          <span className="text-muted">{report.plannedService.note}</span>
        </p>
      </section>

      <div className="grid gap-4 xl:grid-cols-2">
        <TableSection
          id="daily"
          title="Daily availability"
          csv={<CsvLink table="daily" month={report.month} scope={report.scope} />}
          note={`Hours in each state per day${report.rows.length > 1 ? " (compressor-hours)" : ""}; the line is the day's availability. Select a day for its events.`}
        >
          <DailyChart rows={report.daily} scope={scope} />
        </TableSection>
        <TableSection
          id="causes"
          title="Down time by cause"
          csv={<CsvLink table="downtime" month={report.month} scope={report.scope} />}
          note="Trips by the machine's trip code, planned service, and time without data. Select a bar for its events."
        >
          <CauseChart rows={report.causes} scope={scope} span={span} />
          <CausesTable report={report} scope={scope} />
        </TableSection>
      </div>

      <TableSection id="availability" title="Availability" csv={<CsvLink table="availability" month={report.month} scope={report.scope} />}>
        <AvailabilityTable report={report} />
      </TableSection>

      <TableSection
        id="outages"
        title="Outages"
        csv={<CsvLink table="outages" month={report.month} scope={report.scope} />}
        note="Trips (to their reset), communication losses and planned service that overlap the period, at full length. Times in each site's zone."
      >
        <OutagesTable report={report} />
      </TableSection>

      <TableSection id="delivery" title="Delivery health" note={DELIVERY_NOTE}>
        <DeliveryTable rows={report.delivery} />
      </TableSection>

      <section aria-labelledby="alarm-load" className="space-y-3">
        <div className="flex flex-wrap items-baseline gap-3">
          <h2 id="alarm-load" className="text-lg font-semibold">
            Alarm load
          </h2>
          <CsvLink table="alarm-load" month={report.month} scope={report.scope} />
        </div>
        <p className="text-xs text-muted">
          Per site and operator position, against ANSI/ISA-18.2 and EEMUA 191 benchmarks (sources beside each).
          {report.scopeKind === "compressor" ? " Only this compressor's alarms are counted." : ""}
        </p>
        {report.alarmLoad.map((s) => (
          <div key={s.siteId} className="space-y-2 rounded border border-line bg-raised p-2" data-testid={`alarm-load-${s.siteId}`}>
            <h3 className="font-semibold">
              {s.siteName} — <span className="num">{s.figures.alarms}</span> alarms, {s.figures.positions} operator position
              {s.figures.positions === 1 ? "" : "s"}
            </h3>
            <div className="grid gap-3 xl:grid-cols-2">
              <BenchmarkTable site={s} />
              <PrioritySplitChart figures={s.figures} />
            </div>
            <div className="grid gap-3 xl:grid-cols-2">
              <div className="space-y-1">
                <div className="flex items-baseline gap-3">
                  <h4 className="text-sm font-semibold">Ten most frequent</h4>
                  <CsvLink table="top-alarms" month={report.month} scope={report.scope} />
                </div>
                <TopAlarmsTable site={s} />
              </div>
              <div className="space-y-1">
                <div className="flex items-baseline gap-3">
                  <h4 className="text-sm font-semibold">Stale alarms</h4>
                  <CsvLink table="stale-alarms" month={report.month} scope={report.scope} />
                </div>
                <StaleAlarmsTable site={s} now={report.generatedAt} />
              </div>
            </div>
          </div>
        ))}
      </section>
      <AirQualityReportSection sites={report.airQuality} />
    </div>
  );
}
