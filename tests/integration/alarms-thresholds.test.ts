import { afterEach, beforeEach, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { allEffectiveLimits, effectiveLimits, thresholdsVersion } from "@/db/thresholds";
import type { AlarmEngine } from "@/db/alarm-engine";
import { limitKey, type Limit } from "@/shared/alarm-rules";
import { at, feed, makeTempDb, modelLimits, newEngine, reading, seedFleet, setLimits, type Fleet, type TempDb } from "./alarms-fixtures";

let t: TempDb;
let db: Db;
let fleet: Fleet;
let engine: AlarmEngine;
const clock = { now: at(0) };

beforeEach(() => {
  t = makeTempDb();
  db = t.db;
  fleet = seedFleet(db);
  clock.now = at(-200);
  engine = newEngine(db, clock);
  for (let s = -100; s <= 0; s++) feed(db, engine, [reading(fleet.c1, s), reading(fleet.c2, s)]);
});
afterEach(() => t.cleanup());

const warning = modelLimits.find((l) => limitKey(l) === "finalStageC.high.warning")!;

describe("effective limits", () => {
  it("are the model's template overridden by the compressor's own, matched on signal, direction and priority", () => {
    setLimits(db, "compressor", fleet.c2, [
      { ...warning, value: 170 },
      { ...modelLimits.find((l) => l.signal === "deliveryBar")!, enabled: false },
    ], at(1));
    const c1 = effectiveLimits(db, fleet.c1);
    const c2 = effectiveLimits(db, fleet.c2);
    expect(c1.map(limitKey).sort()).toEqual(modelLimits.map(limitKey).sort());
    expect(c2.find((l) => limitKey(l) === limitKey(warning))!.value).toBe(170);
    expect(c2.some((l) => l.signal === "deliveryBar")).toBe(false);
    expect(c2).toHaveLength(modelLimits.length - 1);
    const all = allEffectiveLimits(db);
    expect(all.get(fleet.c1)).toEqual(c1);
    expect(all.get(fleet.c2)).toEqual(c2);
    expect(effectiveLimits(db, 9999)).toEqual([]);
  });

  it("their version changes with any edit, even one that keeps the same time stamp", () => {
    const v0 = thresholdsVersion(db);
    db.$client.prepare("UPDATE threshold_limits SET value = value + 1 WHERE signal = 'oilBar'").run();
    const v1 = thresholdsVersion(db);
    expect(v1).not.toBe(v0);
    db.$client.prepare("UPDATE threshold_limits SET deadband = 0.5, value = value - 1 WHERE signal = 'oilBar'").run();
    expect(thresholdsVersion(db)).not.toBe(v1);
    const v2 = thresholdsVersion(db);
    db.$client.prepare("UPDATE threshold_limits SET enabled = 0 WHERE signal = 'oilBar'").run();
    expect(thresholdsVersion(db)).not.toBe(v2);
    const v3 = thresholdsVersion(db);
    db.$client.prepare("UPDATE compressors SET model_id = model_id WHERE id = ?").run(fleet.c1);
    expect(thresholdsVersion(db)).toBe(v3);
  });
});

describe("the engine reloads thresholds without a restart", () => {
  it("a changed limit applies from the next tick (the ingester ticks every second)", () => {
    setLimits(db, "model", fleet.modelId, modelLimits.map((l) => (limitKey(l) === limitKey(warning) ? { ...l, value: 170 } : l)), at(1));
    expect(engine.limitsOf(fleet.c1).find((l) => limitKey(l) === limitKey(warning))!.value).toBe(160);
    clock.now = at(1.5);
    engine.tick(clock.now);
    expect(engine.limitsOf(fleet.c1).find((l) => limitKey(l) === limitKey(warning))!.value).toBe(170);
    expect(engine.stats().reloads).toBe(1);
    for (let s = 2; s <= 20; s++) feed(db, engine, [reading(fleet.c1, s, { finalC: 165 })]);
    expect(db.$client.prepare("SELECT count(*) FROM alarms").pluck().get()).toBe(0);
    for (let s = 21; s <= 31; s++) feed(db, engine, [reading(fleet.c1, s, { finalC: 172 })]);
    const row = db.$client.prepare("SELECT key, limit_value AS limitValue FROM alarms").get();
    expect(row).toEqual({ key: limitKey(warning), limitValue: 170 });
    engine.tick(at(32));
    expect(engine.stats().reloads).toBe(1);
  });

  it("an active alarm whose limit is removed is cleared with the reason, and must still be acknowledged", () => {
    for (let s = 1; s <= 3; s++) feed(db, engine, [reading(fleet.c1, s, { oilBar: 1.0 })]);
    const without = modelLimits.filter((l: Limit) => l.signal !== "oilBar");
    setLimits(db, "model", fleet.modelId, without, at(4));
    engine.tick(at(4));
    const row = db.$client.prepare("SELECT state, active FROM alarms WHERE key = 'oilBar.low.critical'").get();
    expect(row).toEqual({ state: "cleared-unacknowledged", active: 0 });
    expect(db.$client.prepare("SELECT text FROM events ORDER BY id DESC LIMIT 1").pluck().get()).toBe(
      "HR-1 Bay compressor: oil pressure low (critical) cleared: the limit was removed",
    );
    // No further evaluation of the removed limit.
    for (let s = 5; s <= 8; s++) feed(db, engine, [reading(fleet.c1, s, { oilBar: 1.0 })]);
    expect(db.$client.prepare("SELECT count(*) FROM events").pluck().get()).toBe(2);
  });

  it("a compressor override switching an inherited limit off applies to that compressor only", () => {
    setLimits(db, "compressor", fleet.c1, [{ ...modelLimits.find((l) => l.signal === "deliveryBar")!, enabled: false }], at(1));
    engine.tick(at(1));
    for (let s = 2; s <= 4; s++) feed(db, engine, [reading(fleet.c1, s, { deliveryBar: 320 }), reading(fleet.c2, s, { deliveryBar: 320 })]);
    const rows = db.$client.prepare("SELECT compressor_id AS c, key FROM alarms").all();
    expect(rows).toEqual([{ c: fleet.c2, key: "deliveryBar.high.advisory" }]);
  });

  it("a restarted engine picks up limits changed while it was down, and clears what they removed", () => {
    for (let s = 1; s <= 3; s++) feed(db, engine, [reading(fleet.c1, s, { deliveryBar: 320 })]);
    setLimits(db, "model", fleet.modelId, modelLimits.filter((l) => l.signal !== "deliveryBar"), at(4));
    const second = newEngine(db, clock);
    expect(second.limitsOf(fleet.c1).some((l) => l.signal === "deliveryBar")).toBe(false);
    expect(db.$client.prepare("SELECT state FROM alarms WHERE key = 'deliveryBar.high.advisory'").pluck().get()).toBe("cleared-unacknowledged");
  });
});
