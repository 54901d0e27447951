import { deliveryMonthRows } from "./delivery";
import type { DeliveryMonthRow } from "@/shared/delivery-health";
import { airQualityReportSection } from "./air-quality-report";
import type { Statement } from "better-sqlite3";
import type { Priority } from "@/shared/alarm-rules";
import { priorities } from "@/shared/alarm-rules";
import {
  alarmBenchmarks,
  assessAlarmLoad,
  busiestTenMinutes,
  floodEpisodes,
  STALE_AFTER_MS,
  TEN_MINUTES_MS,
  type AlarmLoadFigures,
  type StaleAlarm,
  type TopAlarm,
} from "@/shared/alarm-load";
import {
  addSplits,
  availabilityOf,
  clipIntervals,
  hasData,
  mtbfSeconds,
  mtbfBasis,
  mttrSeconds,
  NO_DATA,
  NO_PLANNED_SERVICE_NOTE,
  pairDeviceEvents,
  pairPlannedService,
  PLANNED_END,
  PLANNED_START,
  splitTime,
  sumSplits,
  tripCause,
  zeroSplit,
  zeroSums,
  type AlarmLoadSite,
  type AvailabilityRow,
  type CauseRow,
  type ComparisonReport,
  type ComparisonRow,
  type DailyRow,
  type Interval,
  type MonthlyReport,
  type Outage,
  type OutageRow,
  type OutageSummary,
  type ReportScope,
  type RollupSums,
  type SitePeriod,
  type StateEvent,
  type TimeSplit,
  scopeParam,
} from "@/shared/availability";
import { HOUR_MS, localDateTime as localDateTimeOf, monthLabel, monthLengthNote, monthsEndingWith, monthWindow, previousMonth as previousMonthAt, type Month, type MonthWindow } from "@/shared/month";
import { SAFETY_NOTICE } from "@/shared/safety";
import type { Db } from "./client";

// The monthly report, computed from the 1-hour and 1-minute rollups, the machine's device events, the event log
// (planned service) and the alarms table — never from raw readings. Sums run in SQL: one statement adds up every
// (compressor, day) interval, whole hours from readings_1h and the minutes at either end from readings_1m.

const MINUTE_MS = 60_000;

const statements = new WeakMap<Db, Map<string, Statement>>();

function prepared(db: Db, sql: string): Statement {
  let byDb = statements.get(db);
  if (!byDb) statements.set(db, (byDb = new Map()));
  let s = byDb.get(sql);
  if (!s) {
    s = db.$client.prepare(sql);
    byDb.set(sql, s);
  }
  return s;
}

const all = <T>(db: Db, sql: string, ...params: unknown[]): T[] => prepared(db, sql).all(...params) as T[];
const one = <T>(db: Db, sql: string, ...params: unknown[]): T | undefined => prepared(db, sql).get(...params) as T | undefined;

// ---------------------------------------------------------------- scope

export type ScopeSite = { id: number; name: string; code: string; timeZone: string };
export type ScopeCompressor = { id: number; name: string; siteId: number; inService: boolean };
export type ResolvedScope = { scope: ReportScope; label: string; sites: ScopeSite[]; compressors: ScopeCompressor[] };

/**
 * The sites and compressors a report covers, limited to the person's sites (null = every site). A site or
 * compressor outside them answers like one that does not exist: null.
 */
export function resolveReportScope(db: Db, scope: ReportScope, siteIds: number[] | null): ResolvedScope | null {
  const visible = all<ScopeSite>(db, "SELECT id, name, code, time_zone AS timeZone FROM sites ORDER BY name, id").filter(
    (s) => siteIds === null || siteIds.includes(s.id),
  );
  const compressors = all<{ id: number; name: string; siteId: number; inService: number }>(
    db,
    "SELECT id, name, site_id AS siteId, in_service AS inService FROM compressors ORDER BY name, id",
  ).map((c) => ({ ...c, inService: c.inService === 1 }));
  const bySite = (ids: Set<number>) => compressors.filter((c) => ids.has(c.siteId));
  if (scope.kind === "fleet") {
    return { scope, label: visible.length === 1 ? visible[0]!.name : `Fleet (${visible.length} sites)`, sites: visible, compressors: bySite(new Set(visible.map((s) => s.id))) };
  }
  if (scope.kind === "site") {
    const site = visible.find((s) => s.id === scope.siteId);
    return site ? { scope, label: site.name, sites: [site], compressors: bySite(new Set([site.id])) } : null;
  }
  const c = compressors.find((x) => x.id === scope.compressorId);
  const site = c && visible.find((s) => s.id === c.siteId);
  return c && site ? { scope, label: `${c.name} (${site.name})`, sites: [site], compressors: [c] } : null;
}

// ---------------------------------------------------------------- rollup sums

export type SumInterval = { key: string; compressorId: number; from: number; to: number };

const HOUR_SUMS_SQL = `
  WITH iv AS MATERIALIZED (
    SELECT json_extract(value, '$[0]') AS k, json_extract(value, '$[1]') AS c,
           json_extract(value, '$[2]') AS f, json_extract(value, '$[3]') AS t
    FROM json_each(?)
  )
  SELECT iv.k AS k, TOTAL(r.covered_s) AS coveredS, TOTAL(r.run_s) AS runS, TOTAL(r.tripped_s) AS trippedS
  FROM iv CROSS JOIN readings_1h r ON r.compressor_id = iv.c AND r.bucket_ts >= iv.f AND r.bucket_ts < iv.t
  GROUP BY iv.k`;

// A minute bucket partly inside an interval counts in proportion to the overlap.
const MINUTE_WEIGHT = "(MIN(r.bucket_ts + 60000, iv.t) - MAX(r.bucket_ts, iv.f)) / 60000.0";
const MINUTE_SUMS_SQL = `
  WITH iv AS MATERIALIZED (
    SELECT json_extract(value, '$[0]') AS k, json_extract(value, '$[1]') AS c,
           json_extract(value, '$[2]') AS f, json_extract(value, '$[3]') AS t
    FROM json_each(?)
  )
  SELECT iv.k AS k, TOTAL(r.covered_s * ${MINUTE_WEIGHT}) AS coveredS, TOTAL(r.run_s * ${MINUTE_WEIGHT}) AS runS,
         TOTAL(r.tripped_s * ${MINUTE_WEIGHT}) AS trippedS
  FROM iv CROSS JOIN readings_1m r ON r.compressor_id = iv.c AND r.bucket_ts > iv.f - 60000 AND r.bucket_ts < iv.t
  GROUP BY iv.k`;

