import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { comparisonCsv, reportCsv } from "@/lib/reports/csv";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { createReadingStore } from "@/db/readings";
import {
  buildComparison,
  buildMonthlyReport,
  deviceOutages,
  plannedServiceIntervals,
  resolveReportScope,
  rollupSums,
} from "@/db/reports";
import { availabilityOf, mtbfSeconds, mttrSeconds, splitTime, type MonthlyReport } from "@/shared/availability";
import type { ReadingInput } from "@/shared/telemetry";

// The report from a real SQLite file's rollups, written through the same reading store the ingester uses
// (one reading a minute), plus device events and event-log entries inserted as the ingester and the service log
// would. Expected values are worked out by hand in the comments beside each check.

const MIN = 60_000;
const H = 3_600_000;
const HS = 3600;

type State = { run: boolean; tripped: boolean } | null;

function reading(compressorId: number, ts: number, s: { run: boolean; tripped: boolean }, starts: number, hourMeterH: number): ReadingInput {
  return {
    compressorId,
    ts,
    seq: Math.floor(ts / 1000),
    deliveryBar: 300,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: 80,
    stage2C: 110,
    stage3C: 140,
    stage4C: null,
    oilBar: 4,
    purifierC: 20,
    intakeC: 15,
    runState: s.tripped ? 4 : s.run ? 3 : 1,
    motorOn: s.run ? 1 : 0,
    hourMeterH,
    starts,
    tripCode: s.tripped ? 210 : null,
  };
}

/**
 * One reading a minute on [from, to] (both ends), state from `at` (null = no reading). A reading holds until the
 * next one, so with readings at a and b and none between, [a, b) has no data when b − a exceeds the store's 2 min.
 */
function writeHistory(db: Db, compressorId: number, from: number, to: number, at: (t: number) => State, counters: (t: number) => { starts: number; hourMeterH: number }) {
  const store = createReadingStore(db);
  let batch: ReadingInput[] = [];
  for (let t = from; t <= to; t += MIN) {
    const s = at(t);
    if (!s) continue;
    const c = counters(t);
    batch.push(reading(compressorId, t, s, c.starts, c.hourMeterH));
    if (batch.length >= 5000) {
      store.insert(batch, { keepRaw: false });
      batch = [];
    }
  }
  store.insert(batch, { keepRaw: false });
}

function deviceEvent(db: Db, compressorId: number, ts: number, kind: string, runState: string | null, tripCode: number | null = null) {
  db.$client
    .prepare("INSERT INTO device_events (ts, compressor_id, kind, run_state, trip_code, text, received_at) VALUES (?, ?, ?, ?, ?, '', ?)")
    .run(ts, compressorId, kind, runState, tripCode, ts);
}

function logEvent(db: Db, e: { ts: number; kind: string; action: string; siteId: number; compressorId: number }) {
  db.$client
    .prepare("INSERT INTO events (ts, kind, action, site_id, compressor_id, text) VALUES (?, ?, ?, ?, ?, ?)")
    .run(e.ts, e.kind, e.action, e.siteId, e.compressorId, e.action);
}

function seed(db: Db) {
  const s = db.$client;
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Harbour Station', 'harbour', 'Europe/London', 0)").run();
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (2, 'Ridge Station', 'ridge', 'America/New_York', 0)").run();
  s.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'Test 4-stage', 4, 300, 420, 0)").run();
  const c = s.prepare(
    "INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, 1, ?, ?, ?, 300, 270, 0, 0)",
  );
  c.run(1, 1, "H-1 Main", "SER-1", "h-main");
  c.run(2, 1, "H-2 Week", "SER-2", "h-week");
  c.run(3, 2, "R-1 Bay", "SER-3", "r-bay");
}

let db: Db;

beforeAll(() => {
  db = openDatabase(":memory:");
  runMigrations(db);
  seed(db);
}, 120_000);

afterAll(() => db.$client.close());

