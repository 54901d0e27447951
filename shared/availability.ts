import { z } from "zod";
import type { AlarmLoadFigures, BenchmarkResult } from "./alarm-load";
import { tripCodeInfo, tripCodeLabel } from "./trip-codes";
import type { RunState } from "./telemetry";

// The availability model of the monthly report. Every second of a compressor's month falls in exactly one of five
// states, from the 1-minute and 1-hour rollups (covered_s, run_s, tripped_s) and the planned-service record:
//
//   running   motor on                                     up, operating
//   standby   data present, not running, not tripped       up, not operating (ready; includes an operator's stop)
//   fault     the machine reports its tripped state        down (unplanned)
//   planned   inside a recorded planned-service interval   down (planned) — takes precedence over the other four
//   no data   no reading covers the time                   never counted as up
//
// Terms follow IEC 60050-192:2015 (International Electrotechnical Vocabulary, dependability); see `availabilityTerms`.

export type RollupSums = { coveredS: number; runS: number; trippedS: number };
export const zeroSums: RollupSums = { coveredS: 0, runS: 0, trippedS: 0 };

export type TimeSplit = {
  periodS: number;
  runningS: number;
  standbyS: number;
  faultS: number;
  plannedS: number;
  noDataS: number;
};

export const zeroSplit: TimeSplit = { periodS: 0, runningS: 0, standbyS: 0, faultS: 0, plannedS: 0, noDataS: 0 };

/** Running, standby and fault seconds of some rollup sums; tripped time is never also counted as running. */
function states(s: RollupSums): { running: number; standby: number; fault: number } {
  const covered = Math.max(0, s.coveredS);
  const fault = Math.min(Math.max(0, s.trippedS), covered);
  const running = Math.min(Math.max(0, s.runS), covered - fault);
  return { running, standby: covered - fault - running, fault };
}

/**
 * Splits a period into the five states. `all` sums the rollups over the whole period; `planned.inside` sums them over
 * the part of the period inside planned-service intervals (`planned.plannedS` long), which is counted as planned
 * service whatever the machine reported then.
 */
export function splitTime(periodS: number, all: RollupSums, planned: { plannedS: number; inside: RollupSums } = { plannedS: 0, inside: zeroSums }): TimeSplit {
  const a = states(all);
  const p = states(planned.inside);
  const plannedS = Math.min(Math.max(0, planned.plannedS), periodS);
  const runningS = Math.max(0, a.running - p.running);
  const standbyS = Math.max(0, a.standby - p.standby);
  const faultS = Math.max(0, a.fault - p.fault);
  const noDataS = Math.max(0, periodS - runningS - standbyS - faultS - plannedS);
  return { periodS, runningS, standbyS, faultS, plannedS, noDataS };
}

export function addSplits(a: TimeSplit, b: TimeSplit): TimeSplit {
  return {
    periodS: a.periodS + b.periodS,
    runningS: a.runningS + b.runningS,
    standbyS: a.standbyS + b.standbyS,
    faultS: a.faultS + b.faultS,
    plannedS: a.plannedS + b.plannedS,
    noDataS: a.noDataS + b.noDataS,
  };
}

export const sumSplits = (splits: readonly TimeSplit[]): TimeSplit => splits.reduce(addSplits, zeroSplit);

export type AvailabilityFigures = {
  upS: number;
  /** Fault + planned service. */
  downS: number;
  /**
   * Up time / period: planned service and time without data count against it. Null — "no data", never 0 % — for an
   * empty period or one with neither a reading nor planned service in it.
   */
  availability: number | null;
  /** Up time / (period − planned service): planned service left out of the reckoning. Null like `availability`. */
  availabilityExPlanned: number | null;
  /** Share of the period with readings or a planned-service record. */
  coverage: number | null;
};

/** Some reading or planned-service record covers at least a second of the period. */
export const hasData = (s: TimeSplit): boolean => s.periodS - s.noDataS >= 1;

/** What a figure shows when there was nothing to compute it from: never 0 %. */
export const NO_DATA = "no data";

export function availabilityOf(s: TimeSplit): AvailabilityFigures {
  const upS = s.runningS + s.standbyS;
  const exPlanned = s.periodS - s.plannedS;
  const known = hasData(s);
  return {
    upS,
    downS: s.faultS + s.plannedS,
    availability: known && s.periodS > 0 ? upS / s.periodS : null,
    availabilityExPlanned: known && exPlanned > 0 ? upS / exPlanned : null,
    coverage: s.periodS > 0 ? (s.periodS - s.noDataS) / s.periodS : null,
  };
}

