import { afterEach, beforeEach, describe, expect, it } from "vitest";
import {
  acknowledgeAlarms,
  activeAlarmCounts,
  getAlarm,
  listAlarms,
  returnToService,
  setOutOfService,
  shelveAlarms,
} from "@/db/alarms";
import type { Db } from "@/db/client";
import type { AlarmEngine } from "@/db/alarm-engine";
import { at, feed, makeTempDb, newEngine, reading, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

// Operator transitions are checked against the ANSI/ISA-18.2-2016 state diagram: an input that does not apply in the
// alarm's state is refused with a reason, never silently applied.

let t: TempDb;
let db: Db;
let fleet: Fleet;
let engine: AlarmEngine;
const clock = { now: at(0) };
let ids: { c1Oil: number; c1Temp: number; c2Delivery: number };

beforeEach(() => {
  t = makeTempDb();
  db = t.db;
  fleet = seedFleet(db);
  clock.now = at(-200);
  engine = newEngine(db, clock);
  for (let s = -100; s <= 0; s++) feed(db, engine, [reading(fleet.c1, s), reading(fleet.c2, s)]);
  for (let s = 1; s <= 12; s++) {
    feed(db, engine, [reading(fleet.c1, s, { oilBar: 1.0, finalC: 165 }), reading(fleet.c2, s, { deliveryBar: 320 })]);
  }
  const id = (c: number, key: string) =>
    db.$client.prepare("SELECT id FROM alarms WHERE compressor_id = ? AND key = ?").pluck().get(c, key) as number;
  ids = { c1Oil: id(fleet.c1, "oilBar.low.critical"), c1Temp: id(fleet.c1, "finalStageC.high.warning"), c2Delivery: id(fleet.c2, "deliveryBar.high.advisory") };
});
afterEach(() => t.cleanup());

const who = (siteIds: number[] | null) => ({ userId: fleet.supervisor, actor: "Sam Okafor", siteIds, now: at(20) });

describe("site scope", () => {
  it("lists only the sites a person may see, critical first then newest", () => {
    expect(listAlarms(db, { siteIds: null }).map((a) => [a.compressorName, a.priority, a.key])).toEqual([
      ["HR-1 Bay compressor", "critical", "oilBar.low.critical"],
      ["HR-1 Bay compressor", "warning", "finalStageC.high.warning"],
      ["CR-2 Bank charger", "advisory", "deliveryBar.high.advisory"],
    ]);
    expect(listAlarms(db, { siteIds: [fleet.siteB] }).map((a) => a.id)).toEqual([ids.c2Delivery]);
    expect(listAlarms(db, { siteIds: [] })).toEqual([]);
    expect(listAlarms(db, { siteIds: null, priority: "warning" }).map((a) => a.id)).toEqual([ids.c1Temp]);
    expect(listAlarms(db, { siteIds: null, compressorId: fleet.c2 }).map((a) => a.id)).toEqual([ids.c2Delivery]);
    expect([...activeAlarmCounts(db, [fleet.siteA]).entries()]).toEqual([[fleet.c1, { critical: 1, warning: 1, advisory: 0 }]]);
    expect(getAlarm(db, ids.c2Delivery)).toMatchObject({ siteName: "Cobalt Reef Dive Centre", timeZone: "Europe/Malta", title: "Delivery pressure high" });
    expect(getAlarm(db, 9999)).toBeNull();
  });

  it("refuses to acknowledge outside the person's sites and acknowledges the rest in the same request", () => {
    const res = acknowledgeAlarms(db, { ...who([fleet.siteA]), ids: [ids.c1Oil, ids.c2Delivery, 9999], comment: "Oil level checked" });
    expect(res.done).toEqual([ids.c1Oil]);
    expect(res.refused).toEqual([
      { id: ids.c2Delivery, reason: "No such alarm" },
      { id: 9999, reason: "No such alarm" },
    ]);
    expect(getAlarm(db, ids.c2Delivery)!.state).toBe("active-unacknowledged");
    expect(getAlarm(db, ids.c1Oil)).toMatchObject({ state: "active-acknowledged", ackByName: "Sam Okafor", ackComment: "Oil level checked", ackAt: at(20) });
  });

  it("refuses shelving, removal from service and return to service outside the person's sites", () => {
    const scope = who([fleet.siteB]);
    expect(shelveAlarms(db, { ...scope, ids: [ids.c1Temp], comment: "Fan being replaced", minutes: 60 }).refused[0]!.reason).toBe(
      "No such alarm",
    );
    expect(setOutOfService(db, { ...scope, id: ids.c1Oil, reason: "Transmitter faulty" }).refused[0]!.reason).toBe("No such alarm");
    setOutOfService(db, { ...who(null), id: ids.c1Oil, reason: "Transmitter faulty" });
    expect(returnToService(db, { ...scope, id: ids.c1Oil, comment: "Transmitter replaced" }).refused[0]!.reason).toBe("No such alarm");
    expect(getAlarm(db, ids.c1Oil)!.state).toBe("out-of-service");
  });
});

describe("transitions that do not apply are refused with a reason", () => {
  it("acknowledging twice", () => {
    acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "Oil level checked" });
    expect(acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "Again" }).refused).toEqual([{ id: ids.c1Oil, reason: "Already acknowledged" }]);
  });

  it("acknowledging a shelved alarm, shelving one back to normal, a too short comment or shelf time", () => {
    shelveAlarms(db, { ...who(null), ids: [ids.c1Temp], comment: "Fan being replaced", minutes: 30 });
    expect(acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Temp], comment: "Seen" }).refused[0]!.reason).toMatch(/^Shelved/);
    // c2's delivery returns, is acknowledged and so back to normal: nothing left to shelve
    for (let s = 13; s <= 14; s++) feed(db, engine, [reading(fleet.c2, s)]);
    acknowledgeAlarms(db, { ...who(null), ids: [ids.c2Delivery], comment: "Bank vented" });
    expect(getAlarm(db, ids.c2Delivery)!.state).toBe("normal");
    expect(shelveAlarms(db, { ...who(null), ids: [ids.c2Delivery], comment: "Gauge test", minutes: 30 }).refused[0]!.reason).toMatch(/^Already back to normal/);
    expect(acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "ok" }).refused[0]!.reason).toMatch(/at least 3 characters/);
    expect(shelveAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "Fan being replaced", minutes: 2 }).refused[0]!.reason).toBe("At least 5 minutes");
    expect(shelveAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "Fan being replaced", minutes: 60 * 25 }).refused[0]!.reason).toBe("At most 24 hours");
  });

  it("shelving or acknowledging an alarm suppressed by design, and return to service of one in service", () => {
    feed(db, engine, [reading(fleet.c1, 13, { runState: "standby" })]);
    expect(getAlarm(db, ids.c1Temp)!.state).toBe("suppressed");
    expect(shelveAlarms(db, { ...who(null), ids: [ids.c1Temp], comment: "Fan being replaced", minutes: 30 }).refused[0]!.reason).toMatch(/^Suppressed by design/);
    expect(acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Temp], comment: "Seen it" }).refused[0]!.reason).toMatch(/^Suppressed by design/);
    expect(returnToService(db, { ...who(null), id: ids.c2Delivery, comment: "Gauge replaced" }).refused[0]!.reason).toBe("Not out of service");
  });

  it("removing from service twice", () => {
    expect(setOutOfService(db, { ...who(null), id: ids.c2Delivery, reason: "Gauge under test" }).done).toEqual([ids.c2Delivery]);
    expect(setOutOfService(db, { ...who(null), id: ids.c2Delivery, reason: "Gauge under test" }).refused[0]!.reason).toBe("Already out of service");
    // returned to service while the condition is present: announced again, unacknowledged
    expect(returnToService(db, { ...who(null), id: ids.c2Delivery, comment: "Gauge replaced" }).done).toEqual([ids.c2Delivery]);
    expect(getAlarm(db, ids.c2Delivery)).toMatchObject({ state: "active-unacknowledged", outOfServiceReason: null });
  });
});

