// Monthly-report benchmark: 50 compressors at 5 sites in 5 time zones, a month of 1-second history held as the
// rollups the reading store would have written for it (readings_1m and readings_1h, 60 readings a minute), with
// trips, communication gaps, planned service and alarms. Times the report as the /reports page and the CSV routes
// build it, from a file database.
// Run: npx tsx lib/bench/report.ts [--month 2026-03] [--keep]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { comparisonCsv, reportCsv } from "@/lib/reports/csv";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { deliveryMonthRows } from "@/db/delivery";
import { alarmLoad, buildComparison, buildMonthlyReport, buildMonthlyReportMail } from "@/db/reports";
import { type FillReading, FillTracker } from "@/shared/delivery-health";
import { CompressorModel } from "@/simulator/model/compressor";
import { HOUR_MS, monthsEndingWith, monthWindow, shiftMonth } from "@/shared/month";

const { values: args } = parseArgs({
  options: { month: { type: "string", default: "2026-03" }, keep: { type: "boolean", default: false } },
});
const MONTH = args.month!;
const MIN = 60_000;
const SITES = [
  { code: "london", zone: "Europe/London" },
  { code: "oslo", zone: "Europe/Oslo" },
  { code: "malta", zone: "Europe/Malta" },
  { code: "newyork", zone: "America/New_York" },
  { code: "sydney", zone: "Australia/Sydney" },
];
const PER_SITE = 10;

function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-report-bench-"));
const file = path.join(dir, "airkeep.db");
const db = openDatabase(file);
runMigrations(db);
const sql = db.$client;
const now = monthWindow(shiftMonth(MONTH, 1), "UTC").from + 5 * 86_400_000;

// ---- fleet
sql.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'Bench 4-stage', 4, 320, 350, 0)").run();
const compressors: { id: number; siteId: number; zone: string }[] = [];
SITES.forEach((s, i) => {
  sql.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (?, ?, ?, ?, 0)").run(i + 1, `Bench ${s.code}`, s.code, s.zone);
  for (let k = 0; k < PER_SITE; k++) {
    const id = i * PER_SITE + k + 1;
    sql
      .prepare(
        "INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, 1, ?, ?, ?, 330, 290, 0, 0)",
      )
      .run(id, i + 1, `${s.code.toUpperCase()}-${k + 1}`, `BENCH-${id}`, `bench-${id}`);
    compressors.push({ id, siteId: i + 1, zone: s.zone });
  }
});