/**
 * Covered, run and tripped seconds of each interval: whole hours from readings_1h, the rest from readings_1m.
 * Two statements for any number of intervals.
 */
export function rollupSums(db: Db, intervals: readonly SumInterval[]): Map<string, RollupSums> {
  const hours: [string, number, number, number][] = [];
  const minutes: [string, number, number, number][] = [];
  for (const i of intervals) {
    if (i.to <= i.from) continue;
    const hf = Math.ceil(i.from / HOUR_MS) * HOUR_MS;
    const ht = Math.floor(i.to / HOUR_MS) * HOUR_MS;
    if (hf < ht) {
      hours.push([i.key, i.compressorId, hf, ht]);
      if (i.from < hf) minutes.push([i.key, i.compressorId, i.from, hf]);
      if (ht < i.to) minutes.push([i.key, i.compressorId, ht, i.to]);
    } else {
      minutes.push([i.key, i.compressorId, i.from, i.to]);
    }
  }
  const out = new Map<string, RollupSums>();
  const add = (rows: { k: string; coveredS: number; runS: number; trippedS: number }[]) => {
    for (const r of rows) {
      const prev = out.get(r.k) ?? zeroSums;
      out.set(r.k, { coveredS: prev.coveredS + r.coveredS, runS: prev.runS + r.runS, trippedS: prev.trippedS + r.trippedS });
    }
  };
  if (hours.length) add(all(db, HOUR_SUMS_SQL, JSON.stringify(hours)));
  if (minutes.length) add(all(db, MINUTE_SUMS_SQL, JSON.stringify(minutes)));
  return out;
}

// ---------------------------------------------------------------- planned service, device events, counters

const PLANNED_LOOKBACK_MS = 400 * 86_400_000;

/**
 * Planned-service intervals of one compressor within [from, to), from the event log's service entries
 * (action service.planned_start / service.planned_end, kind "service"). A start with no end yet runs to `to`.
 * This is the one place planned service is read: a service-log table can replace it later.
 */
export function plannedServiceIntervals(db: Db, compressorId: number, from: number, to: number): Interval[] {
  // +compressor_id keeps the planner on the (kind, ts) index: service entries are few, a compressor's events many.
  const rows = all<{ ts: number; action: string }>(
    db,
    `SELECT ts, action FROM events
     WHERE kind = 'service' AND ts >= ? AND ts < ? AND +compressor_id = ? AND action IN (?, ?)
     ORDER BY ts, id`,
    from - PLANNED_LOOKBACK_MS,
    to,
    compressorId,
    PLANNED_START,
    PLANNED_END,
  );
  return clipIntervals(pairPlannedService(rows, to), from, to);
}

const EVENT_COLUMNS = "ts, compressor_id AS compressorId, kind, run_state AS runState, trip_code AS tripCode, text";

/** Trip and comms outages of one compressor that overlap [from, to), each at its full length. */
export function deviceOutages(db: Db, compressorId: number, from: number, to: number): Outage[] {
  const beforeState = all<StateEvent>(
    db,
    `SELECT ${EVENT_COLUMNS} FROM device_events WHERE compressor_id = ? AND ts < ? AND kind IN ('trip', 'state')
     ORDER BY ts DESC, id DESC LIMIT 20`,
    compressorId,
    from,
  ).reverse();
  const beforeComms = all<StateEvent>(
    db,
    `SELECT ${EVENT_COLUMNS} FROM device_events WHERE compressor_id = ? AND ts < ? AND kind IN ('comms_lost', 'comms_restored')
     ORDER BY ts DESC, id DESC LIMIT 4`,
    compressorId,
    from,
  ).reverse();
  const inside = all<StateEvent>(
    db,
    `SELECT ${EVENT_COLUMNS} FROM device_events WHERE compressor_id = ? AND ts >= ? AND ts < ? ORDER BY ts, id`,
    compressorId,
    from,
    to,
  );
  const reset = one<StateEvent>(
    db,
    `SELECT ${EVENT_COLUMNS} FROM device_events
     WHERE compressor_id = ? AND ts >= ? AND kind = 'state' AND run_state IS NOT NULL AND run_state <> 'tripped'
     ORDER BY ts, id LIMIT 1`,
    compressorId,
    to,
  );
  const restored = one<StateEvent>(
    db,
    `SELECT ${EVENT_COLUMNS} FROM device_events WHERE compressor_id = ? AND ts >= ? AND kind = 'comms_restored'
     ORDER BY ts, id LIMIT 1`,
    compressorId,
    to,
  );
  const events = [...beforeState, ...beforeComms].sort((a, b) => a.ts - b.ts);
  events.push(...inside);
  if (reset) events.push(reset);
  if (restored) events.push(restored);
  return pairDeviceEvents(events).filter((o) => o.start < to && (o.end ?? Number.POSITIVE_INFINITY) > from);
}

export type Counters = { starts: number | null; hourMeterAdvanceH: number | null };

const COUNTER_SQL = (col: string, table: "readings_1m" | "readings_1h") => `
  SELECT
    (SELECT ${col} FROM ${table} WHERE compressor_id = $c AND bucket_ts < $from AND bucket_ts >= $from - 86400000
       AND ${col} IS NOT NULL ORDER BY bucket_ts DESC LIMIT 1) AS before,
    (SELECT ${col} FROM ${table} WHERE compressor_id = $c AND bucket_ts >= $from AND bucket_ts < $to
       AND ${col} IS NOT NULL ORDER BY bucket_ts LIMIT 1) AS first,
    (SELECT ${col} FROM ${table} WHERE compressor_id = $c AND bucket_ts >= $from AND bucket_ts < $to
       AND ${col} IS NOT NULL ORDER BY bucket_ts DESC LIMIT 1) AS last`;

/**
 * Advance of the start counter and the hour meter over [from, to): last value in the period minus the last value in
 * the day before it (or the first value in the period when there is none). Null when unknown or when a counter
 * went backwards (a replaced controller). From the 1-minute rollups; from the hourly ones where those have none
 * (exact for a period on whole hours).
 */
export function counterAdvance(db: Db, compressorId: number, from: number, to: number): Counters {
  const read = (col: string) => {
    const p = { c: compressorId, from, to };
    type Row = { before: number | null; first: number | null; last: number | null };
    let r = one<Row>(db, COUNTER_SQL(col, "readings_1m"), p);
    if (!r || r.last == null) r = one<Row>(db, COUNTER_SQL(col, "readings_1h"), p);
    if (!r || r.last == null) return null;
    const base = r.before ?? r.first;
    if (base == null || r.last < base) return null;
    return r.last - base;
  };
  return { starts: read("starts"), hourMeterAdvanceH: read("hour_meter_h") };
}