describe("worked example through the database", () => {
  // The published exercise of tests/unit/report-availability.test.ts (24 h required, Monday to Friday; failures
  // Tuesday 05–07, Thursday 16–20, Friday 08–11; MTBF 37 h, MTTR 3 h; scribd.com document 403226083, "Exercise 1"),
  // played as a compressor running whenever it is not tripped, Monday 1 June 2026 00:00 UTC to Saturday 00:00.
  const mon = Date.UTC(2026, 5, 1);
  const sat = mon + 5 * 24 * H;
  const trips: [number, number][] = [
    [mon + 1 * 24 * H + 5 * H, mon + 1 * 24 * H + 7 * H],
    [mon + 3 * 24 * H + 16 * H, mon + 3 * 24 * H + 20 * H],
    [mon + 4 * 24 * H + 8 * H, mon + 4 * 24 * H + 11 * H],
  ];

  beforeAll(() => {
    writeHistory(
      db,
      2,
      mon,
      sat,
      (t) => {
        const tripped = trips.some(([a, b]) => t >= a && t < b);
        return { run: !tripped, tripped };
      },
      () => ({ starts: 0, hourMeterH: 0 }),
    );
    for (const [a, b] of trips) {
      deviceEvent(db, 2, a, "trip", "tripped", 110);
      deviceEvent(db, 2, b, "state", "running");
    }
  });

  it("gives availability 111/120, MTBF 37 h and MTTR 3 h from the rollups and the device events", () => {
    const sums = rollupSums(db, [{ key: "week", compressorId: 2, from: mon, to: sat }]).get("week")!;
    expect(sums.coveredS).toBeCloseTo(120 * HS, 6);
    expect(sums.trippedS).toBeCloseTo(9 * HS, 6);
    const split = splitTime(120 * HS, sums);
    expect(availabilityOf(split).availability).toBeCloseTo(111 / 120, 9);
    const outages = deviceOutages(db, 2, mon, sat);
    expect(outages.map((o) => [o.start, o.end])).toEqual(trips);
    expect(mtbfSeconds(split.runningS, outages.length)! / HS).toBeCloseTo(37, 9);
    expect(mttrSeconds(outages.map((o) => (o.end! - o.start) / 1000))! / HS).toBeCloseTo(3, 9);
  });

  it("sums any interval the same from hours and minutes (a window not on the hour)", () => {
    // Tuesday 04:30 to 07:45: 0.5 h running, 2 h tripped, 0.75 h running.
    const from = mon + 24 * H + 4.5 * H;
    const to = mon + 24 * H + 7.75 * H;
    const s = rollupSums(db, [{ key: "x", compressorId: 2, from, to }]).get("x")!;
    expect(s.coveredS).toBeCloseTo(3.25 * HS, 6);
    expect(s.trippedS).toBeCloseTo(2 * HS, 6);
    expect(s.runS).toBeCloseTo(1.25 * HS, 6);
  });
});

describe("a month with a daylight-saving change (Europe/London, tz database)", () => {
  // H-1 runs the whole of March and October 2026: every hour of the month is running time.
  beforeAll(() => {
    for (const [from, to] of [
      [Date.UTC(2026, 2, 1, 0), Date.UTC(2026, 2, 31, 23)],
      [Date.UTC(2026, 8, 30, 23), Date.UTC(2026, 10, 1, 0)],
    ] as const) {
      writeHistory(db, 1, from, to, () => ({ run: true, tripped: false }), (t) => ({ starts: 7, hourMeterH: 1000 + (t - from) / H }));
    }
  });

  it("March 2026 has 743 hours, all of them running, and the report says why", () => {
    const r = buildMonthlyReport(db, { month: "2026-03", scope: { kind: "compressor", compressorId: 1 }, siteIds: null, now: Date.UTC(2026, 6, 1) })!;
    expect(r.periods[0]!.hours).toBe(743);
    expect(r.periods[0]!.lengthNote).toMatch(/743 h, not 744 h/);
    expect(r.total.split.periodS / HS).toBe(743);
    expect(r.total.split.runningS / HS).toBeCloseTo(743, 6);
    expect(r.total.split.noDataS).toBeCloseTo(0, 6);
    expect(r.total.figures.availability).toBeCloseTo(1, 9);
    // The last reading inside the month is at 23:59 on 31 March: the meter advanced 742 h 59 min by then.
    expect(r.total.hourMeterAdvanceH).toBeCloseTo(743 - 1 / 60, 6);
    expect(r.daily).toHaveLength(31);
    expect(r.daily.find((d) => d.date === "2026-03-29")!.periodS / HS).toBe(23);
  });

  it("October 2026 has 745 hours", () => {
    const r = buildMonthlyReport(db, { month: "2026-10", scope: { kind: "compressor", compressorId: 1 }, siteIds: null, now: Date.UTC(2027, 0, 1) })!;
    expect(r.total.split.periodS / HS).toBe(745);
    expect(r.total.split.runningS / HS).toBeCloseTo(745, 6);
    expect(r.daily.find((d) => d.date === "2026-10-25")!.periodS / HS).toBe(25);
  });
});