/**
 * Time per failure (null without failures). On running time it estimates IEV 192-05-13, mean operating time between
 * failures; on up time (running + standby) it estimates the mean up time (MUT). The report gives both, labelled.
 */
export function mtbfSeconds(operatingS: number, failures: number): number | null {
  return failures > 0 ? operatingS / failures : null;
}

/** IEV 192-07-23: mean time to restoration = mean of the restoration times (null without a restoration). */
export function mttrSeconds(restorationS: readonly number[]): number | null {
  return restorationS.length ? restorationS.reduce((a, b) => a + b, 0) / restorationS.length : null;
}

/** A trip counts as a failure unless the machine says an operator caused it (emergency stop). */
export function isFailureTrip(tripCode: number | null | undefined): boolean {
  return tripCodeInfo(tripCode)?.category !== "operator";
}

export type OutageKind = "trip" | "comms" | "planned";

export type Outage = {
  kind: OutageKind;
  compressorId: number;
  start: number;
  /** Null while it continues. */
  end: number | null;
  tripCode: number | null;
  cause: string;
  /** Counts as a failure for MTBF and MTTR. */
  failure: boolean;
};

export type StateEvent = {
  ts: number;
  compressorId: number;
  kind: "comms_lost" | "comms_restored" | "state" | "trip";
  runState: RunState | null;
  tripCode: number | null;
  text: string;
};

export function tripCause(tripCode: number | null): string {
  return tripCode == null ? "Trip (no code reported)" : `Trip ${tripCode}: ${tripCodeLabel(tripCode)}`;
}

/**
 * Trip outages of one compressor from its machine-reported events, oldest first: a trip (or a state event saying
 * tripped) opens one, the next state event with any other run state (the reset) closes it. Comms losses pair
 * comms_lost with the next comms_restored. Events must be sorted by time.
 */
export function pairDeviceEvents(events: readonly StateEvent[]): Outage[] {
  const out: Outage[] = [];
  let trip: Outage | null = null;
  let comms: Outage | null = null;
  for (const e of events) {
    if (e.kind === "trip" || (e.kind === "state" && e.runState === "tripped")) {
      if (!trip) {
        trip = { kind: "trip", compressorId: e.compressorId, start: e.ts, end: null, tripCode: e.tripCode, cause: "", failure: true };
        out.push(trip);
      } else if (trip.tripCode == null && e.tripCode != null) {
        trip.tripCode = e.tripCode;
      }
    } else if (e.kind === "state" && e.runState !== null) {
      if (trip) {
        trip.end = e.ts;
        trip = null;
      }
    } else if (e.kind === "comms_lost") {
      if (!comms) {
        comms = { kind: "comms", compressorId: e.compressorId, start: e.ts, end: null, tripCode: null, cause: "Communication lost", failure: false };
        out.push(comms);
      }
    } else if (e.kind === "comms_restored") {
      if (comms) {
        comms.end = e.ts;
        comms = null;
      }
    }
  }
  for (const o of out) {
    if (o.kind === "trip") {
      o.cause = tripCause(o.tripCode);
      o.failure = isFailureTrip(o.tripCode);
    }
  }
  return out;
}

/** How each MTBF is labelled wherever it is shown (page, print, CSV, e-mail). */
export const mtbfBasis = {
  running: { label: "MTBF, running-time basis", column: "MTBF (running) h", note: "Running hours ÷ failures (IEC 60050-192, 192-05-13)" },
  up: { label: "MTBF, up-time basis", column: "MTBF (up time) h", note: "Up hours (running + standby) ÷ failures (≈ mean up time, IEC 60050-192)" },
} as const;

export type Interval = { from: number; to: number };

/** Sorted, non-overlapping union of intervals (empty ones dropped). */
export function mergeIntervals(list: readonly Interval[]): Interval[] {
  const sorted = list.filter((i) => i.to > i.from).sort((a, b) => a.from - b.from);
  const out: Interval[] = [];
  for (const i of sorted) {
    const last = out[out.length - 1];
    if (last && i.from <= last.to) last.to = Math.max(last.to, i.to);
    else out.push({ ...i });
  }
  return out;
}