// ---------------------------------------------------------------- per compressor and month

type CauseAcc = { kind: CauseRow["kind"]; cause: string; tripCode: number | null; seconds: number; outages: number };

export type CompressorMonth = {
  compressor: ScopeCompressor;
  site: ScopeSite;
  window: MonthWindow;
  split: TimeSplit;
  /** Per day of the window (empty unless asked for). */
  daily: TimeSplit[];
  outages: Outage[];
  planned: Interval[];
  counters: Counters;
  /** Down time by cause (empty unless asked for). */
  causes: Map<string, CauseAcc>;
};

function subtractIntervals(base: Interval, cut: readonly Interval[]): Interval[] {
  let parts: Interval[] = [base];
  for (const c of cut) {
    parts = parts.flatMap((p) =>
      c.to <= p.from || c.from >= p.to
        ? [p]
        : [
            { from: p.from, to: Math.max(p.from, c.from) },
            { from: Math.min(p.to, c.to), to: p.to },
          ].filter((x) => x.to > x.from),
    );
  }
  return parts;
}

const overlapMs = (a: Interval, b: Interval) => Math.max(0, Math.min(a.to, b.to) - Math.max(a.from, b.from));

export function windowsFor(sites: readonly ScopeSite[], month: Month, now: number): Map<number, MonthWindow> {
  return new Map(sites.map((s) => [s.id, monthWindow(month, s.timeZone, now)]));
}

/** Everything the report needs per compressor for one month. */
export function compressorMonths(
  db: Db,
  resolved: ResolvedScope,
  month: Month,
  now: number,
  opts: { daily: boolean; causes: boolean },
): CompressorMonth[] {
  return compressorMonthsFor(db, resolved, [month], now, opts).get(month)!;
}

/**
 * Everything the report needs per compressor for several months: per compressor one read of its planned service
 * and device events over the whole span, and one pair of statements summing the rollups of every interval of every
 * month (intervals that share a key are added up in SQL).
 */
export function compressorMonthsFor(
  db: Db,
  resolved: ResolvedScope,
  months: readonly Month[],
  now: number,
  opts: { daily: boolean; causes: boolean },
): Map<Month, CompressorMonth[]> {
  const siteById = new Map(resolved.sites.map((s) => [s.id, s]));
  const windows = new Map(months.map((m) => [m, windowsFor(resolved.sites, m, now)]));
  const intervals: SumInterval[] = [];
  type Pending = Omit<CompressorMonth, "split" | "daily" | "causes"> & { month: Month; spans: { key: string; span: Interval; plannedKey: string; plannedMs: number }[]; trips: { outage: Outage; key: string }[] };
  const pending: Pending[] = [];

  for (const c of resolved.compressors) {
    const site = siteById.get(c.siteId)!;
    const ws = months.map((m) => windows.get(m)!.get(site.id)!).filter((w) => w.to > w.from);
    const spanFrom = Math.min(...ws.map((w) => w.from));
    const spanTo = Math.max(...ws.map((w) => w.to));
    const allPlanned = ws.length ? plannedServiceIntervals(db, c.id, spanFrom, spanTo) : [];
    const allOutages = ws.length ? deviceOutages(db, c.id, spanFrom, spanTo) : [];
    for (const month of months) {
      const w = windows.get(month)!.get(site.id)!;
      const live = w.to > w.from;
      const planned = clipIntervals(allPlanned, w.from, w.to);
      const outages = live ? allOutages.filter((o) => o.start < w.to && (o.end ?? Number.POSITIVE_INFINITY) > w.from) : [];
      const counters = live ? counterAdvance(db, c.id, w.from, w.to) : { starts: null, hourMeterAdvanceH: null };
      const ranges: Interval[] = opts.daily ? w.days.map((d) => ({ from: d.from, to: d.to })) : live ? [{ from: w.from, to: w.to }] : [];
      const spans = ranges.map((span, i) => {
        const key = `${month}|${c.id}|${i}`;
        const plannedKey = `${key}|p`;
        let plannedMs = 0;
        for (const p of planned) {
          const ov = { from: Math.max(p.from, span.from), to: Math.min(p.to, span.to) };
          if (ov.to > ov.from) {
            plannedMs += ov.to - ov.from;
            intervals.push({ key: plannedKey, compressorId: c.id, ...ov });
          }
        }
        intervals.push({ key, compressorId: c.id, ...span });
        return { key, span, plannedKey, plannedMs };
      });
      const trips: { outage: Outage; key: string }[] = [];
      if (opts.causes) {
        outages.forEach((o, k) => {
          if (o.kind !== "trip") return;
          // Whole minutes: a minute bucket's tripped seconds there can only belong to this trip.
          const clipped = {
            from: Math.max(Math.floor(o.start / MINUTE_MS) * MINUTE_MS, w.from),
            to: Math.min(Math.ceil((o.end ?? w.to) / MINUTE_MS) * MINUTE_MS, w.to),
          };
          if (clipped.to <= clipped.from) return;
          const key = `${month}|${c.id}|o${k}`;
          for (const seg of subtractIntervals(clipped, planned)) intervals.push({ key, compressorId: c.id, ...seg });
          trips.push({ outage: o, key });
        });
      }
      pending.push({ month, compressor: c, site, window: w, planned, outages, counters, spans, trips });
    }
  }

  const sums = rollupSums(db, intervals);
  const out = new Map<Month, CompressorMonth[]>(months.map((m) => [m, []]));
  for (const p of pending) {
    const perSpan = p.spans.map((x) =>
      splitTime((x.span.to - x.span.from) / 1000, sums.get(x.key) ?? zeroSums, {
        plannedS: x.plannedMs / 1000,
        inside: x.plannedMs > 0 ? (sums.get(x.plannedKey) ?? zeroSums) : zeroSums,
      }),
    );
    const split = perSpan.reduce(addSplits, zeroSplit);
    const causes = new Map<string, CauseAcc>();
    if (opts.causes) {
      let attributed = 0;
      for (const o of p.outages) {
        if (o.kind !== "comms") continue;
        const acc = causes.get("nodata") ?? { kind: "nodata", cause: "No data (offline)", tripCode: null, seconds: 0, outages: 0 };
        acc.outages++;
        causes.set("nodata", acc);
      }
      for (const { outage: o, key } of p.trips) {
        const tripped = (sums.get(key) ?? zeroSums).trippedS;
        const causeKey = `trip:${o.tripCode ?? "none"}`;
        const acc = causes.get(causeKey) ?? { kind: "trip", cause: tripCause(o.tripCode), tripCode: o.tripCode, seconds: 0, outages: 0 };
        acc.seconds += tripped;
        acc.outages++;
        causes.set(causeKey, acc);
        attributed += tripped;
      }
      const unattributed = split.faultS - attributed;
      if (unattributed > 60) {
        causes.set("trip:unrecorded", { kind: "trip", cause: "Trip (no trip event recorded)", tripCode: null, seconds: unattributed, outages: 0 });
      }
      if (split.plannedS > 0) causes.set("planned", { kind: "planned", cause: "Planned service", tripCode: null, seconds: split.plannedS, outages: p.planned.length });
      const nd = causes.get("nodata") ?? { kind: "nodata", cause: "No data (offline)", tripCode: null, seconds: 0, outages: 0 };
      nd.seconds = split.noDataS;
      if (nd.seconds > 0 || nd.outages > 0) causes.set("nodata", nd);
    }
    out.get(p.month)!.push({
      compressor: p.compressor,
      site: p.site,
      window: p.window,
      split,
      daily: opts.daily ? perSpan : [],
      outages: p.outages,
      planned: p.planned,
      counters: p.counters,
      causes,
    });
  }
  return out;
}

