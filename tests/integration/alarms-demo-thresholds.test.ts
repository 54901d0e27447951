import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { listCompressors } from "@/db/compressors";
import { demoCompressors, demoModels, demoSites } from "@/db/demo-scenario";
import { demoModelLimits, seedDemoThresholds } from "@/db/demo-thresholds";
import { seedDemo } from "@/db/seed";
import { effectiveLimits } from "@/db/thresholds";
import { createAlarmEngine, type AlarmEngine, type AlarmTransition } from "@/db/alarm-engine";
import { limitKey } from "@/shared/alarm-rules";
import { telemetryToReading, type ReadingInput } from "@/shared/telemetry";
import { CompressorModel, defaultOilPump, type CompressorSpec } from "@/simulator/model/compressor";
import type { FaultKind } from "@/simulator/model/faults";
import { makeTempDb, type TempDb } from "./alarms-fixtures";

let t: TempDb;
let db: Db;
let seeded: { limits: number; sets: number };

beforeAll(() => {
  t = makeTempDb("airkeep-alarms-demo-");
  db = t.db;
  // The demo seed adds the thresholds itself; count what it left.
  seedDemo(db);
  seeded = db.$client
    .prepare("SELECT (SELECT count(*) FROM threshold_limits) AS limits, (SELECT count(*) FROM threshold_sets) AS sets")
    .get() as { limits: number; sets: number };
});
afterAll(() => t.cleanup());

// Each scenario starts with no alarms, no events and no engine state: they run at different times of year.
beforeEach(() => {
  db.$client.exec("DELETE FROM alarms; DELETE FROM events; DELETE FROM settings WHERE key LIKE 'alarm-engine.%';");
});

type Unit = { compressorId: number; name: string; spec: CompressorSpec };

function demoUnits(): Unit[] {
  const byDevice = new Map(listCompressors(db, null).map((c) => [c.deviceId, c]));
  return demoCompressors.map((c) => {
    const m = demoModels.find((x) => x.name === c.model)!;
    const site = demoSites.find((s) => s.code === c.site)!;
    return {
      compressorId: byDevice.get(c.deviceId)!.id,
      name: c.name,
      spec: {
        deviceId: c.deviceId,
        stages: m.stages,
        ratedDeliveryLpm: m.ratedDeliveryLpm,
        ratedPressureBar: m.ratedPressureBar,
        stopPressureBar: c.stopPressureBar,
        restartPressureBar: c.restartPressureBar,
        bankVolumeL: c.bankVolumeL,
        profile: site.profile,
        timeZone: site.timeZone,
        oilPump: defaultOilPump(m.stages, m.ratedDeliveryLpm),
      },
    };
  });
}

const STEP_S = 5; // the simulator's default telemetry interval

function readingOf(u: Unit, m: CompressorModel, seq: number): ReadingInput {
  const r = m.reading();
  return telemetryToReading(u.compressorId, {
    v: 1,
    seq,
    ts: Math.round(m.timeMs),
    runState: r.runState,
    motorOn: r.motorOn,
    deliveryBar: r.deliveryBar,
    stageBar: r.stageBar,
    stageC: r.stageC,
    oilBar: r.oilBar,
    purifierC: r.purifierC,
    intakeC: r.intakeC,
    hourMeterH: r.hourMeterH,
    starts: r.starts,
    tripCode: r.tripCode,
  });
}