describe("a month with missing data, trips and planned service (June 2026, Europe/London = UTC+1)", () => {
  // Local time L(d, h) of June 2026 in London is UTC + 1 h.
  const L = (d: number, h: number) => Date.UTC(2026, 5, d) + h * H - H;
  const from = L(1, 0);
  const to = L(31, 0); // 1 July 00:00 local
  const gap = [L(11, 0), L(21, 0)] as const; // 10 days without data
  const oilTrip = [L(5, 10), L(5, 13.5)] as const; // trip 210, 3.5 h
  const eStop = [L(7, 11), L(7, 11.5)] as const; // emergency stop 910, 0.5 h: down time, not a failure
  const planned = [L(25, 6), L(25, 14)] as const; // 8 h planned service, over the 08:00–10:00 run
  const inside = (t: number, [a, b]: readonly [number, number]) => t >= a && t < b;
  const localHour = (t: number) => ((t + H) % (24 * H)) / H;
  const dayIndex = (t: number) => Math.floor((t - from) / (24 * H)); // 0 = 1 June

  let report: MonthlyReport;

  beforeAll(() => {
    writeHistory(
      db,
      3 - 2, // H-1 again (site Harbour); March/October data does not touch June
      from,
      to,
      (t) => {
        if (t > gap[0] && t < gap[1]) return null;
        const tripped = inside(t, oilTrip) || inside(t, eStop);
        const h = localHour(t);
        return { run: !tripped && h >= 8 && h < 10, tripped };
      },
      (t) => {
        // The machine runs 08:00–10:00 every day, seen or not: one start a day, two hours a day.
        const d = dayIndex(t);
        const h = localHour(t);
        const startsToday = h >= 8 ? 1 : 0;
        const runToday = Math.min(2, Math.max(0, h - 8));
        return { starts: 1000 + d + startsToday, hourMeterH: 500 + 2 * d + runToday };
      },
    );
    deviceEvent(db, 1, oilTrip[0], "trip", "tripped", 210);
    deviceEvent(db, 1, oilTrip[1], "state", "standby");
    deviceEvent(db, 1, eStop[0], "trip", "tripped", 910);
    deviceEvent(db, 1, eStop[1], "state", "stopped");
    deviceEvent(db, 1, gap[0] + 2 * MIN, "comms_lost", null);
    deviceEvent(db, 1, gap[1], "comms_restored", null);
    logEvent(db, { ts: planned[0], kind: "service", action: "service.planned_start", siteId: 1, compressorId: 1 });
    logEvent(db, { ts: planned[1], kind: "service", action: "service.planned_end", siteId: 1, compressorId: 1 });
    report = buildMonthlyReport(db, { month: "2026-06", scope: { kind: "compressor", compressorId: 1 }, siteIds: null, now: Date.UTC(2026, 6, 5) })!;
  });

  it("counts the 10 days without data as no data, never as up", () => {
    // 720 h; readings cover 720 − 240 = 480 h.
    const s = report.total.split;
    expect(s.periodS / HS).toBe(720);
    expect(s.noDataS / HS).toBeCloseTo(240, 6);
    expect(report.total.figures.coverage).toBeCloseTo(480 / 720, 9);
    const gapDays = report.daily.filter((d) => d.date >= "2026-06-11" && d.date <= "2026-06-20");
    expect(gapDays).toHaveLength(10);
    for (const d of gapDays) {
      expect(d.noDataS / HS).toBeCloseTo(24, 6);
      // A day without data has no availability ("no data"), not 0 %.
      expect(d.availability).toBeNull();
    }
  });

  it("splits the rest into running, standby, fault and planned service", () => {
    // Running seen: 20 days with data × 2 h = 40 h, of which 2 h fall in planned service → 38 h.
    // Fault: 3.5 h + 0.5 h = 4 h. Planned: 8 h. Standby: 480 − 40 − 4 − (8 − 2) = 430 h.
    const s = report.total.split;
    expect(s.runningS / HS).toBeCloseTo(38, 6);
    expect(s.faultS / HS).toBeCloseTo(4, 6);
    expect(s.plannedS / HS).toBeCloseTo(8, 6);
    expect(s.standbyS / HS).toBeCloseTo(430, 6);
    // Availability = (38 + 430) / 720 = 0.65; planned service excluded: 468 / 712.
    expect(report.total.figures.availability).toBeCloseTo(468 / 720, 9);
    expect(report.total.figures.availabilityExPlanned).toBeCloseTo(468 / 712, 9);
    expect(report.plannedService.recorded).toBe(true);
    expect(plannedServiceIntervals(db, 1, from, to)).toEqual([{ from: planned[0], to: planned[1] }]);
  });

  it("MTBF, MTTR, longest outage, starts and hour meter", () => {
    const t = report.total;
    // One failure (the emergency stop is not one). Running time and up time differ twelvefold here (the unit idles in
    // standby most of the month): MTBF on running time = 38 h / 1 (mean operating time between failures,
    // IEC 60050-192, 192-05-13); on up time = (38 + 430) h / 1 = 468 h (≈ mean up time). MTTR = 3.5 h.
    expect(t.failures).toBe(1);
    expect(t.mtbfS! / HS).toBeCloseTo(38, 6);
    expect(t.mtbfUpS! / HS).toBeCloseTo(468, 6);
    expect(t.mttrS! / HS).toBeCloseTo(3.5, 9);
    expect(t.longestOutage).toMatchObject({ start: oilTrip[0], end: oilTrip[1], cause: "Trip 210: Oil pressure low" });
    // The counters saw all 30 days (the machine ran while unseen): 30 starts, hour meter +60 h, against 38 h seen.
    expect(t.starts).toBe(30);
    expect(t.hourMeterAdvanceH).toBeCloseTo(60, 6);
    expect(t.startsPerRunHour).toBeCloseTo(30 / 38, 9);
  });

  it("down time by cause and the outage list", () => {
    const byKey = Object.fromEntries(report.causes.map((c) => [c.key, c]));
    expect(byKey["trip:210"]!.seconds / HS).toBeCloseTo(3.5, 6);
    expect(byKey["trip:910"]!.seconds / HS).toBeCloseTo(0.5, 6);
    expect(byKey["planned"]!.seconds / HS).toBeCloseTo(8, 6);
    expect(byKey["nodata"]).toMatchObject({ outages: 1 });
    expect(byKey["nodata"]!.seconds / HS).toBeCloseTo(240, 6);
    expect(byKey["trip:unrecorded"]).toBeUndefined();
    expect(report.outages.map((o) => [o.kind, o.start, o.failure])).toEqual([
      ["trip", oilTrip[0], true],
      ["trip", eStop[0], false],
      ["comms", gap[0] + 2 * MIN, false],
      ["planned", planned[0], false],
    ]);
  });

  it("exports every table as CSV", () => {
    const csv = reportCsv("availability", report);
    expect(csv.startsWith("\uFEFFlevel,name,site,time_zone,period_h,running_h")).toBe(true);
    const row = csv.split("\r\n")[1]!.split(",");
    expect(row.slice(0, 10)).toEqual(["compressor", "H-1 Main", "Harbour Station", "Europe/London", "720", "38", "430", "4", "8", "240"]);
    expect(reportCsv("outages", report).split("\r\n")[1]).toContain("2026-06-05 10:00,2026-06-05 13:30");
    expect(reportCsv("daily", report).split("\r\n")).toHaveLength(32); // header + 30 days + final newline
    // Both MTBF bases, labelled by their column names; a day without data reads "no data".
    const header = csv.split("\r\n")[0]!.split(",");
    expect(row[header.indexOf("mtbf_running_h")]).toBe("38");
    expect(row[header.indexOf("mtbf_up_h")]).toBe("468");
    const daily = reportCsv("daily", report).split("\r\n");
    expect(daily.find((l) => l.startsWith("2026-06-15,"))!.split(",").at(-1)).toBe("no data");
    for (const t of ["downtime", "alarm-load", "top-alarms", "stale-alarms"] as const) expect(reportCsv(t, report)).toMatch(/^\uFEFF\w/);
  });

  it("month to month: each month at its own length, data or not", () => {
    const c = buildComparison(db, { month: "2026-06", scope: { kind: "compressor", compressorId: 1 }, siteIds: null, now: Date.UTC(2026, 6, 5) })!;
    expect(c.months.map((m) => m.month)).toEqual(["2025-07", "2025-08", "2025-09", "2025-10", "2025-11", "2025-12", "2026-01", "2026-02", "2026-03", "2026-04", "2026-05", "2026-06"]);
    const june = c.months[11]!;
    expect(june.figures.availability).toBeCloseTo(468 / 720, 9);
    expect(june.failures).toBe(1);
    expect([c.months[8]!.hoursMin, c.months[8]!.hoursMax]).toEqual([743, 743]);
    expect(c.months[8]!.figures.availability).toBeCloseTo(1, 9);
    expect(c.months[10]!.figures.availability).toBeNull(); // May: no data at all — "no data", not 0 %
    expect(c.months[10]!.figures.availabilityExPlanned).toBeNull();
    expect(c.months[10]!.split.noDataS / HS).toBe(744);
    const lines = comparisonCsv(c).split("\r\n");
    expect(lines).toHaveLength(14);
    const cols = lines[0]!.split(",");
    const may = lines.find((l) => l.startsWith("2026-05,"))!.split(",");
    expect(may[cols.indexOf("availability_pct")]).toBe("no data");
    expect(may[cols.indexOf("availability_ex_planned_pct")]).toBe("no data");
    expect(june.mtbfUpS! / HS).toBeCloseTo(468, 6);
  });
});