// ---------------------------------------------------------------- rows

function failuresOf(cm: CompressorMonth): { failures: number; restorations: number[] } {
  const { from, to } = cm.window;
  const failed = cm.outages.filter((o) => o.kind === "trip" && o.failure && o.start >= from && o.start < to);
  return { failures: failed.length, restorations: failed.filter((o) => o.end !== null).map((o) => (o.end! - o.start) / 1000) };
}

function longestOf(cms: readonly CompressorMonth[], now: number): OutageSummary | null {
  let best: OutageSummary | null = null;
  for (const cm of cms) {
    for (const o of cm.outages) {
      if (o.kind !== "trip") continue;
      const durationS = ((o.end ?? now) - o.start) / 1000;
      if (!best || durationS > best.durationS) best = { compressorId: o.compressorId, start: o.start, end: o.end, durationS, cause: o.cause };
    }
  }
  return best;
}

const sumOrNull = (xs: (number | null)[]) => (xs.some((x) => x != null) ? xs.reduce<number>((a, b) => a + (b ?? 0), 0) : null);

function rowOf(
  level: AvailabilityRow["level"],
  key: string,
  ids: { compressorId: number | null; siteId: number | null; name: string; siteName: string | null; timeZone: string | null; inService: boolean | null },
  cms: readonly CompressorMonth[],
  now: number,
): AvailabilityRow {
  const split = sumSplits(cms.map((c) => c.split));
  const f = cms.map(failuresOf);
  const failures = f.reduce((a, b) => a + b.failures, 0);
  const restorations = f.flatMap((x) => x.restorations);
  const starts = sumOrNull(cms.map((c) => c.counters.starts));
  // Per running hour of the compressors whose start counter is known.
  const runH = cms.reduce((a, c) => a + (c.counters.starts != null ? c.split.runningS : 0), 0) / 3600;
  return {
    level,
    key,
    ...ids,
    split,
    figures: availabilityOf(split),
    hourMeterAdvanceH: sumOrNull(cms.map((c) => c.counters.hourMeterAdvanceH)),
    starts,
    startsPerRunHour: starts != null && runH > 0 ? starts / runH : null,
    failures,
    restorations: restorations.length,
    mtbfS: mtbfSeconds(split.runningS, failures),
    mtbfUpS: mtbfSeconds(split.runningS + split.standbyS, failures),
    mttrS: mttrSeconds(restorations),
    longestOutage: longestOf(cms, now),
    openTrips: cms.reduce((a, c) => a + c.outages.filter((o) => o.kind === "trip" && o.end === null).length, 0),
  };
}

function availabilityRows(resolved: ResolvedScope, cms: readonly CompressorMonth[], now: number): { rows: AvailabilityRow[]; total: AvailabilityRow } {
  const rows: AvailabilityRow[] = [];
  const compressorRow = (cm: CompressorMonth) =>
    rowOf(
      "compressor",
      `c-${cm.compressor.id}`,
      { compressorId: cm.compressor.id, siteId: cm.site.id, name: cm.compressor.name, siteName: cm.site.name, timeZone: cm.site.timeZone, inService: cm.compressor.inService },
      [cm],
      now,
    );
  const siteRow = (s: ScopeSite) =>
    rowOf(
      "site",
      `s-${s.id}`,
      { compressorId: null, siteId: s.id, name: s.name, siteName: s.name, timeZone: s.timeZone, inService: null },
      cms.filter((c) => c.site.id === s.id),
      now,
    );
  if (resolved.scope.kind === "compressor") {
    const row = compressorRow(cms[0]!);
    return { rows: [row], total: row };
  }
  rows.push(...cms.map(compressorRow));
  if (resolved.scope.kind === "site") {
    const total = siteRow(resolved.sites[0]!);
    rows.push(total);
    return { rows, total };
  }
  rows.push(...resolved.sites.map(siteRow));
  const total = rowOf("fleet", "fleet", { compressorId: null, siteId: null, name: "Fleet", siteName: null, timeZone: null, inService: null }, cms, now);
  rows.push(total);
  return { rows, total };
}

function dailyRows(cms: readonly CompressorMonth[]): DailyRow[] {
  const byDate = new Map<string, { split: TimeSplit; from: number; to: number }>();
  for (const cm of cms) {
    cm.window.days.forEach((d, i) => {
      const s = cm.daily[i];
      if (!s) return;
      const prev = byDate.get(d.date);
      byDate.set(d.date, {
        split: addSplits(prev?.split ?? zeroSplit, s),
        from: Math.min(prev?.from ?? d.from, d.from),
        to: Math.max(prev?.to ?? d.to, d.to),
      });
    });
  }
  return [...byDate.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([date, x]) => ({ date, from: x.from, to: x.to, ...x.split, availability: availabilityOf(x.split).availability }));
}

function causeRows(cms: readonly CompressorMonth[]): CauseRow[] {
  const acc = new Map<string, CauseRow>();
  for (const cm of cms) {
    for (const [key, c] of cm.causes) {
      const prev = acc.get(key);
      if (prev) {
        prev.seconds += c.seconds;
        prev.outages += c.outages;
      } else acc.set(key, { key, ...c });
    }
  }
  const order = { trip: 0, planned: 1, nodata: 2 } as const;
  return [...acc.values()].sort((a, b) => order[a.kind] - order[b.kind] || b.seconds - a.seconds);
}