describe("demo thresholds", () => {
  it("are seeded once per model and override, idempotently", () => {
    expect(seeded.limits).toBe(Object.values(demoModelLimits).reduce((n, l) => n + l.length, 0) + 2);
    expect(seeded.sets).toBe(Object.keys(demoModelLimits).length + 2);
    expect(seedDemoThresholds(db)).toEqual({ limits: 0, sets: 0 });
    const units = new Map(listCompressors(db, null).map((c) => [c.deviceId, c]));
    const fill = effectiveLimits(db, units.get("cr-fill")!.id);
    expect(fill.find((l) => limitKey(l) === "finalStageC.high.warning")!.value).toBe(168);
    const boat = effectiveLimits(db, units.get("cr-boat")!.id);
    expect(boat.some((l) => limitKey(l) === "intakeC.low.advisory")).toBe(false);
    expect(effectiveLimits(db, units.get("mb-portable")!.id).some((l) => limitKey(l) === "intakeC.low.advisory")).toBe(true);
    // a trip-level (critical) limit lies beyond its warning or advisory on the same signal and direction
    for (const limits of Object.values(demoModelLimits)) {
      for (const crit of limits.filter((l) => l.priority === "critical")) {
        for (const lower of limits.filter((l) => l.signal === crit.signal && l.direction === crit.direction && l.priority !== "critical")) {
          expect(crit.direction === "high" ? crit.value > lower.value : crit.value < lower.value).toBe(true);
        }
      }
    }
  });

  // Normal simulated operation, a summer and a winter day per unit, through the live engine: nothing may be raised.
  it.each([
    ["a July day", Date.UTC(2025, 6, 16)],
    ["a January day", Date.UTC(2025, 0, 15)],
  ])("do not trip during normal simulated operation on %s", (_label, start) => {
    const engine = createAlarmEngine(db, { now: () => start, log: () => {} });
    const raised: AlarmTransition[] = [];
    for (const u of demoUnits()) {
      const m = new CompressorModel(u.spec, { seed: "airkeep", startMs: start });
      let batch: ReadingInput[] = [];
      for (let i = 1; i <= 86_400 / STEP_S; i++) {
        m.step(STEP_S);
        batch.push(readingOf(u, m, i));
        if (batch.length === 720) {
          raised.push(...engine.onReadings(batch));
          batch = [];
        }
      }
      raised.push(...engine.onReadings(batch));
    }
    expect(engine.stats().readings).toBe((demoUnits().length * 86_400) / STEP_S);
    expect(raised.map((x) => x.text)).toEqual([]);
  }, 60_000);

  // The scripted faults begin while the unit runs: the alarms must come before the machine's own trip.
  function runFault(engine: AlarmEngine, u: Unit, kind: FaultKind, start: number): { texts: string[]; keys: string[]; tripCode: number | null } {
    const m = new CompressorModel(u.spec, { seed: `fault-${kind}`, startMs: start });
    let runningFor = 0;
    let seq = 0;
    const out: AlarmTransition[] = [];
    for (let i = 0; i < (2 * 86_400) / STEP_S; i++) {
      m.step(STEP_S);
      const r = readingOf(u, m, seq++);
      out.push(...engine.onReadings([r]));
      runningFor = m.runState === "running" ? runningFor + STEP_S : 0;
      if (runningFor === 600 && m.activeFaults().length === 0 && seq > 3600 / STEP_S) {
        m.schedule([{ deviceId: u.spec.deviceId, kind, atMs: m.timeMs, durationMs: null }]);
      }
      if (m.runState === "tripped") break;
    }
    const raises = out.filter((x) => x.action === "alarm.raise");
    return { texts: raises.map((x) => x.text), keys: raises.map((x) => x.key), tripCode: m.tripCode };
  }

  it("cooling loss raises the final-stage warning and critical alarms before the machine trips", () => {
    const start = Date.UTC(2025, 3, 2);
    const engine = createAlarmEngine(db, { now: () => start, log: () => {} });
    let warned = 0;
    for (const u of demoUnits()) {
      const res = runFault(engine, u, "cooling", start);
      expect(res.tripCode, u.name).not.toBeNull();
      // The cooling fan's own motor protection may trip the machine first (code 120), before the temperature climbs.
      if (res.tripCode === 120) continue;
      expect(res.tripCode, u.name).toBe(110);
      expect(res.keys, u.name).toEqual(["finalStageC.high.warning", "finalStageC.high.critical", "trip"]);
      warned++;
    }
    expect(warned).toBeGreaterThanOrEqual(4);
  }, 60_000);

  it("oil loss raises the oil-pressure warning and critical alarms before the machine trips", () => {
    const start = Date.UTC(2025, 3, 9);
    const engine = createAlarmEngine(db, { now: () => start, log: () => {} });
    const pumped = demoUnits().filter((u) => u.spec.oilPump);
    expect(pumped.length).toBeGreaterThanOrEqual(4);
    for (const u of pumped) {
      const res = runFault(engine, u, "oil", start);
      expect(res.tripCode, u.name).toBe(210);
      expect(res.keys, u.name).toEqual(["oilBar.low.warning", "oilBar.low.critical", "trip"]);
    }
  }, 60_000);
});