/** Intervals cut to [from, to). */
export function clipIntervals(list: readonly Interval[], from: number, to: number): Interval[] {
  return list.map((i) => ({ from: Math.max(i.from, from), to: Math.min(i.to, to) })).filter((i) => i.to > i.from);
}

/**
 * Planned-service intervals from the event log's service.planned_start / service.planned_end entries of one
 * compressor, sorted by time: each start runs to the next end (or to `openUntil` when none has come yet).
 */
export function pairPlannedService(rows: readonly { ts: number; action: string }[], openUntil: number): Interval[] {
  const out: Interval[] = [];
  let start: number | null = null;
  for (const r of rows) {
    if (r.action === PLANNED_START && start === null) start = r.ts;
    else if (r.action === PLANNED_END && start !== null) {
      out.push({ from: start, to: r.ts });
      start = null;
    }
  }
  if (start !== null) out.push({ from: start, to: Math.max(start, openUntil) });
  return mergeIntervals(out);
}

export const PLANNED_START = "service.planned_start";
export const PLANNED_END = "service.planned_end";
export const NO_PLANNED_SERVICE_NOTE = "No planned service recorded.";

// ---- Report scope ----

export const reportScopeSchema = z.union([
  z.literal("fleet"),
  z.string().regex(/^site-[1-9]\d{0,9}$/),
  z.string().regex(/^compressor-[1-9]\d{0,9}$/),
]);
export type ReportScopeParam = z.infer<typeof reportScopeSchema>;

export type ReportScope = { kind: "fleet" } | { kind: "site"; siteId: number } | { kind: "compressor"; compressorId: number };

export function parseScope(param: string): ReportScope {
  const s = reportScopeSchema.parse(param);
  if (s === "fleet") return { kind: "fleet" };
  const [kind, id] = s.split("-") as ["site" | "compressor", string];
  return kind === "site" ? { kind, siteId: Number(id) } : { kind, compressorId: Number(id) };
}

export function scopeParam(s: ReportScope): string {
  return s.kind === "fleet" ? "fleet" : s.kind === "site" ? `site-${s.siteId}` : `compressor-${s.compressorId}`;
}

// ---- Links into the event log (/events takes q, site, compressor, priority, kind, from, to; times in ms) ----

export type EventsFilter = {
  site?: number;
  compressor?: number;
  kind?: string;
  priority?: string;
  q?: string;
  from?: number;
  to?: number;
};

export function eventsHref(f: EventsFilter): string {
  const p = new URLSearchParams();
  for (const k of ["q", "site", "compressor", "priority", "kind", "from", "to"] as const) {
    const v = f[k];
    if (v !== undefined && v !== "") p.set(k, String(typeof v === "number" ? Math.round(v) : v));
  }
  const qs = p.toString();
  return qs ? `/events?${qs}` : "/events";
}

// ---- Numbers as the report prints them ----

export const hoursOf = (s: number) => s / 3600;

export function formatHours(seconds: number | null | undefined, decimals = 1): string {
  if (seconds == null || !Number.isFinite(seconds)) return "—";
  return (seconds / 3600).toFixed(decimals);
}

export function formatPercent(share: number | null | undefined, decimals = 1, empty = "—"): string {
  if (share == null || !Number.isFinite(share)) return empty;
  return (share * 100).toFixed(decimals);
}

/** An availability as the report prints it: "97.25", or "no data" when nothing covered the period. */
export const formatAvailability = (share: number | null | undefined): string => formatPercent(share, 2, NO_DATA);

/** "3 h 05 min", "42 min", "2 d 04 h" */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds == null || !Number.isFinite(seconds)) return "—";
  const min = Math.round(seconds / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  if (h < 48) return `${h} h ${String(min % 60).padStart(2, "0")} min`;
  return `${Math.floor(h / 24)} d ${String(h % 24).padStart(2, "0")} h`;
}

// ---- Definitions printed on the report ----

export type Term = {
  term: string;
  /** IEC 60050-192 entry, e.g. "192-05-13". */
  iev?: string;
  /** How the IEV entry number was checked. */
  ievNote?: string;
  definition: string;
};

const IEV_SECONDARY = "entry number as cited in secondary sources; not checked against the IEV text";
const IEV_MEMORY = "entry number from memory";