function outageRows(cms: readonly CompressorMonth[], now: number): OutageRow[] {
  const rows: OutageRow[] = [];
  for (const cm of cms) {
    const { from, to } = cm.window;
    const base = { compressorId: cm.compressor.id, compressorName: cm.compressor.name, siteId: cm.site.id, siteName: cm.site.name, timeZone: cm.site.timeZone };
    cm.outages.forEach((o) => {
      const end = o.end ?? now;
      rows.push({
        ...base,
        id: `${o.kind}-${cm.compressor.id}-${o.start}`,
        kind: o.kind,
        start: o.start,
        end: o.end,
        durationS: (end - o.start) / 1000,
        inPeriodS: overlapMs({ from: o.start, to: end }, { from, to }) / 1000,
        cause: o.cause,
        tripCode: o.tripCode,
        failure: o.kind === "trip" && o.failure,
      });
    });
    cm.planned.forEach((p) =>
      rows.push({
        ...base,
        id: `planned-${cm.compressor.id}-${p.from}`,
        kind: "planned",
        start: p.from,
        end: p.to,
        durationS: (p.to - p.from) / 1000,
        inPeriodS: overlapMs(p, { from, to }) / 1000,
        cause: "Planned service",
        tripCode: null,
        failure: false,
      }),
    );
  }
  return rows.sort((a, b) => a.start - b.start || a.compressorName.localeCompare(b.compressorName));
}

// ---------------------------------------------------------------- alarm load

/** Operator positions per site, from the setting reports.operator_positions ({"<siteId>": n}); 1 unless configured. */
export function operatorPositions(db: Db): (siteId: number) => number {
  const row = one<{ value: string }>(db, "SELECT value FROM settings WHERE key = 'reports.operator_positions'");
  let map: Record<string, unknown> = {};
  try {
    const parsed: unknown = row ? JSON.parse(row.value) : {};
    if (parsed && typeof parsed === "object") map = parsed as Record<string, unknown>;
  } catch {
    map = {};
  }
  return (siteId) => {
    const v = map[String(siteId)];
    return typeof v === "number" && Number.isInteger(v) && v >= 1 ? v : 1;
  };
}

/** The organisation's name for reports: setting organisation.name, else AIRKEEP_ORGANISATION; null when neither is set. */
export function organisationName(db: Db): string | null {
  const row = one<{ value: string }>(db, "SELECT value FROM settings WHERE key = 'organisation.name'");
  return row?.value.trim() || process.env.AIRKEEP_ORGANISATION?.trim() || null;
}

/** Alarm-system load of one site over [from, to) (days: for the stale count per day), against ISA-18.2 / EEMUA 191. */
export function alarmLoad(
  db: Db,
  siteId: number,
  window: { from: number; to: number; days: readonly Interval[] },
  positions: number,
  now: number,
  opts: { compressorId?: number } = {},
): AlarmLoadFigures {
  const { from, to } = window;
  const periodS = Math.max(0, (to - from) / 1000);
  const only = opts.compressorId ? " AND compressor_id = $c" : "";
  const p = { site: siteId, from, to, c: opts.compressorId ?? null };
  const byPriority = Object.fromEntries(priorities.map((x) => [x, 0])) as Record<Priority, number>;
  for (const r of all<{ priority: Priority; n: number }>(
    db,
    `SELECT priority, COUNT(*) AS n FROM alarms WHERE site_id = $site AND raised_at >= $from AND raised_at < $to${only} GROUP BY priority`,
    p,
  )) {
    byPriority[r.priority] = r.n;
  }
  const alarms = priorities.reduce((a, x) => a + byPriority[x], 0);
  // Raise times from 10 minutes before the period, so the flood rate at its start is right.
  const times = prepared(db, `SELECT raised_at FROM alarms WHERE site_id = $site AND raised_at >= $from - ${TEN_MINUTES_MS} AND raised_at < $to${only} ORDER BY raised_at`)
    .pluck()
    .all(p) as number[];
  const floods = floodEpisodes(times, from, to, positions);
  const floodS = floods.reduce((a, e) => a + (e.end - e.start), 0) / 1000;
  const peak = busiestTenMinutes(times.filter((t) => t >= from));
  const topRows = all<{ compressorId: number; compressorName: string; key: string; priority: Priority; n: number }>(
    db,
    `SELECT a.compressor_id AS compressorId, COALESCE(c.name, '#' || a.compressor_id) AS compressorName, a.key AS key,
            a.priority AS priority, COUNT(*) AS n, MAX(a.raised_at) AS lastAt
     FROM alarms a LEFT JOIN compressors c ON c.id = a.compressor_id
     WHERE a.site_id = $site AND a.raised_at >= $from AND a.raised_at < $to${only.replace("compressor_id", "a.compressor_id")}
     GROUP BY a.compressor_id, a.key ORDER BY n DESC, a.compressor_id, a.key LIMIT 10`,
    p,
  );
  const top: TopAlarm[] = topRows.map((r) => ({
    compressorId: r.compressorId,
    compressorName: r.compressorName,
    key: r.key,
    priority: r.priority,
    count: r.n,
    share: alarms ? r.n / alarms : 0,
  }));
  const chatter = one<{ occurrences: number; distinct: number }>(
    db,
    `SELECT COUNT(*) AS occurrences, COUNT(DISTINCT compressor_id || ':' || key) AS "distinct" FROM alarms
     WHERE site_id = $site AND raised_at >= $from AND raised_at < $to AND chattering = 1${only}`,
    p,
  ) ?? { occurrences: 0, distinct: 0 };
  const stale = all<StaleAlarm>(
    db,
    `SELECT a.id AS alarmId, a.compressor_id AS compressorId, COALESCE(c.name, '#' || a.compressor_id) AS compressorName,
            a.key AS key, a.priority AS priority, a.raised_at AS raisedAt, a.cleared_at AS clearedAt
     FROM alarms a LEFT JOIN compressors c ON c.id = a.compressor_id
     WHERE a.site_id = $site AND a.raised_at < $to - ${STALE_AFTER_MS}
       AND COALESCE(a.cleared_at, $now) > a.raised_at + ${STALE_AFTER_MS}
       AND COALESCE(a.cleared_at, $now) > $from${only.replace("compressor_id", "a.compressor_id")}
     ORDER BY a.raised_at LIMIT 5000`,
    { ...p, now },
  );
  let staleMaxOnOneDay = 0;
  for (const d of window.days) {
    const n = stale.filter((s) => s.raisedAt + STALE_AFTER_MS < d.to && (s.clearedAt ?? now) > d.from).length;
    staleMaxOnOneDay = Math.max(staleMaxOnOneDay, n);
  }
  const hours = periodS / 3600;
  return {
    siteId,
    positions,
    periodS,
    alarms,
    perHour: hours > 0 ? alarms / hours / positions : 0,
    perDay: hours > 0 ? (alarms / hours) * 24 / positions : 0,
    floods: floods.length,
    floodS,
    floodShare: periodS > 0 ? floodS / periodS : 0,
    peakTenMinute: peak.count,
    peakTenMinuteAt: peak.at,
    top,
    topShare: alarms ? top.reduce((a, t) => a + t.count, 0) / alarms : null,
    chatteringOccurrences: chatter.occurrences,
    chatteringAlarms: chatter.distinct,
    staleAlarms: stale.length,
    staleMaxOnOneDay,
    stale: stale.slice(0, 100),
    byPriority,
    priorityShare: alarms ? (Object.fromEntries(priorities.map((x) => [x, byPriority[x] / alarms])) as Record<Priority, number>) : null,
  };
}

