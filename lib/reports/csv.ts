import { NO_DATA, type AlarmLoadSite, type ComparisonReport, type CsvTable, type MonthlyReport, type TimeSplit } from "@/shared/availability";
import { alarmBenchmarks, priorityLevel } from "@/shared/alarm-load";
import { csvText } from "@/shared/csv";
import { localDateTime } from "@/shared/month";

// Every table of the report as CSV: one header row, comma-separated, RFC 4180 quoting, UTF-8 with a byte-order
// mark (so spreadsheet programs read the degree and minus signs). Hours and percentages as plain numbers;
// times both in the site's zone and in UTC.

type Cell = string | number | boolean | null | undefined;

function cell(v: Cell): string {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(Math.round(v * 1000) / 1000) : "";
  return typeof v === "boolean" ? String(v) : csvText(v);
}

export function toCsv(header: readonly string[], rows: readonly (readonly Cell[])[]): string {
  return "\uFEFF" + [header, ...rows].map((r) => r.map(cell).join(",")).join("\r\n") + "\r\n";
}

const h = (s: number) => s / 3600;
const pct = (x: number | null) => (x == null ? null : x * 100);
/** An availability: "no data" rather than an empty cell or 0 when nothing covered the period. */
const availabilityPct = (x: number | null) => (x == null ? NO_DATA : x * 100);
const iso = (ts: number | null) => (ts == null ? null : new Date(ts).toISOString());

const splitHeader = ["period_h", "running_h", "standby_h", "fault_h", "planned_service_h", "no_data_h"];
const splitCells = (s: TimeSplit): Cell[] => [h(s.periodS), h(s.runningS), h(s.standbyS), h(s.faultS), h(s.plannedS), h(s.noDataS)];

function alarmSites(r: MonthlyReport): AlarmLoadSite[] {
  return r.alarmLoad;
}

export function reportCsv(table: Exclude<CsvTable, "comparison">, r: MonthlyReport): string {
  switch (table) {
    case "availability":
      return toCsv(
        [
          "level",
          "name",
          "site",
          "time_zone",
          ...splitHeader,
          "availability_pct",
          "availability_ex_planned_pct",
          "data_coverage_pct",
          "run_h",
          "hour_meter_advance_h",
          "starts",
          "starts_per_run_h",
          "failures",
          "restorations",
          "mtbf_running_h",
          "mtbf_up_h",
          "mttr_h",
          "longest_outage_h",
          "open_trips",
        ],
        r.rows.map((x) => [
          x.level,
          x.name,
          x.siteName,
          x.timeZone,
          ...splitCells(x.split),
          availabilityPct(x.figures.availability),
          availabilityPct(x.figures.availabilityExPlanned),
          pct(x.figures.coverage),
          h(x.split.runningS),
          x.hourMeterAdvanceH,
          x.starts,
          x.startsPerRunHour,
          x.failures,
          x.restorations,
          x.mtbfS == null ? null : h(x.mtbfS),
          x.mtbfUpS == null ? null : h(x.mtbfUpS),
          x.mttrS == null ? null : h(x.mttrS),
          x.longestOutage ? h(x.longestOutage.durationS) : null,
          x.openTrips,
        ]),
      );
    case "daily":
      return toCsv(
        ["date", ...splitHeader, "availability_pct"],
        r.daily.map((d) => [d.date, ...splitCells(d), availabilityPct(d.availability)]),
      );
    case "downtime":
      return toCsv(
        ["cause", "kind", "trip_code", "hours", "outages"],
        r.causes.map((c) => [c.cause, c.kind, c.tripCode, h(c.seconds), c.outages]),
      );
    case "outages":
      return toCsv(
        ["kind", "compressor", "site", "time_zone", "start_local", "end_local", "start_utc", "end_utc", "duration_h", "in_period_h", "cause", "trip_code", "failure"],
        r.outages.map((o) => [
          o.kind,
          o.compressorName,
          o.siteName,
          o.timeZone,
          localDateTime(o.start, o.timeZone),
          o.end == null ? "ongoing" : localDateTime(o.end, o.timeZone),
          iso(o.start),
          iso(o.end),
          h(o.durationS),
          h(o.inPeriodS),
          o.cause,
          o.tripCode,
          o.failure,
        ]),
      );
    case "alarm-load":
      return toCsv(
        ["site", "time_zone", "operator_positions", "alarms", "metric", "value", "verdict", "target", "source", "from_memory"],
        alarmSites(r).flatMap((s) =>
          s.results.map((res) => {
            const b = alarmBenchmarks.find((x) => x.id === res.id)!;
            return [s.siteName, s.timeZone, s.figures.positions, s.figures.alarms, b.metric, res.value, res.verdict, b.target, b.source, b.fromMemory];
          }),
        ),
      );
    case "top-alarms":
      return toCsv(
        ["site", "rank", "compressor", "alarm", "priority", "isa_level", "count", "share_pct"],
        alarmSites(r).flatMap((s) =>
          s.figures.top.map((t, i) => [s.siteName, i + 1, t.compressorName, t.key, t.priority, priorityLevel[t.priority], t.count, pct(t.share)]),
        ),
      );
    case "stale-alarms":
      return toCsv(
        ["site", "compressor", "alarm", "priority", "raised_local", "cleared_local", "raised_utc", "cleared_utc", "active_h"],
        alarmSites(r).flatMap((s) =>
          s.figures.stale.map((a) => [
            s.siteName,
            a.compressorName,
            a.key,
            a.priority,
            localDateTime(a.raisedAt, s.timeZone),
            a.clearedAt == null ? "still active" : localDateTime(a.clearedAt, s.timeZone),
            iso(a.raisedAt),
            iso(a.clearedAt),
            h(((a.clearedAt ?? r.generatedAt) - a.raisedAt) / 1000),
          ]),
        ),
      );
  }
}

export function comparisonCsv(c: ComparisonReport): string {
  return toCsv(
    ["month", "partial", "hours_min", "hours_max", ...splitHeader, "availability_pct", "availability_ex_planned_pct", "data_coverage_pct", "starts", "failures", "mtbf_running_h", "mtbf_up_h", "mttr_h", "alarms", "alarms_per_site_hour"],
    c.months.map((m) => [
      m.month,
      m.partial,
      m.hoursMin,
      m.hoursMax,
      ...splitCells(m.split),
      availabilityPct(m.figures.availability),
      availabilityPct(m.figures.availabilityExPlanned),
      pct(m.figures.coverage),
      m.starts,
      m.failures,
      m.mtbfS == null ? null : h(m.mtbfS),
      m.mtbfUpS == null ? null : h(m.mtbfUpS),
      m.mttrS == null ? null : h(m.mttrS),
      m.alarms,
      m.alarmsPerHour,
    ]),
  );
}