describe("every operator transition is in the event log with who and why", () => {
  it("acknowledge, shelve, out of service and return to service", () => {
    acknowledgeAlarms(db, { ...who(null), ids: [ids.c1Oil], comment: "Oil level checked" });
    shelveAlarms(db, { ...who(null), ids: [ids.c1Temp], comment: "Fan being replaced", minutes: 90 });
    setOutOfService(db, { ...who(null), id: ids.c2Delivery, reason: "Gauge under test" });
    returnToService(db, { ...who(null), id: ids.c2Delivery, comment: "Gauge replaced" });
    const rows = db.$client
      .prepare("SELECT kind, action, actor, alarm_id AS alarmId, text FROM events WHERE actor <> '' ORDER BY id")
      .all();
    expect(rows).toEqual([
      { kind: "acknowledge", action: "alarm.acknowledge", actor: "Sam Okafor", alarmId: ids.c1Oil, text: "Sam Okafor acknowledged HR-1 Bay compressor: Oil pressure low (critical): “Oil level checked”" },
      { kind: "shelve", action: "alarm.shelve", actor: "Sam Okafor", alarmId: ids.c1Temp, text: "Sam Okafor shelved HR-1 Bay compressor: Final-stage temperature high (warning) for 1 h 30 min: “Fan being replaced”" },
      { kind: "alarm", action: "alarm.out_of_service", actor: "Sam Okafor", alarmId: ids.c2Delivery, text: "Sam Okafor removed CR-2 Bank charger: Delivery pressure high (advisory) from service: “Gauge under test”" },
      { kind: "alarm", action: "alarm.return_to_service", actor: "Sam Okafor", alarmId: ids.c2Delivery, text: "Sam Okafor returned CR-2 Bank charger: Delivery pressure high (advisory) to service; condition present, announced again: “Gauge replaced”" },
    ]);
    // full-text search finds the comment
    expect(db.$client.prepare("SELECT count(*) FROM events_fts WHERE events_fts MATCH 'gauge'").pluck().get()).toBe(2);
  });
});