// ---------------------------------------------------------------- the report

export type ReportRequest = { month: Month; scope: ReportScope; siteIds: number[] | null; now?: number };

function periodsOf(db: Db, resolved: ResolvedScope, month: Month, now: number): SitePeriod[] {
  const positions = operatorPositions(db);
  return resolved.sites.map((s) => {
    const w = monthWindow(month, s.timeZone, now);
    return {
      siteId: s.id,
      siteName: s.name,
      siteCode: s.code,
      timeZone: s.timeZone,
      month,
      from: w.from,
      to: w.to,
      monthEnd: w.monthEnd,
      partial: w.partial,
      hours: w.hours,
      nominalHours: w.nominalHours,
      offsetAtStart: w.offsetAtStart,
      offsetAtEnd: w.offsetAtEnd,
      lengthNote: monthLengthNote(w),
      positions: positions(s.id),
    };
  });
}

/** The monthly report for a scope the person may see; null when the scope is not theirs or does not exist. */
export function buildMonthlyReport(db: Db, req: ReportRequest): MonthlyReport | null {
  const now = req.now ?? Date.now();
  const resolved = resolveReportScope(db, req.scope, req.siteIds);
  if (!resolved) return null;
  const cms = compressorMonths(db, resolved, req.month, now, { daily: true, causes: true });
  const { rows, total } = availabilityRows(resolved, cms, now);
  const periods = periodsOf(db, resolved, req.month, now);
  const plannedRecorded = cms.some((c) => c.planned.length > 0);
  const compressorId = req.scope.kind === "compressor" ? req.scope.compressorId : undefined;
  const alarmLoadSites: AlarmLoadSite[] = periods.map((p) => {
    const w = cms.find((c) => c.site.id === p.siteId)?.window ?? monthWindow(req.month, p.timeZone, now);
    const figures = alarmLoad(db, p.siteId, { from: w.from, to: w.to, days: w.days }, p.positions, now, { compressorId });
    return { siteId: p.siteId, siteName: p.siteName, timeZone: p.timeZone, from: w.from, to: w.to, figures, results: assessAlarmLoad(figures) };
  });
  return {
    month: req.month,
    scope: scopeParam(req.scope),
    scopeLabel: resolved.label,
    scopeKind: req.scope.kind,
    organisation: organisationName(db),
    generatedAt: now,
    periods,
    rows,
    total,
    daily: dailyRows(cms),
    causes: causeRows(cms),
    outages: outageRows(cms, now),
    plannedService: {
      recorded: plannedRecorded,
      note: plannedRecorded ? "Planned service from the event log (service.planned_start / service.planned_end)." : NO_PLANNED_SERVICE_NOTE,
    },
    alarmLoad: alarmLoadSites,
    delivery: monthDelivery(db, cms),
    airQuality: airQualityReportSection(db, periods, resolved.compressors, now),
  };
}

/** Delivery health of the scope's compressors over their sites' month (db/delivery.ts). */
function monthDelivery(db: Db, cms: readonly CompressorMonth[]): DeliveryMonthRow[] {
  return deliveryMonthRows(
    db,
    cms.map((c) => ({ compressorId: c.compressor.id, compressorName: c.compressor.name, siteName: c.site.name, from: c.window.from, to: c.window.to })),
  );
}

/** Headline figures of the 12 months ending with `month` (oldest first), for the month-to-month comparison. */
export function buildComparison(db: Db, req: ReportRequest & { months?: number }): ComparisonReport | null {
  const now = req.now ?? Date.now();
  const resolved = resolveReportScope(db, req.scope, req.siteIds);
  if (!resolved) return null;
  const compressorId = req.scope.kind === "compressor" ? req.scope.compressorId : undefined;
  const list = monthsEndingWith(req.month, req.months ?? 12);
  const byMonth = compressorMonthsFor(db, resolved, list, now, { daily: false, causes: false });
  const months: ComparisonRow[] = list.map((m) => {
    const cms = byMonth.get(m)!;
    const row = rowOf("fleet", m, { compressorId: null, siteId: null, name: m, siteName: null, timeZone: null, inService: null }, cms, now);
    let alarms = 0;
    const hours: number[] = [];
    let alarmHours = 0;
    let partial = false;
    for (const s of resolved.sites) {
      const w = monthWindow(m, s.timeZone, now);
      hours.push(w.hours);
      partial ||= w.partial;
      if (w.to <= w.from) continue;
      alarmHours += (w.to - w.from) / HOUR_MS;
      alarms +=
        one<{ n: number }>(
          db,
          `SELECT COUNT(*) AS n FROM alarms WHERE site_id = ? AND raised_at >= ? AND raised_at < ?${compressorId ? " AND compressor_id = ?" : ""}`,
          ...[s.id, w.from, w.to, ...(compressorId ? [compressorId] : [])],
        )?.n ?? 0;
    }
    return {
      month: m,
      partial,
      hoursMin: hours.length ? Math.min(...hours) : 0,
      hoursMax: hours.length ? Math.max(...hours) : 0,
      split: row.split,
      figures: row.figures,
      starts: row.starts,
      failures: row.failures,
      mtbfS: row.mtbfS,
      mtbfUpS: row.mtbfUpS,
      mttrS: row.mttrS,
      alarms,
      alarmsPerHour: alarmHours > 0 ? alarms / alarmHours : null,
    };
  });
  return { scope: scopeParam(req.scope), scopeLabel: resolved.label, months, generatedAt: now };
}