export const availabilityTerms: readonly Term[] = [
  {
    term: "Period",
    definition:
      "The calendar month in the site's own time zone, from local midnight on the 1st to local midnight on the 1st of the next month. A month with a daylight-saving change has one hour fewer or more than its days × 24 (e.g. 743 h or 745 h); the report states it. Fleet figures add each site's own month.",
  },
  {
    term: "Running (operating time)",
    iev: "192-02-05",
    ievNote: IEV_MEMORY,
    definition: "Time with the motor on, from the rollups' run seconds. This is the operating time used for MTBF.",
  },
  {
    term: "Standby (ready)",
    definition:
      "Time with readings, not running and not tripped: the compressor could start when asked (waiting for the bank pressure to fall, or stopped by an operator without a fault).",
  },
  {
    term: "Up time",
    iev: "192-02-02",
    ievNote: IEV_MEMORY,
    definition: "Running + standby: time in an up state, able to perform as required.",
  },
  {
    term: "Down for fault / trip",
    definition:
      "Time the machine itself reports its tripped state (its own protective shutdown, until reset). Unplanned down time.",
  },
  {
    term: "Down for planned service",
    definition:
      "Time inside a planned-service interval recorded in the event log (service.planned_start to service.planned_end). It takes precedence over what the machine reported then. Shown on its own line; 0 h when none is recorded.",
  },
  {
    term: "Down time",
    iev: "192-02-21",
    ievNote: IEV_MEMORY,
    definition: "Fault + planned service: time in a down state.",
  },
  {
    term: "No data (offline)",
    definition:
      "Time no reading covers (a gap of more than 2 minutes between readings is not bridged). It is never counted as up time, so availability is a lower bound when data coverage is below 100 %. A month, day or compressor with no data at all shows “no data”, never 0 %.",
  },
  {
    term: "Availability",
    iev: "192-08-05",
    ievNote: `mean availability; ${IEV_SECONDARY}`,
    definition:
      "Up time ÷ period, with planned service and time without data counted against it. Also given with planned service excluded: up time ÷ (period − planned service).",
  },
  {
    term: "Failure",
    iev: "192-03-01",
    ievNote: IEV_MEMORY,
    definition:
      "A trip reported by the machine. An emergency stop (an operator's trip) is down time but not a failure.",
  },
  {
    term: "MTBF, running-time basis",
    iev: "192-05-13",
    ievNote: `mean operating time between failures; ${IEV_SECONDARY}`,
    definition:
      "Operating (running) time in the period ÷ number of failures that began in it: the wear-related figure, comparable between a busy and an idle compressor. Not given without failures.",
  },
  {
    term: "MTBF, up-time basis",
    ievNote: "mean up time (MUT), “the expectation of the up time” (ITU-T E.800, from the IEV); entry number not checked",
    definition:
      "Up time (running + standby) in the period ÷ number of failures that began in it: how long the compressor stayed available between failures. For a compressor that spends most of its up time in standby it is several times the running-time figure. Not given without failures.",
  },
  {
    term: "MTTR",
    iev: "192-07-23",
    ievNote: `mean time to restoration; ${IEV_SECONDARY}`,
    definition:
      "Mean of the times from a failure (trip) to restoration (the machine reports a state other than tripped, i.e. the trip was reset), for failures that began in the period and have been restored. It includes waiting, repair and any time without data in between.",
  },
  {
    term: "Longest outage",
    definition: "The longest trip-to-reset interval that overlaps the month, at its full length (it may begin before or end after the month).",
  },
  {
    term: "Run hours",
    definition: "Running time observed in the rollups. The hour meter's advance over the month is shown beside it; it also counts running the rollups did not see.",
  },
  {
    term: "Starts",
    definition: "Increase of the machine's cumulative start counter over the month. Starts per running hour = starts ÷ run hours.",
  },
];

export const AVAILABILITY_SOURCES =
  "Terms: IEC 60050-192:2015, International Electrotechnical Vocabulary — Part 192: Dependability. MTBF estimate (operating time ÷ failures): NIST/SEMATECH e-Handbook of Statistical Methods, §8.4.5.1.";

// ---- The report as the API, the page, the print view, the CSV export and the e-mail see it ----

export type SitePeriod = {
  siteId: number;
  siteName: string;
  siteCode: string;
  timeZone: string;
  month: string;
  from: number;
  to: number;
  monthEnd: number;
  partial: boolean;
  hours: number;
  nominalHours: number;
  offsetAtStart: string;
  offsetAtEnd: string;
  /** Set when the month is not days × 24 hours long. */
  lengthNote: string | null;
  /** Operator positions for the alarm load. */
  positions: number;
};

