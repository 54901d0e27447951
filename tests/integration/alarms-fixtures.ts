import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { thresholdLimits, thresholdSets } from "@/db/schema";
import { createAlarmEngine, type AlarmEngine, type AlarmTransition } from "@/db/alarm-engine";
import type { AlarmSettings, Limit } from "@/shared/alarm-rules";
import { runStateCode, type ReadingInput, type RunState } from "@/shared/telemetry";

export type TempDb = { db: Db; file: string; cleanup(): void };

export function makeTempDb(prefix = "airkeep-alarms-"): TempDb {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  const file = path.join(dir, "airkeep.db");
  const db = openDatabase(file);
  runMigrations(db);
  return {
    db,
    file,
    cleanup() {
      try {
        db.$client.close();
      } catch {
        // already closed
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** 2024-03-04 08:00 UTC; scripts count seconds from here. */
export const T0 = Date.UTC(2024, 2, 4, 8, 0, 0);
export const at = (s: number) => T0 + s * 1000;

export const testSettings: AlarmSettings = { settlingS: 60, reAlarmS: 600, chatterCount: 3, chatterWindowS: 60 };

export const modelLimits: Limit[] = [
  { signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 10, offDelayS: 5 },
  { signal: "finalStageC", direction: "high", priority: "critical", value: 180, deadband: 5, onDelayS: 0, offDelayS: 0 },
  { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 0, offDelayS: 0 },
  { signal: "deliveryBar", direction: "high", priority: "advisory", value: 310, deadband: 2, onDelayS: 0, offDelayS: 0 },
];

export type Fleet = {
  siteA: number;
  siteB: number;
  modelId: number;
  /** "HR-1 Bay compressor" at site A. */
  c1: number;
  /** "CR-2 Bank charger" at site B. */
  c2: number;
  supervisor: number;
};

/** Two sites, one 3-stage model with the limits above, a compressor at each site and a supervisor. */
export function seedFleet(db: Db, limits: readonly Limit[] = modelLimits): Fleet {
  const s = db.$client;
  const now = T0 - 86_400_000;
  const site = s.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, ?, ?)");
  const siteA = Number(site.run("Heronfold Ridge Fire Station", "heronfold-ridge", "Europe/Oslo", now).lastInsertRowid);
  const siteB = Number(site.run("Cobalt Reef Dive Centre", "cobalt-reef", "Europe/Malta", now).lastInsertRowid);
  const modelId = Number(
    s
      .prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Test 3-stage', 3, 250, 330, ?)")
      .run(now).lastInsertRowid,
  );
  const comp = s.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, 300, 265, ?, ?)`,
  );
  const c1 = Number(comp.run(siteA, modelId, "HR-1 Bay compressor", "T-0001", "hr-bay", now, now).lastInsertRowid);
  const c2 = Number(comp.run(siteB, modelId, "CR-2 Bank charger", "T-0002", "cr-bank", now, now).lastInsertRowid);
  const supervisor = Number(
    s
      .prepare("INSERT INTO users (email, name, password_hash, role, all_sites, created_at, updated_at) VALUES ('sup@test', 'Sam Okafor', 'x', 'supervisor', 1, ?, ?)")
      .run(now, now).lastInsertRowid,
  );
  setLimits(db, "model", modelId, limits, now);
  return { siteA, siteB, modelId, c1, c2, supervisor };
}

/** Replaces a threshold set the way the threshold editor would: rows, then the set's version. */
export function setLimits(db: Db, scopeType: "model" | "compressor", scopeId: number, limits: readonly (Limit & { enabled?: boolean })[], now: number): void {
  db.$client.transaction(() => {
    db.$client.prepare("DELETE FROM threshold_limits WHERE scope_type = ? AND scope_id = ?").run(scopeType, scopeId);
    for (const l of limits) {
      db.insert(thresholdLimits)
        .values({ scopeType, scopeId, ...l, enabled: l.enabled ?? true, updatedAt: now })
        .run();
    }
    db.insert(thresholdSets).values({ scopeType, scopeId, version: 0, updatedAt: now }).onConflictDoNothing().run();
    db.$client
      .prepare("UPDATE threshold_sets SET version = version + 1, updated_at = ? WHERE scope_type = ? AND scope_id = ?")
      .run(now, scopeType, scopeId);
  })();
}

export type ReadingPatch = Partial<Omit<ReadingInput, "runState">> & { runState?: RunState; finalC?: number | null };

let seq = 0;

/** A 3-stage unit running normally, with the changes given. finalC sets the stage 3 outlet temperature. */
export function reading(compressorId: number, s: number, patch: ReadingPatch = {}): ReadingInput {
  const { runState = "running", finalC = 140, ...rest } = patch;
  const running = runState === "running" || runState === "starting";
  return {
    compressorId,
    ts: at(s),
    seq: seq++,
    deliveryBar: 280,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: running ? 110 : 25,
    stage2C: running ? 125 : 25,
    stage3C: running ? finalC : 25,
    stage4C: null,
    oilBar: running ? 3.5 : 0,
    purifierC: 25,
    intakeC: 18,
    runState: runStateCode[runState],
    motorOn: running ? 1 : 0,
    hourMeterH: 1000,
    starts: 100,
    tripCode: null,
    ...rest,
  };
}

const RAW_COLUMNS = [
  "compressor_id", "ts", "seq", "delivery_bar", "stage1_bar", "stage2_bar", "stage3_bar", "stage4_bar", "stage1_c", "stage2_c",
  "stage3_c", "stage4_c", "oil_bar", "purifier_c", "intake_c", "run_state", "motor_on", "hour_meter_h", "starts", "trip_code",
] as const;

/**
 * Stores a batch and evaluates it in one transaction, the way the ingester commits: the readings and the alarm changes
 * they cause commit together.
 */
export function feed(db: Db, engine: AlarmEngine, rows: readonly ReadingInput[], receivedAt?: number): AlarmTransition[] {
  const insert = db.$client.prepare(
    `INSERT OR IGNORE INTO readings (${RAW_COLUMNS.join(", ")}) VALUES (${RAW_COLUMNS.map(() => "?").join(", ")})`,
  );
  return db.$client.transaction(() => {
    for (const r of rows) {
      insert.run(
        r.compressorId, r.ts, r.seq, r.deliveryBar, r.stage1Bar, r.stage2Bar, r.stage3Bar, r.stage4Bar, r.stage1C, r.stage2C,
        r.stage3C, r.stage4C, r.oilBar, r.purifierC, r.intakeC, r.runState, r.motorOn, r.hourMeterH, r.starts, r.tripCode,
      );
    }
    return engine.onReadings(rows, receivedAt ?? (rows.length ? rows[rows.length - 1]!.ts + 250 : T0));
  })();
}

export function newEngine(db: Db, clock: { now: number }, settings: AlarmSettings = testSettings): AlarmEngine {
  return createAlarmEngine(db, { settings, now: () => clock.now, log: () => {} });
}

/** Every alarm row and event-log entry, for comparing two runs. */
export function dump(db: Db): { alarms: unknown[]; events: unknown[] } {
  return {
    alarms: db.$client.prepare("SELECT * FROM alarms ORDER BY id").all(),
    events: db.$client.prepare("SELECT * FROM events ORDER BY id").all(),
  };
}