// ---------------------------------------------------------------- monthly e-mail

export type DueReport = { siteId: number; siteName: string; timeZone: string; month: Month; monthEnd: number; dueAt: number; key: string };

/** How long after a month ends (in the site's zone) its report is due: late data has time to arrive. */
export const REPORT_GRACE_MS = 2 * HOUR_MS;
/** After this long a missed report is not sent any more (the outbox's idempotency key stops repeats before that). */
export const REPORT_WINDOW_MS = 7 * 24 * HOUR_MS;

export const reportMailKey = (siteId: number, month: Month) => `report:${siteId}:${month}`;

/**
 * The (site, month) reports due at `now`: the month before the current one in each site's time zone, from
 * REPORT_GRACE_MS after it ended until REPORT_WINDOW_MS after. Sites without compressors have no report.
 */
export function dueMonthlyReports(db: Db, now: number, opts: { graceMs?: number; windowMs?: number } = {}): DueReport[] {
  const grace = opts.graceMs ?? REPORT_GRACE_MS;
  const windowMs = opts.windowMs ?? REPORT_WINDOW_MS;
  const sites = all<ScopeSite>(
    db,
    `SELECT s.id, s.name, s.code, s.time_zone AS timeZone FROM sites s
     WHERE EXISTS (SELECT 1 FROM compressors c WHERE c.site_id = s.id) ORDER BY s.id`,
  );
  const out: DueReport[] = [];
  for (const s of sites) {
    const month = previousMonthAt(now, s.timeZone);
    const w = monthWindow(month, s.timeZone);
    const dueAt = w.monthEnd + grace;
    if (now >= dueAt && now < w.monthEnd + windowMs) {
      out.push({ siteId: s.id, siteName: s.name, timeZone: s.timeZone, month, monthEnd: w.monthEnd, dueAt, key: reportMailKey(s.id, month) });
    }
  }
  return out;
}

/** Managers who receive a site's monthly report: role manager, not disabled, the site within their scope. */
export function reportRecipients(db: Db, siteId: number): { userId: number; name: string; email: string }[] {
  return all(
    db,
    `SELECT u.id AS userId, u.name, u.email FROM users u
     WHERE u.role = 'manager' AND u.disabled = 0
       AND (u.all_sites = 1 OR EXISTS (SELECT 1 FROM user_sites us WHERE us.user_id = u.id AND us.site_id = ?))
     ORDER BY u.id`,
    siteId,
  );
}

const alarmBenchmarksById = (id: string) => alarmBenchmarks.find((b) => b.id === id)!;
const esc = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
const pctText = (x: number | null, d = 2) => (x == null ? "—" : `${(x * 100).toFixed(d)} %`);
const availabilityText = (x: number | null) => (x == null ? NO_DATA : `${(x * 100).toFixed(2)} %`);
const hText = (s: number) => `${(s / 3600).toFixed(1)} h`;