export type OutageSummary = { compressorId: number; start: number; end: number | null; durationS: number; cause: string };

export type AvailabilityRow = {
  level: "compressor" | "site" | "fleet";
  /** "c-12", "s-3", "fleet" */
  key: string;
  compressorId: number | null;
  siteId: number | null;
  name: string;
  siteName: string | null;
  timeZone: string | null;
  inService: boolean | null;
  split: TimeSplit;
  figures: AvailabilityFigures;
  hourMeterAdvanceH: number | null;
  starts: number | null;
  startsPerRunHour: number | null;
  failures: number;
  restorations: number;
  /** MTBF on running (operating) time: running ÷ failures. */
  mtbfS: number | null;
  /** MTBF on up time: (running + standby) ÷ failures. */
  mtbfUpS: number | null;
  mttrS: number | null;
  longestOutage: OutageSummary | null;
  /** Trips still not reset at the end of the period. */
  openTrips: number;
};

export type DailyRow = {
  date: string;
  /** Earliest start and latest end of that local date across the sites in scope, UTC ms. */
  from: number;
  to: number;
  periodS: number;
  runningS: number;
  standbyS: number;
  faultS: number;
  plannedS: number;
  noDataS: number;
  availability: number | null;
};

export type CauseRow = {
  key: string;
  kind: "trip" | "planned" | "nodata";
  cause: string;
  tripCode: number | null;
  seconds: number;
  /** Outages behind it (trips of that code, planned intervals, comms losses). */
  outages: number;
};

export type OutageRow = {
  id: string;
  kind: OutageKind;
  compressorId: number;
  compressorName: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  start: number;
  end: number | null;
  /** Full length (to `generatedAt` while it continues). */
  durationS: number;
  /** The part inside the period. */
  inPeriodS: number;
  cause: string;
  tripCode: number | null;
  failure: boolean;
};

export type AlarmLoadSite = {
  siteId: number;
  siteName: string;
  timeZone: string;
  from: number;
  to: number;
  figures: AlarmLoadFigures;
  results: BenchmarkResult[];
};

export type MonthlyReport = {
  month: string;
  scope: string;
  scopeLabel: string;
  scopeKind: ReportScope["kind"];
  organisation: string | null;
  generatedAt: number;
  periods: SitePeriod[];
  /** Compressor rows, then site rows, then the fleet row, as the scope has them. */
  rows: AvailabilityRow[];
  /** The scope's own total (fleet, site or compressor row). */
  total: AvailabilityRow;
  daily: DailyRow[];
  causes: CauseRow[];
  outages: OutageRow[];
  plannedService: { recorded: boolean; note: string };
  alarmLoad: AlarmLoadSite[];
};

export type ComparisonRow = {
  month: string;
  partial: boolean;
  /** Shortest and longest month among the scope's sites (they differ when the sites' zones change clocks on different days). */
  hoursMin: number;
  hoursMax: number;
  split: TimeSplit;
  figures: AvailabilityFigures;
  starts: number | null;
  failures: number;
  mtbfS: number | null;
  mtbfUpS: number | null;
  mttrS: number | null;
  alarms: number;
  alarmsPerHour: number | null;
};

export type ComparisonReport = { scope: string; scopeLabel: string; months: ComparisonRow[]; generatedAt: number };

/** Query string of every report route: ?month=yyyy-mm&scope=fleet|site-<id>|compressor-<id>. */
export const reportQuerySchema = z.object({
  month: z.string().regex(/^(19|20|21)\d{2}-(0[1-9]|1[0-2])$/, "A month as yyyy-mm"),
  scope: reportScopeSchema.default("fleet"),
});
export type ReportQuery = z.infer<typeof reportQuerySchema>;

export const csvTables = ["availability", "daily", "downtime", "outages", "alarm-load", "top-alarms", "stale-alarms", "comparison"] as const;
export type CsvTable = (typeof csvTables)[number];
export const csvTableSchema = z.enum(csvTables);

export function reportCsvHref(table: CsvTable, month: string, scope: string): string {
  return `/api/reports/csv/${table}?month=${encodeURIComponent(month)}&scope=${encodeURIComponent(scope)}`;
}

export function reportHref(month: string, scope: string, print = false): string {
  return `/reports${print ? "/print" : ""}?month=${encodeURIComponent(month)}&scope=${encodeURIComponent(scope)}`;
}
