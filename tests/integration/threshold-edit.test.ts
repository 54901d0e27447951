import { afterEach, beforeEach, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import {
  getThresholdSet,
  readSetRows,
  revertThresholdChange,
  saveThresholdSet,
  thresholdHistory,
  ThresholdRefusal,
  type ThresholdActor,
} from "@/db/threshold-edit";
import { effectiveLimits } from "@/db/thresholds";
import type { AlarmEngine } from "@/db/alarm-engine";
import { limitKey } from "@/shared/alarm-rules";
import type { ThresholdRow } from "@/shared/threshold-schema";
import { at, feed, makeTempDb, modelLimits, newEngine, reading, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

let t: TempDb;
let db: Db;
let fleet: Fleet;
let engineer: ThresholdActor;
let admin: ThresholdActor;

const rowsOfModel = (): ThresholdRow[] => modelLimits.map((l) => ({ ...l, enabled: true }));
const WARNING = "finalStageC.high.warning";

function user(name: string, role: ThresholdActor["role"]): ThresholdActor {
  const id = Number(
    db.$client
      .prepare("INSERT INTO users (email, name, password_hash, role, created_at, updated_at) VALUES (?, ?, 'x', ?, 0, 0)")
      .run(`${role}-${name.split(" ")[0]!.toLowerCase()}@test`, name, role).lastInsertRowid,
  );
  return { userId: id, name, email: `${role}-${name.split(" ")[0]!.toLowerCase()}@test`, role, siteIds: null, units: { pressureUnit: "bar", temperatureUnit: "C" }, ip: "10.0.0.7" };
}

function refusal(fn: () => unknown): ThresholdRefusal {
  try {
    fn();
  } catch (e) {
    if (e instanceof ThresholdRefusal) return e;
    throw e;
  }
  throw new Error("expected a refusal");
}

beforeEach(() => {
  t = makeTempDb("airkeep-thresholds-");
  db = t.db;
  fleet = seedFleet(db);
  engineer = user("Elin Haugen", "engineer");
  admin = user("Ade Brightwater", "admin");
});
afterEach(() => t.cleanup());

describe("saving a set", () => {
  it("writes the rows, bumps the version and audits before/after, who, when and why (also in the event log)", () => {
    const set = getThresholdSet(db, "model", fleet.modelId, engineer)!;
    expect(set.version).toBe(1);
    const limits = set.rows.map((r) => (limitKey(r) === WARNING ? { ...r, value: 150 } : r));
    const res = saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Cooler fitted, warn earlier", limits }, engineer, at(10));
    expect(res.version).toBe(2);
    expect(res.changes).toEqual([{ key: WARNING, kind: "changed", fields: [{ field: "value", before: 160, after: 150 }] }]);
    expect(readSetRows(db, "model", fleet.modelId).find((r) => limitKey(r) === WARNING)!.value).toBe(150);
    expect(effectiveLimits(db, fleet.c1).find((l) => limitKey(l) === WARNING)!.value).toBe(150);

    const audit = db.$client.prepare("SELECT * FROM audit_log WHERE action = 'threshold.update'").all() as Record<string, unknown>[];
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ actor: engineer.email, actor_user_id: engineer.userId, ts: at(10), target_type: "compressor_model", target_id: String(fleet.modelId), ip: "10.0.0.7" });
    const details = JSON.parse(audit[0]!.details as string);
    expect(details).toMatchObject({ reason: "Cooler fitted, warn earlier", fromVersion: 1, toVersion: 2, actorName: "Elin Haugen" });
    expect(details.before.find((r: ThresholdRow) => limitKey(r) === WARNING).value).toBe(160);
    expect(details.after.find((r: ThresholdRow) => limitKey(r) === WARNING).value).toBe(150);

    const event = db.$client.prepare("SELECT kind, action, actor, ts, text FROM events WHERE action = 'threshold.update'").get();
    expect(event).toMatchObject({ kind: "threshold", action: "threshold.update", actor: engineer.email, ts: at(10) });
    expect((event as { text: string }).text).toMatch(new RegExp(`^${engineer.email} changed 1 threshold limit of .+: Cooler fitted, warn earlier$`));

    const history = thresholdHistory(db, "model", fleet.modelId, engineer)!;
    expect(history).toHaveLength(1);
    expect(history[0]).toMatchObject({ actor: "Elin Haugen", reason: "Cooler fitted, warn earlier", fromVersion: 1, toVersion: 2 });
  });

  it("refuses a save based on an older version, with the newer version and who saved it", () => {
    const limits = rowsOfModel().map((r) => (limitKey(r) === WARNING ? { ...r, value: 150 } : r));
    saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "First change", limits }, admin, at(10));
    const mine = rowsOfModel().map((r) => (limitKey(r) === WARNING ? { ...r, value: 155 } : r));
    const e = refusal(() => saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Second change", limits: mine }, engineer, at(20)));
    expect(e.status).toBe(409);
    expect(e.message).toMatch(/Someone else saved this set while you were editing it \(version 2, by Ade Brightwater\)\. Your changes were not saved/);
    // Nothing of the refused save landed; the newer values are what the set shows.
    expect(getThresholdSet(db, "model", fleet.modelId, engineer)!.rows.find((r) => limitKey(r) === WARNING)!.value).toBe(150);
    expect(db.$client.prepare("SELECT count(*) FROM audit_log WHERE action = 'threshold.update'").pluck().get()).toBe(1);
  });

  it("refuses invalid sets with errors at their fields, and a save that changes nothing", () => {
    const bad = rowsOfModel().map((r) => (limitKey(r) === "finalStageC.high.critical" ? { ...r, value: 150 } : r));
    const e = refusal(() => saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "x", limits: bad }, engineer));
    expect(e.status).toBe(400);
    expect(e.fieldErrors).toMatchObject({ reason: ["Say why, in at least 5 characters"], "limits.1.value": ["Must be above the warning high limit (160 °C)"] });
    const same = refusal(() => saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "No change at all", limits: rowsOfModel() }, engineer));
    expect(same).toMatchObject({ status: 400, message: "Nothing to save: the set already has these values." });
  });

  it("checks a compressor's overrides against the template it inherits, and keeps the template's rows apart", () => {
    const tooLow = [{ ...modelLimits[1]!, value: 150, enabled: true }]; // critical below the inherited warning (160)
    const e = refusal(() => saveThresholdSet(db, { scopeType: "compressor", scopeId: fleet.c2, baseVersion: 0, reason: "Try it", limits: tooLow }, engineer));
    expect(e.fieldErrors).toEqual({ "limits.0.value": ["Must be above the warning high limit (160 °C)"] });
    const ok = [{ ...modelLimits[0]!, value: 170, enabled: true }, { ...modelLimits[3]!, enabled: false }];
    expect(saveThresholdSet(db, { scopeType: "compressor", scopeId: fleet.c2, baseVersion: 0, reason: "Fill station runs hot", limits: ok }, engineer).version).toBe(1);
    const set = getThresholdSet(db, "compressor", fleet.c2, engineer)!;
    expect(set.rows.map((r) => [limitKey(r), r.value, r.enabled])).toEqual([
      ["deliveryBar.high.advisory", 310, false],
      [WARNING, 170, true],
    ]);
    expect(set.inherited).toHaveLength(modelLimits.length);
    expect(effectiveLimits(db, fleet.c2).map(limitKey)).not.toContain("deliveryBar.high.advisory");
    expect(effectiveLimits(db, fleet.c1).map(limitKey)).toContain("deliveryBar.high.advisory");
  });

  it("a template that also governs sites outside the person's is theirs to read, not to change", () => {
    const scoped = { ...engineer, siteIds: [fleet.siteA] };
    expect(getThresholdSet(db, "model", fleet.modelId, scoped)!.readOnlyReason).toMatch(/sites outside yours/);
    const e = refusal(() =>
      saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Change it anyway", limits: rowsOfModel().slice(1) }, scoped),
    );
    expect(e.status).toBe(403);
    // A compressor of another site reads as not existing.
    expect(getThresholdSet(db, "compressor", fleet.c2, scoped)).toBeNull();
    expect(refusal(() => saveThresholdSet(db, { scopeType: "compressor", scopeId: fleet.c2, baseVersion: 0, reason: "Override", limits: [] }, scoped)).status).toBe(404);
    // Its own site's compressor is fine.
    expect(saveThresholdSet(db, { scopeType: "compressor", scopeId: fleet.c1, baseVersion: 0, reason: "Own site", limits: [{ ...modelLimits[0]!, value: 165, enabled: true }] }, scoped).version).toBe(1);
  });
});

