import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type Db, openDatabase } from "@/db/client";
import { deliveryAdvisorySettings, deliveryMonthRows, listFillDeliveries } from "@/db/delivery";
import { runMigrations } from "@/db/migrate";
import { DELIVERY_ALARM_KEY } from "@/db/delivery-recorder";
import { backfill } from "@/simulator/backfill";
import type { DemoDevice } from "@/simulator/devices";

const DAY = 86_400_000;
const NOW = Date.UTC(2025, 8, 15, 12, 0, 0);
const base = { secret: "secret-for-tests", timeZone: "Europe/Malta", name: "Unit", profile: "dive", siteCode: "dh-site" } as const;
const unit = { stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200 };
const devices: DemoDevice[] = [
  { ...base, ...unit, deviceId: "dh-ok", compressorId: 1 },
  { ...base, ...unit, deviceId: "dh-worn", compressorId: 2 },
];

let dir = "";
let db: Db;

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-delivery-"));
  db = openDatabase(path.join(dir, "airkeep.db"));
  runMigrations(db);
  const s = db.$client;
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Dive site', 'dh-site', 'Europe/Malta', 0)").run();
  s.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'M', 3, 250, 330, 0)").run();
  for (const d of devices) {
    s.prepare(
      `INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, bank_volume_l, created_at, updated_at)
       VALUES (?, 1, 1, ?, ?, ?, ?, ?, ?, 0, 0)`,
    ).run(d.compressorId, d.deviceId, `SN-${d.deviceId}`, d.deviceId, d.stopPressureBar, d.restartPressureBar, d.bankVolumeL);
  }
});

afterAll(() => {
  db.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("delivery health over a week of history", () => {
  it("stores each measured fill, and raises the advisory only for the unit with worn valves", () => {
    backfill({
      db,
      devices,
      seed: "dh",
      intervalS: 5,
      retentionDays: 2,
      incidentsPerDay: 0,
      spanMs: 7 * DAY,
      now: NOW,
      faults: [{ deviceId: "dh-worn", kind: "worn-valves", atMs: NOW - 20 * DAY, durationMs: 60 * DAY }],
    });
    const ok = listFillDeliveries(db, 1, 0);
    const worn = listFillDeliveries(db, 2, 0);
    expect(ok.length).toBeGreaterThanOrEqual(5);
    expect(worn.length).toBeGreaterThanOrEqual(5);
    const med = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;
    expect(med(ok.map((f) => f.share))).toBeGreaterThan(0.97);
    // the model's full valve wear takes 30 % off the delivery
    expect(med(worn.map((f) => f.share))).toBeGreaterThan(0.67);
    expect(med(worn.map((f) => f.share))).toBeLessThan(0.73);
    for (const f of worn) expect(f.toBar).toBeGreaterThanOrEqual(297);

    const alarms = db.$client.prepare("SELECT compressor_id AS id, priority, active, value, limit_value AS limitValue FROM alarms WHERE key = ?").all(DELIVERY_ALARM_KEY) as {
      id: number;
      priority: string;
      active: number;
      value: number;
      limitValue: number;
    }[];
    expect(alarms).toHaveLength(1);
    expect(alarms[0]).toMatchObject({ id: 2, priority: "advisory", active: 1, limitValue: deliveryAdvisorySettings(db).minShare });
    const ev = db.$client.prepare("SELECT text FROM events WHERE action = 'alarm.raise' AND compressor_id = 2").all() as { text: string }[];
    expect(ev.some((e) => /median delivery of the last fills 7\d % of rated, below 80 %/.test(e.text))).toBe(true);
  });

  it("gives the report a median per compressor over the month, and no data (not zero) for a month without fills", () => {
    const window = { from: NOW - 7 * DAY, to: NOW + 1 };
    const rows = deliveryMonthRows(db, [
      { compressorId: 1, compressorName: "dh-ok", siteName: "Dive site", ...window },
      { compressorId: 2, compressorName: "dh-worn", siteName: "Dive site", ...window },
      { compressorId: 2, compressorName: "dh-worn", siteName: "Dive site", from: NOW - 60 * DAY, to: NOW - 30 * DAY },
    ]);
    const worn = listFillDeliveries(db, 2, 0).map((f) => f.deliveryLpm).sort((a, b) => a - b);
    const mid = worn.length % 2 ? worn[worn.length >> 1]! : (worn[worn.length / 2 - 1]! + worn[worn.length / 2]!) / 2;
    expect(rows[1]).toMatchObject({ fills: worn.length, medianLpm: mid, ratedLpm: 250, low: true });
    expect(rows[0]!.low).toBe(false);
    expect(rows[2]).toMatchObject({ fills: 0, medianLpm: null, medianShare: null, low: false });
  });

  it("reads its settings from the settings table, falling back to the defaults on nonsense", () => {
    expect(deliveryAdvisorySettings(db)).toEqual({ fills: 5, minShare: 0.8 });
    db.$client.prepare("INSERT INTO settings (key, value) VALUES ('delivery.advisory_fills', '8'), ('delivery.advisory_min_share', '1.5')").run();
    expect(deliveryAdvisorySettings(db)).toEqual({ fills: 8, minShare: 0.8 });
  });
});