// ---- rollups: every minute of the month (plus a day either side) in readings_1m, every hour of 12 months in readings_1h
const insertMinute = sql.prepare(
  `INSERT INTO readings_1m (compressor_id, bucket_ts, n, delivery_bar_min, delivery_bar_max, delivery_bar_sum, delivery_bar_n,
     covered_s, run_s, tripped_s, last_ts, hour_meter_h, starts, last_run_state, last_motor_on)
   VALUES (?, ?, 60, ?, ?, ?, 60, ?, ?, ?, ?, ?, ?, ?, ?)`,
);
const insertHour = sql.prepare(
  `INSERT INTO readings_1h (compressor_id, bucket_ts, n, delivery_bar_min, delivery_bar_max, delivery_bar_sum, delivery_bar_n,
     covered_s, run_s, tripped_s, last_ts, hour_meter_h, starts, last_run_state, last_motor_on)
   VALUES (?, ?, ?, 290, 330, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
);
const insertDeviceEvent = sql.prepare(
  "INSERT OR IGNORE INTO device_events (ts, compressor_id, kind, run_state, trip_code, text, received_at) VALUES (?, ?, ?, ?, ?, '', ?)",
);
const insertEvent = sql.prepare("INSERT INTO events (ts, kind, action, priority, site_id, compressor_id, text) VALUES (?, ?, ?, ?, ?, ?, ?)");
const insertAlarm = sql.prepare(
  `INSERT INTO alarms (compressor_id, site_id, key, priority, state, active, raised_at, cleared_at, chattering, updated_at)
   VALUES (?, ?, ?, ?, 'normal', 0, ?, ?, ?, ?)`,
);

const months = monthsEndingWith(MONTH, 12);
const yearFrom = Math.floor(monthWindow(months[0]!, "Pacific/Kiritimati").from / HOUR_MS) * HOUR_MS;
const minuteFrom = Math.floor((monthWindow(MONTH, "Pacific/Kiritimati").from - 86_400_000) / HOUR_MS) * HOUR_MS;
const minuteTo = Math.ceil((monthWindow(MONTH, "Pacific/Honolulu").monthEnd + 86_400_000) / HOUR_MS) * HOUR_MS;
const yearTo = minuteTo;

const t0 = performance.now();
let minuteRows = 0;
let hourRows = 0;
let alarmRows = 0;
const TRIP_CODES = [110, 111, 120, 210, 910];
const ALARM_KEYS: [string, "critical" | "warning" | "advisory"][] = [
  ["finalStageC.high.warning", "warning"],
  ["finalStageC.high.critical", "critical"],
  ["oilBar.low.warning", "warning"],
  ["intakeC.high.advisory", "advisory"],
  ["purifierC.high.advisory", "advisory"],
  ["deliveryBar.low.advisory", "advisory"],
  ["comms", "warning"],
];

for (const c of compressors) {
  const r = rng(c.id * 7919);
  // Trips: about one every 10 days, 20 min to 6 h to reset. Comms gaps: about one a week, 5 min to 3 h.
  // One planned service of 4 h for every fifth compressor.
  const trips: [number, number, number][] = [];
  const gaps: [number, number][] = [];
  for (let t = yearFrom + r() * 10 * 86_400_000; t < yearTo; t += (5 + r() * 10) * 86_400_000) {
    const start = Math.floor(t / 1000) * 1000;
    trips.push([start, start + Math.round((20 + r() * 340) * MIN), TRIP_CODES[Math.floor(r() * TRIP_CODES.length)]!]);
  }
  for (let t = yearFrom + r() * 7 * 86_400_000; t < yearTo; t += (3 + r() * 8) * 86_400_000) {
    const start = Math.floor(t / MIN) * MIN;
    gaps.push([start, start + Math.round((5 + r() * 175) * MIN)]);
  }
  const tx = sql.transaction(() => {
    let starts = 10_000 + c.id * 10;
    let meter = 5_000 + c.id;
    let hour: { ts: number; n: number; covered: number; run: number; tripped: number; last: number | null; meter: number; starts: number; state: number; motor: number } | null = null;
    const flushHour = () => {
      if (hour && hour.n > 0) {
        insertHour.run(c.id, hour.ts, hour.n, 310 * hour.n, hour.n, hour.covered, hour.run, hour.tripped, hour.last, hour.meter, hour.starts, hour.state, hour.motor);
        hourRows++;
      }
    };
    let trip = 0;
    let gap = 0;
    const cycle = 120 + (c.id % 7) * 10; // minutes: runs the first 25 of every cycle
    for (let m = yearFrom; m < yearTo; m += MIN) {
      if (!hour || m - hour.ts >= HOUR_MS) {
        flushHour();
        hour = { ts: m, n: 0, covered: 0, run: 0, tripped: 0, last: null, meter, starts, state: 1, motor: 0 };
      }
      while (trip < trips.length && trips[trip]![1] <= m) trip++;
      while (gap < gaps.length && gaps[gap]![1] <= m) gap++;
      const tr = trips[trip];
      const tripped = tr && tr[0] <= m && m < tr[1] ? 60 : 0;
      const phase = Math.floor((m - yearFrom) / MIN) % cycle;
      const run = tripped ? 0 : phase < 25 ? 60 : 0;
      if (phase === 0 && !tripped) starts++;
      meter += run / 3600;
      const g = gaps[gap];
      if (g && g[0] <= m && m < g[1]) continue; // no data
      const state = tripped ? 4 : run ? 3 : 1;
      if (m >= minuteFrom && m < minuteTo) {
        insertMinute.run(c.id, m, 290, 330, 310 * 60, 60, run, tripped, m + 59_000, meter, starts, state, run ? 1 : 0);
        minuteRows++;
      }
      hour.n += 60;
      hour.covered += 60;
      hour.run += run;
      hour.tripped += tripped;
      hour.last = m + 59_000;
      hour.meter = meter;
      hour.starts = starts;
      hour.state = state;
      hour.motor = run ? 1 : 0;
    }
    flushHour();
    for (const [a, b, code] of trips) {
      insertDeviceEvent.run(a, c.id, "trip", "tripped", code, a);
      insertDeviceEvent.run(b, c.id, "state", "standby", null, b);
      insertEvent.run(a, "trip", "trip.report", "critical", c.siteId, c.id, `Trip ${code}`);
      insertAlarm.run(c.id, c.siteId, "trip", "critical", a, b, 0, b);
      alarmRows++;
    }
    for (const [a, b] of gaps) {
      insertDeviceEvent.run(a + 60_000, c.id, "comms_lost", null, null, a + 60_000);
      insertDeviceEvent.run(b, c.id, "comms_restored", null, null, b);
      insertEvent.run(a + 60_000, "comms", "comms.lost", "warning", c.siteId, c.id, "Communication lost");
    }
    if (c.id % 5 === 0) {
      const start = monthWindow(MONTH, c.zone).from + 10 * 86_400_000 + 8 * HOUR_MS;
      insertEvent.run(start, "service", "service.planned_start", null, c.siteId, c.id, "Planned service begins");
      insertEvent.run(start + 4 * HOUR_MS, "service", "service.planned_end", null, c.siteId, c.id, "Planned service ends");
    }
    // Alarms: ~6 a day per compressor over the year, with an occasional burst; each with its alarm event.
    for (let t = yearFrom + r() * 4 * HOUR_MS; t < yearTo; t += r() * 8 * HOUR_MS) {
      const burst = r() < 0.02 ? 12 : 1;
      for (let b = 0; b < burst; b++) {
        const [key, priority] = ALARM_KEYS[Math.floor(r() * ALARM_KEYS.length)]!;
        const at = Math.floor(t + b * 40_000);
        const cleared = at + Math.round((1 + r() * (r() < 0.01 ? 3000 : 60)) * MIN);
        insertAlarm.run(c.id, c.siteId, key, priority, at, cleared, burst > 1 && b > 2 ? 1 : 0, cleared);
        insertEvent.run(at, "alarm", "alarm.raise", priority, c.siteId, c.id, `${key} raised`);
        alarmRows++;
      }
    }
  });
  tx();
}
const fillRows = generateFillDeliveries();
const genMs = performance.now() - t0;
sql.pragma("wal_checkpoint(TRUNCATE)");
const sizeMb = fs.statSync(file).size / 1e6;

// ---- timings
function time<T>(label: string, f: () => T, runs = 5): { result: T; cold: number; median: number } {
  const times: number[] = [];
  let result!: T;
  for (let i = 0; i < runs; i++) {
    const a = performance.now();
    result = f();
    times.push(performance.now() - a);
  }
  const cold = times[0]!;
  const warm = times.slice(1).sort((a, b) => a - b);
  const median = warm.length ? warm[Math.floor(warm.length / 2)]! : cold;
  console.log(`  ${label.padEnd(52)} first ${cold.toFixed(0).padStart(5)} ms   median of next ${warm.length}: ${median.toFixed(0).padStart(5)} ms`);
  return { result, cold, median };
}

console.log(`\nAirkeep monthly-report benchmark — ${MONTH}, ${compressors.length} compressors at ${SITES.length} sites (${SITES.map((s) => s.zone).join(", ")})`);
console.log(
  `  generated ${minuteRows.toLocaleString("en")} 1-minute and ${hourRows.toLocaleString("en")} 1-hour rollup rows (standing for ${(minuteRows * 60).toLocaleString("en")} one-second readings in the month), ${alarmRows.toLocaleString("en")} alarms, in ${(genMs / 1000).toFixed(1)} s; database ${sizeMb.toFixed(0)} MB`,
);
console.log(`  node ${process.version}, ${os.cpus().length} cores\n`);

const req = { month: MONTH, scope: { kind: "fleet" as const }, siteIds: null, now };
const fleet = time("monthly report, fleet (50 compressors)", () => buildMonthlyReport(db, req)!);
time("monthly report, one site (10 compressors)", () => buildMonthlyReport(db, { ...req, scope: { kind: "site", siteId: 1 } })!);
time("monthly report, one compressor", () => buildMonthlyReport(db, { ...req, scope: { kind: "compressor", compressorId: 1 } })!);
const cmp = time("12-month comparison, fleet", () => buildComparison(db, req)!);
time("every CSV table of the fleet report", () => {
  for (const t of ["availability", "daily", "downtime", "outages", "alarm-load", "top-alarms", "stale-alarms"] as const) reportCsv(t, fleet.result);
  return comparisonCsv(cmp.result);
});
time("monthly e-mail, one site", () => buildMonthlyReportMail(db, 1, MONTH, { now })!);
const floods = time("alarm load of 5 sites (sliding-window floods, busiest 10 min)", () =>
  fleet.result.periods.map((p) => alarmLoad(db, p.siteId, { from: p.from, to: p.to, days: [] }, p.positions, now)),
);

benchDeliveryHealth(fleet.median);

const t = fleet.result.total;
console.log(
  `\n  fleet ${MONTH}: period ${(t.split.periodS / 3600).toFixed(0)} compressor-h (per site: ${fleet.result.periods.map((p) => `${p.hours} h`).join(", ")}), availability ${(t.figures.availability! * 100).toFixed(2)} %` +
    ` (excl. planned ${(t.figures.availabilityExPlanned! * 100).toFixed(2)} %), coverage ${(t.figures.coverage! * 100).toFixed(2)} %, ${t.failures} failures, MTBF ${t.mtbfS ? (t.mtbfS / 3600).toFixed(1) : "—"} h, MTTR ${t.mttrS ? (t.mttrS / 60).toFixed(0) : "—"} min, ${fleet.result.outages.length} outages, ${fleet.result.alarmLoad.reduce((a, s) => a + s.figures.alarms, 0)} alarms`,
);
console.log(
  `  MTBF on up time ${t.mtbfUpS ? (t.mtbfUpS / 3600).toFixed(1) : "—"} h; alarm floods ${floods.result.map((f) => `${f.floods} (${(f.floodShare * 100).toFixed(3)} % of the time), busiest 10 min ${f.peakTenMinute}`).join("; ")}`,
  `  delivery health ${MONTH}: ${fillRows.toLocaleString("en")} measured fills stored, ${fleet.result.delivery.filter((r) => r.fills > 0).length} compressors with a median, ${fleet.result.delivery.filter((r) => r.low).length} below the advisory share`,
);
const target = 1000;
const verdict = fleet.median < target && fleet.cold < target ? "within" : "OVER";
console.log(`  target: the fleet report under ${target} ms — ${verdict} (first ${fleet.cold.toFixed(0)} ms, then ${fleet.median.toFixed(0)} ms)\n`);

db.$client.close();
if (args.keep) console.log(`  kept ${file}`);
else fs.rmSync(dir, { recursive: true, force: true });

// ---- delivery health (its own section): measured fills for the report, and the cost of measuring them

/** Every compressor's fills of the year as the ingester would have stored them: one per run cycle, a few low. */
function generateFillDeliveries(): number {
  const insert = sql.prepare(
    `INSERT OR IGNORE INTO fill_deliveries (compressor_id, start_ts, end_ts, from_bar, to_bar, bank_c, free_air_l, delivery_lpm, rated_lpm, share)
     VALUES (?, ?, ?, 290, 330, 18, ?, ?, 320, ?)`,
  );
  let n = 0;
  for (const c of compressors) {
    const r = rng(c.id * 104_729);
    const cycle = (120 + (c.id % 7) * 10) * MIN;
    const worn = c.id % 9 === 0 ? 0.7 : 1;
    sql.transaction(() => {
      for (let t = yearFrom; t < yearTo; t += cycle) {
        if (r() < 0.3) continue; // a draw-off during the fill: not measured
        const share = worn * (0.97 + 0.05 * r());
        insert.run(c.id, t + 5 * MIN, t + 25 * MIN, Math.round(320 * share * 20), 320 * share, share);
        n++;
      }
    })();
  }
  return n;
}

/** Times the report's delivery-health part and the ingester-side measurement of a compressor-month of fills. */
function benchDeliveryHealth(fleetMedianMs: number): void {
  const cms = buildMonthlyReport(db, req)!.delivery;
  const windows = compressors.map((c) => {
    const w = monthWindow(MONTH, c.zone, now);
    return { compressorId: c.id, compressorName: `C${c.id}`, siteName: "", from: w.from, to: w.to };
  });
  const part = time("delivery health part of the fleet report (50)", () => deliveryMonthRows(db, windows));
  console.log(`    = ${((100 * part.median) / Math.max(1e-9, fleetMedianMs)).toFixed(0)} % of the fleet report; ${cms.length} rows`);

  // Measuring: a month of 5-s readings of one simulated 320 l/min unit with a 150 l bank, through the fill tracker.
  const spec = { deviceId: "bench-dh", stages: 4, ratedDeliveryLpm: 320, ratedPressureBar: 350, stopPressureBar: 330, restartPressureBar: 290, bankVolumeL: 150, profile: "fire" as const, timeZone: "UTC", oilPump: true };
  const from = monthWindow(MONTH, "UTC").from;
  const model = new CompressorModel(spec, { seed: "bench", startMs: from });
  const readings: FillReading[] = [];
  for (let ts = from; ts < monthWindow(MONTH, "UTC").monthEnd; ts += 5_000) {
    model.step(5);
    const x = model.reading();
    readings.push({ ts: model.timeMs, running: x.runState === "running" && x.motorOn, deliveryBar: x.deliveryBar, intakeC: x.intakeC });
  }
  let fills = 0;
  const m = time(
    "measuring fills: one compressor-month of 5-s readings",
    () => {
      const tracker = new FillTracker();
      fills = 0;
      for (const r of readings) if (tracker.add(r, spec)) fills++;
      return fills;
    },
    3,
  );
  console.log(
    `    ${readings.length.toLocaleString("en")} readings, ${fills} fills measured; × 50 compressors ≈ ${((m.median * 50) / 1000).toFixed(1)} s of ingester time spread over the month`,
  );
}