describe("revert", () => {
  it("puts the set back as it was before a change, audited and version-checked like a save", () => {
    const limits = rowsOfModel().map((r) => (limitKey(r) === WARNING ? { ...r, value: 150 } : r));
    saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Warn earlier", limits }, engineer, at(10));
    const [change] = thresholdHistory(db, "model", fleet.modelId, engineer)!;

    expect(refusal(() => revertThresholdChange(db, { auditId: change!.id, baseVersion: 1 }, admin, at(20))).status).toBe(409);
    const res = revertThresholdChange(db, { auditId: change!.id, baseVersion: 2 }, admin, at(20));
    expect(res.version).toBe(3);
    expect(readSetRows(db, "model", fleet.modelId).find((r) => limitKey(r) === WARNING)!.value).toBe(160);
    const history = thresholdHistory(db, "model", fleet.modelId, engineer)!;
    expect(history.map((h) => [h.actor, h.fromVersion, h.toVersion, h.revertOf])).toEqual([
      ["Ade Brightwater", 2, 3, change!.id],
      ["Elin Haugen", 1, 2, null],
    ]);
    expect(history[0]!.reason).toMatch(new RegExp(`^Reverted change #${change!.id} \\(version 1 → 2, by Elin Haugen\\): Warn earlier`));
    expect(db.$client.prepare("SELECT count(*) FROM events WHERE action = 'threshold.update'").pluck().get()).toBe(2);
    expect(refusal(() => revertThresholdChange(db, { auditId: 99_999, baseVersion: 3 }, admin)).status).toBe(404);
  });
});