describe("scope", () => {
  it("limits a report to the person's sites; another site's compressor reads as not found", () => {
    expect(resolveReportScope(db, { kind: "fleet" }, [2])!.compressors.map((c) => c.id)).toEqual([3]);
    expect(resolveReportScope(db, { kind: "site", siteId: 1 }, [2])).toBeNull();
    expect(resolveReportScope(db, { kind: "compressor", compressorId: 1 }, [2])).toBeNull();
    expect(resolveReportScope(db, { kind: "compressor", compressorId: 99 }, null)).toBeNull();
    expect(resolveReportScope(db, { kind: "compressor", compressorId: 1 }, null)!.label).toBe("H-1 Main (Harbour Station)");
  });

  it("the fleet adds each site's own month", () => {
    const r = buildMonthlyReport(db, { month: "2026-03", scope: { kind: "fleet" }, siteIds: null, now: Date.UTC(2026, 6, 1) })!;
    // Harbour (London) 743 h × 2 compressors + Ridge (New York) 743 h × 1 compressor.
    expect(r.total.split.periodS / HS).toBe(3 * 743);
    expect(r.periods.map((p) => [p.timeZone, p.hours])).toEqual([
      ["Europe/London", 743],
      ["America/New_York", 743],
    ]);
    expect(r.rows.map((x) => x.key)).toEqual(["c-1", "c-2", "c-3", "s-1", "s-2", "fleet"]);
    expect(r.plannedService).toEqual({ recorded: false, note: "No planned service recorded." });
  });
});
