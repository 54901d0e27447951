import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type Db, openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { backfill } from "@/simulator/backfill";
import type { DemoDevice } from "@/simulator/devices";

const DAY = 86_400_000;
const NOW = Date.UTC(2025, 8, 15, 12, 0, 0);
const base = { secret: "secret-for-tests", timeZone: "Europe/London", name: "Unit", profile: "dive" } as const;
const devices: DemoDevice[] = [
  { ...base, deviceId: "bf-a", compressorId: 1, siteCode: "bf-site", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200 },
  { ...base, deviceId: "bf-b", compressorId: 2, siteCode: "bf-site", stages: 4, ratedDeliveryLpm: 450, ratedPressureBar: 420, stopPressureBar: 414, restartPressureBar: 370, bankVolumeL: 300, profile: "fire" },
];

let dir = "";
let db: Db;
const count = (sql: string, ...args: unknown[]) => (db.$client.prepare(sql).get(...args) as { n: number }).n;

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-sim-backfill-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
  const s = db.$client;
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Backfill site', 'bf-site', 'Europe/London', 0)").run();
  s.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'M', 3, 250, 330, 0)").run();
  for (const d of devices) {
    s.prepare(
      `INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, bank_volume_l, created_at, updated_at)
       VALUES (?, 1, 1, ?, ?, ?, ?, ?, ?, 0, 0)`,
    ).run(d.compressorId, d.name, `SN-${d.deviceId}`, d.deviceId, d.stopPressureBar, d.restartPressureBar, d.bankVolumeL);
  }
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const common = { seed: "bf", intervalS: 5, retentionDays: 1, incidentsPerDay: 0 };

describe("backfill", () => {
  it("writes raw readings within retention, rollups for the whole span, and the machine's events", () => {
    const res = backfill({
      ...common,
      db,
      devices: [...devices, { ...devices[0]!, deviceId: "bf-ghost", compressorId: 99 }],
      spanMs: 2 * DAY,
      now: NOW,
      faults: [
        { deviceId: "bf-a", kind: "comms-drop", atMs: NOW - 6 * 3_600_000, durationMs: 30 * 60_000 },
        { deviceId: "bf-b", kind: "cooling", atMs: NOW - 30 * 3_600_000, durationMs: null },
      ],
    });
    expect(res.devices.find((d) => d.deviceId === "bf-ghost")?.skipped).toMatch(/no compressor/);
    const a = res.devices.find((d) => d.deviceId === "bf-a")!;
    // two days at 5 s, less the half hour without a link
    expect(a.rows).toBe(2 * 17_280 - 360);
    // the last day, both ends included, less the gap
    expect(a.rawRows).toBe(17_280 + 1 - 360);

    expect(count("SELECT MIN(ts) AS n FROM readings")).toBeGreaterThanOrEqual(NOW - DAY);
    expect(count("SELECT MAX(ts) AS n FROM readings")).toBe(NOW);
    expect(count("SELECT COUNT(*) AS n FROM readings WHERE compressor_id = 1")).toBe(a.rawRows);
    // every reading, raw or not, is in the rollups
    expect(count("SELECT SUM(n) AS n FROM readings_1h WHERE compressor_id = 1")).toBe(a.rows);
    expect(count("SELECT SUM(n) AS n FROM readings_1m WHERE compressor_id = 1")).toBe(a.rows);
    expect(count("SELECT MIN(bucket_ts) AS n FROM readings_1h WHERE compressor_id = 1")).toBeLessThanOrEqual(NOW - 2 * DAY + 3_600_000);
    // the gap
    expect(count("SELECT COUNT(*) AS n FROM readings WHERE compressor_id = 1 AND ts > ? AND ts < ?", NOW - 6 * 3_600_000 + 5_000, NOW - 5.5 * 3_600_000)).toBe(0);

    const kinds = db.$client.prepare("SELECT kind, COUNT(*) AS n FROM device_events GROUP BY kind").all() as { kind: string; n: number }[];
    const byKind = Object.fromEntries(kinds.map((k) => [k.kind, k.n]));
    expect(byKind.state).toBeGreaterThan(4);
    expect(byKind.comms_lost).toBe(1);
    expect(byKind.comms_restored).toBe(1);
    const trip = db.$client.prepare("SELECT trip_code AS code, run_state AS state FROM device_events WHERE kind = 'trip'").get() as { code: number; state: string };
    expect(trip.state).toBe("tripped");
    expect([110, 120]).toContain(trip.code);
    expect(res.counters.get("bf-a")!.hourMeterH).toBeGreaterThan(0);
  });

  it("adds nothing when run again, and only the new tail later on, continuing the counters", () => {
    const rawBefore = count("SELECT COUNT(*) AS n FROM readings");
    const eventsBefore = count("SELECT COUNT(*) AS n FROM device_events");
    const rollBefore = count("SELECT SUM(n) AS n FROM readings_1m");
    const again = backfill({ ...common, db, devices, spanMs: 2 * DAY, now: NOW });
    expect(again.devices.every((d) => d.rows === 0 && d.segments.length === 0)).toBe(true);
    expect(count("SELECT COUNT(*) AS n FROM readings")).toBe(rawBefore);
    expect(count("SELECT COUNT(*) AS n FROM device_events")).toBe(eventsBefore);
    expect(count("SELECT SUM(n) AS n FROM readings_1m")).toBe(rollBefore);

    const lastOld = db.$client.prepare("SELECT hour_meter_h AS h, starts FROM readings WHERE compressor_id = 2 ORDER BY ts DESC LIMIT 1").get() as { h: number; starts: number };
    const later = backfill({ ...common, db, devices, spanMs: 2 * DAY, now: NOW + 3_600_000 });
    for (const d of later.devices) expect(d.rows).toBe(720);
    const firstNew = db.$client.prepare("SELECT hour_meter_h AS h, starts FROM readings WHERE compressor_id = 2 AND ts > ? ORDER BY ts LIMIT 1").get(NOW) as { h: number; starts: number };
    expect(firstNew.h).toBeGreaterThanOrEqual(lastOld.h);
    expect(firstNew.h - lastOld.h).toBeLessThan(0.01);
    expect(firstNew.starts - lastOld.starts).toBeLessThanOrEqual(1);
  });

  it("fills history missing before the earliest reading so that the counters meet it", () => {
    const firstStored = db.$client.prepare("SELECT hour_meter_h AS h, last_ts AS ts FROM readings_1m WHERE compressor_id = 1 ORDER BY bucket_ts LIMIT 1").get() as { h: number; ts: number };
    const res = backfill({ ...common, db, devices: [devices[0]!], spanMs: 3 * DAY, now: NOW + 3_600_000 });
    const a = res.devices[0]!;
    expect(a.segments).toHaveLength(1);
    // 23 hours up to, not including, the first stored minute
    expect(a.rows).toBe(23 * 720 - 1);
    const before = db.$client.prepare("SELECT hour_meter_h AS h FROM readings_1m WHERE compressor_id = 1 AND bucket_ts < ? ORDER BY bucket_ts DESC LIMIT 1").get(firstStored.ts - 60_000) as { h: number };
    expect(before.h).toBeLessThanOrEqual(firstStored.h + 1e-6);
    expect(firstStored.h - before.h).toBeLessThan(0.5);
  });
});