describe("the live engine picks a saved change up without a restart", () => {
  let engine: AlarmEngine;
  const clock = { now: at(-200) };

  beforeEach(() => {
    clock.now = at(-200);
    engine = newEngine(db, clock);
    for (let s = -100; s <= 0; s++) feed(db, engine, [reading(fleet.c1, s)]);
  });

  it("within 2 s: the next tick (the ingester ticks every second) reloads, and a reading past the new limit raises", () => {
    expect(engine.limitsOf(fleet.c1).find((l) => limitKey(l) === WARNING)!.value).toBe(160);
    // 155 °C is under the warning in force: no alarm.
    for (let s = 1; s <= 15; s++) feed(db, engine, [reading(fleet.c1, s, { finalC: 155 })]);
    expect(db.$client.prepare("SELECT count(*) FROM alarms").pluck().get()).toBe(0);

    const limits = rowsOfModel().map((r) => (limitKey(r) === WARNING ? { ...r, value: 150 } : r));
    const savedAt = at(16);
    saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Warn earlier", limits }, engineer, savedAt);
    clock.now = savedAt + 1000;
    engine.tick(clock.now);
    expect(engine.stats().reloads).toBe(1);
    expect(engine.limitsOf(fleet.c1).find((l) => limitKey(l) === WARNING)!.value).toBe(150);

    // The same 155 °C now lies beyond the warning: raised after its 10 s on-delay.
    const transitions = [];
    for (let s = 17; s <= 28; s++) transitions.push(...feed(db, engine, [reading(fleet.c1, s, { finalC: 155 })]));
    expect(transitions.map((x) => [x.action, x.key])).toEqual([["alarm.raise", WARNING]]);
    expect(db.$client.prepare("SELECT key, limit_value AS limitValue, state FROM alarms").get()).toEqual({
      key: WARNING,
      limitValue: 150,
      state: "active-unacknowledged",
    });
    // The reload happened within 2 s of the save.
    expect(clock.now - savedAt).toBeLessThanOrEqual(2000);
  });

  it("a revert is picked up the same way", () => {
    const limits = rowsOfModel().map((r) => (limitKey(r) === WARNING ? { ...r, value: 150 } : r));
    saveThresholdSet(db, { scopeType: "model", scopeId: fleet.modelId, baseVersion: 1, reason: "Warn earlier", limits }, engineer, at(1));
    engine.tick(at(2));
    const [change] = thresholdHistory(db, "model", fleet.modelId, engineer)!;
    revertThresholdChange(db, { auditId: change!.id, baseVersion: 2 }, engineer, at(3));
    engine.tick(at(4));
    expect(engine.limitsOf(fleet.c1).find((l) => limitKey(l) === WARNING)!.value).toBe(160);
    expect(engine.stats().reloads).toBe(2);
  });
});