function durText(seconds: number | null): string {
  if (seconds == null) return "—";
  const min = Math.round(seconds / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  return h < 48 ? `${h} h ${String(min % 60).padStart(2, "0")} min` : `${Math.floor(h / 24)} d ${String(h % 24).padStart(2, "0")} h`;
}

export type MonthlyReportMail = { subject: string; text: string; html: string };

/**
 * The monthly report of one site as an e-mail (plain text and HTML): headline figures, a line per compressor, the
 * alarm load against its benchmarks, links to the full and printable report, short definitions and the
 * safety notice. `baseUrl` (default NEXTAUTH_URL) makes the links absolute.
 */
export function buildMonthlyReportMail(db: Db, siteId: number, month: Month, opts: { now?: number; baseUrl?: string } = {}): MonthlyReportMail | null {
  const now = opts.now ?? Date.now();
  const report = buildMonthlyReport(db, { month, scope: { kind: "site", siteId }, siteIds: null, now });
  if (!report) return null;
  const base = (opts.baseUrl ?? process.env.NEXTAUTH_URL ?? "").replace(/\/+$/, "");
  const period = report.periods[0]!;
  const t = report.total;
  const f = t.figures;
  const scope = `site-${siteId}`;
  const link = `${base}/reports?month=${month}&scope=${scope}`;
  const printLink = `${base}/reports/print?month=${month}&scope=${scope}`;
  const label = monthLabel(month);
  // A month nothing was recorded in is not a month at 0 %: the mail says there is no data instead.
  const empty = !hasData(t.split);
  const subject = `Airkeep monthly report, ${label} — ${period.siteName}: ${empty ? "no data recorded this month" : `availability ${availabilityText(f.availability)}`}`;
  const emptyNote = empty
    ? "No readings and no planned service were recorded at this site in this period, so no availability, run hours or failure figures can be given. Check the compressors' connections to Airkeep."
    : null;
  const periodText = `${label} in ${period.timeZone}: ${localDateTimeOf(period.from, period.timeZone)} to ${localDateTimeOf(period.partial ? period.to : period.monthEnd, period.timeZone)} local time, ${period.hours} h${period.partial ? " (month to date)" : ""}${period.lengthNote ? ` — ${period.lengthNote}` : ""}`;
  const headline: [string, string][] = [
    ["Availability (planned service counted as down)", availabilityText(f.availability)],
    ["Availability (planned service excluded)", availabilityText(f.availabilityExPlanned)],
    ["Data coverage", pctText(f.coverage, 1)],
    ["Run hours", `${hText(t.split.runningS)}${t.hourMeterAdvanceH != null ? ` (hour meter +${t.hourMeterAdvanceH.toFixed(1)} h)` : ""}`],
    ["Starts", t.starts == null ? "—" : `${t.starts}${t.startsPerRunHour != null ? ` (${t.startsPerRunHour.toFixed(2)} per running hour)` : ""}`],
    ["Down: fault / trip", hText(t.split.faultS)],
    ["Down: planned service", `${hText(t.split.plannedS)}${report.plannedService.recorded ? "" : ` — ${report.plannedService.note}`}`],
    ["No data (offline)", hText(t.split.noDataS)],
    ["Failures (trips)", `${t.failures}${t.openTrips ? ` (${t.openTrips} not reset)` : ""}`],
    [mtbfBasis.running.label, t.mtbfS == null ? "— (no failures)" : `${hText(t.mtbfS)} (running hours ÷ failures)`],
    [mtbfBasis.up.label, t.mtbfUpS == null ? "— (no failures)" : `${hText(t.mtbfUpS)} (up hours ÷ failures)`],
    ["MTTR (mean time to restoration)", t.mttrS == null ? "—" : durText(t.mttrS)],
    ["Longest outage", t.longestOutage ? `${durText(t.longestOutage.durationS)} (${t.longestOutage.cause})` : "—"],
  ];
  const compressors = report.rows.filter((r) => r.level === "compressor");
  const load = report.alarmLoad[0];
  const benchmarks = load ? load.results.map((r) => ({ r, b: alarmBenchmarksById(r.id) })) : [];
  const safety = SAFETY_NOTICE;
  const definitions = [
    "Availability = up time (running + standby) ÷ period; time without data is never counted as up. With planned service excluded: up time ÷ (period − planned service).",
    "Failure = a trip reported by the machine (an emergency stop is down time, not a failure). MTBF is given on two bases: running hours ÷ failures (mean operating time between failures, IEC 60050-192, 192-05-13) and up hours (running + standby) ÷ failures (≈ mean up time). MTTR = mean time from trip to reset (192-07-23).",
    "Alarm load per operator position against ANSI/ISA-18.2 and EEMUA 191; sources and the values recalled from memory are listed in the full report.",
  ];

  const text = [
    `Airkeep monthly report — ${period.siteName}`,
    report.organisation ? `Organisation: ${report.organisation}` : null,
    `Period: ${periodText}`,
    "",
    ...(emptyNote ? [emptyNote, ""] : []),
    ...headline.map(([k, v]) => `${k}: ${v}`),
    "",
    "Per compressor:",
    ...compressors.map(
      (r) =>
        `  ${r.name}: availability ${availabilityText(r.figures.availability)}, running ${hText(r.split.runningS)}, fault ${hText(r.split.faultS)}, planned ${hText(r.split.plannedS)}, no data ${hText(r.split.noDataS)}, starts ${r.starts ?? "—"}, failures ${r.failures}`,
    ),
    "",
    load ? `Alarm load (${load.figures.positions} operator position${load.figures.positions === 1 ? "" : "s"}): ${load.figures.alarms} alarms` : null,
    ...benchmarks.map(({ r, b }) => `  ${b.metric}: ${r.value} — ${r.verdict === "above" ? "ABOVE TARGET" : r.verdict === "within" ? "within target" : "no alarms"} (target ${b.target}; ${b.fromMemory ? "from memory" : "source cited"})`),
    "",
    `Full report: ${link}`,
    `Printable: ${printLink}`,
    "",
    ...definitions,
    "",
    safety,
  ]
    .filter((l) => l !== null)
    .join("\n");

  const td = 'style="padding:2px 8px;border-bottom:1px solid #b9bdc3;vertical-align:top"';
  const num = 'style="padding:2px 8px;border-bottom:1px solid #b9bdc3;text-align:right;font-family:Roboto Mono,monospace;white-space:nowrap"';
  const th = 'style="padding:2px 8px;border-bottom:1px solid #7b828b;text-align:left;background:#eceef0"';
  const html = `<!doctype html><html><body style="font-family:system-ui,Segoe UI,Roboto,Arial,sans-serif;color:#1b1e22;background:#ffffff">
<h1 style="font-size:20px;margin:0 0 4px">Airkeep monthly report — ${esc(period.siteName)}</h1>
${report.organisation ? `<p style="margin:0">${esc(report.organisation)}</p>` : ""}
<p style="margin:4px 0 12px;color:#555b63">${esc(periodText)}</p>
${emptyNote ? `<p style="margin:4px 0 12px"><strong>${esc(emptyNote)}</strong></p>` : ""}
<table style="border-collapse:collapse;font-size:14px">${headline.map(([k, v]) => `<tr><td ${td}>${esc(k)}</td><td ${num}>${esc(v)}</td></tr>`).join("")}</table>
<h2 style="font-size:16px;margin:16px 0 4px">Per compressor</h2>
<table style="border-collapse:collapse;font-size:14px"><tr><th ${th}>Compressor</th><th ${th}>Availability</th><th ${th}>Running</th><th ${th}>Fault</th><th ${th}>Planned</th><th ${th}>No data</th><th ${th}>Starts</th><th ${th}>Failures</th></tr>
${compressors
  .map(
    (r) =>
      `<tr><td ${td}>${esc(r.name)}</td><td ${num}>${availabilityText(r.figures.availability)}</td><td ${num}>${hText(r.split.runningS)}</td><td ${num}>${hText(r.split.faultS)}</td><td ${num}>${hText(r.split.plannedS)}</td><td ${num}>${hText(r.split.noDataS)}</td><td ${num}>${r.starts ?? "—"}</td><td ${num}>${r.failures}</td></tr>`,
  )
  .join("")}</table>
${
  load
    ? `<h2 style="font-size:16px;margin:16px 0 4px">Alarm load: ${load.figures.alarms} alarms, ${load.figures.positions} operator position${load.figures.positions === 1 ? "" : "s"}</h2>
<table style="border-collapse:collapse;font-size:14px"><tr><th ${th}>Metric</th><th ${th}>This site</th><th ${th}>Against target</th><th ${th}>Target and source</th></tr>
${benchmarks
  .map(
    ({ r, b }) =>
      `<tr><td ${td}>${esc(b.metric)}</td><td ${num}>${esc(r.value)}</td><td ${td}>${
        r.verdict === "above" ? '<strong style="background:#faebc4;border:1px solid #e3a008;padding:0 4px">&#9650; Above target</strong>' : r.verdict === "within" ? "Within target" : "No alarms"
      }</td><td ${td}>${esc(b.target)}<br><span style="color:#555b63;font-size:12px">${esc(b.source)}</span></td></tr>`,
  )
  .join("")}</table>`
    : ""
}
<p style="margin:16px 0 4px"><a href="${esc(link)}">Open the full report</a> · <a href="${esc(printLink)}">Printable page</a></p>
${definitions.map((d) => `<p style="margin:4px 0;font-size:12px;color:#555b63">${esc(d)}</p>`).join("")}
<p style="margin:12px 0 0;padding-top:6px;border-top:1px solid #b9bdc3;font-size:12px;color:#555b63"><strong style="color:#1b1e22">Safety:</strong> ${esc(safety)}</p>
</body></html>`;
  return { subject, text, html };
}
