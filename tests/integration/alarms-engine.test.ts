import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { acknowledgeAlarms, activeAlarmCounts, listAlarms, returnToService, setOutOfService, shelveAlarms } from "@/db/alarms";
import type { Db } from "@/db/client";
import type { AlarmEngine } from "@/db/alarm-engine";
import type { AlarmState } from "@/shared/alarm-lifecycle";
import { at, feed, makeTempDb, newEngine, reading, seedFleet, type Fleet, type ReadingPatch, type TempDb } from "./alarms-fixtures";

// Expected state transitions follow ANSI/ISA-18.2-2016 (IEC 62682), alarm state transition diagram:
// A normal · B active-unacknowledged · C active-acknowledged · D cleared-unacknowledged (return to normal unacknowledged),
// plus shelved, suppressed by design and out of service.

const WARN = "finalStageC.high.warning";
const CRIT = "finalStageC.high.critical";
const OIL = "oilBar.low.critical";
const DELIVERY = "deliveryBar.high.advisory";

type Step =
  /** Readings every second from s1 to s2 inclusive (c1 unless the patch names another compressor). */
  | ["run", number, number, ReadingPatch?]
  | ["ack", number, string]
  | ["shelve", number, string, number]
  | ["oos", number, string]
  | ["rts", number, string]
  | ["tick", number]
  | ["commsLost", number]
  | ["commsRestored", number];

type Case = { name: string; steps: Step[]; events: string[]; final: Record<string, AlarmState | "none"> };

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
  // Prelude: the unit has been running, settled, normal values, for 100 s.
  runSteps([["run", -100, 0]]);
});

afterEach(() => t.cleanup());

function openRow(key: string) {
  return db.$client.prepare("SELECT * FROM alarms WHERE compressor_id = ? AND key = ? ORDER BY id DESC LIMIT 1").get(fleet.c1, key) as
    | { id: number; state: AlarmState; active: number; chattering: number; trip_code: number | null; re_alarmed_at: number | null }
    | undefined;
}

function runSteps(steps: Step[]): void {
  const who = { userId: 0, actor: "Sam Okafor", siteIds: null };
  for (const step of steps) {
    switch (step[0]) {
      case "run": {
        const [, from, to, patch] = step;
        for (let s = from; s <= to; s++) {
          clock.now = at(s) + 250;
          feed(db, engine, [reading(patch?.compressorId ?? fleet.c1, s, patch)], clock.now);
        }
        break;
      }
      case "ack":
        clock.now = at(step[1]);
        acknowledgeAlarms(db, { ...who, userId: fleet.supervisor, ids: [openRow(step[2])!.id], comment: "Checked on site", now: clock.now });
        break;
      case "shelve":
        clock.now = at(step[1]);
        shelveAlarms(db, { ...who, userId: fleet.supervisor, ids: [openRow(step[2])!.id], comment: "Fan being replaced", minutes: step[3], now: clock.now });
        break;
      case "oos":
        clock.now = at(step[1]);
        setOutOfService(db, { ...who, userId: fleet.supervisor, id: openRow(step[2])!.id, reason: "Transmitter replaced", now: clock.now });
        break;
      case "rts":
        clock.now = at(step[1]);
        returnToService(db, { ...who, userId: fleet.supervisor, id: openRow(step[2])!.id, comment: "Transmitter calibrated", now: clock.now });
        break;
      case "tick":
        clock.now = at(step[1]);
        engine.tick(clock.now);
        break;
      case "commsLost":
        clock.now = at(step[1]);
        engine.onCommsLost(fleet.c1, clock.now);
        break;
      case "commsRestored":
        clock.now = at(step[1]);
        engine.onCommsRestored(fleet.c1, clock.now);
        break;
    }
  }
}

/** "@s action key from→to" for every alarm transition in the event log. */
function transitions(): string[] {
  return (db.$client.prepare("SELECT ts, action, details FROM events ORDER BY id").all() as { ts: number; action: string; details: string }[]).map(
    (e) => {
      const d = JSON.parse(e.details) as { key: string; from: string; to: string };
      return `@${(e.ts - at(0)) / 1000} ${e.action} ${d.key} ${d.from}→${d.to}`;
    },
  );
}

const hot = { finalC: 165 };
const cool = { finalC: 150 };

const cases: Case[] = [
  {
    name: "raise → acknowledge → clear → normal (A → B → C → A)",
    steps: [["run", 1, 12, hot], ["ack", 13, WARN], ["run", 13, 20, cool]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@13 alarm.acknowledge ${WARN} active-unacknowledged→active-acknowledged`,
      `@18 alarm.clear ${WARN} active-acknowledged→normal`,
    ],
    final: { [WARN]: "normal" },
  },
  {
    name: "clear before acknowledge → cleared-unacknowledged → acknowledge → normal (A → B → D → A)",
    steps: [["run", 1, 12, hot], ["run", 13, 20, cool], ["ack", 21, WARN]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@18 alarm.clear ${WARN} active-unacknowledged→cleared-unacknowledged`,
      `@21 alarm.acknowledge ${WARN} cleared-unacknowledged→normal`,
    ],
    final: { [WARN]: "normal" },
  },
  {
    name: "a cleared, unacknowledged alarm that comes back re-activates the same alarm (D → B)",
    steps: [["run", 1, 12, hot], ["run", 13, 20, cool], ["run", 21, 31, hot]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@18 alarm.clear ${WARN} active-unacknowledged→cleared-unacknowledged`,
      `@31 alarm.raise ${WARN} cleared-unacknowledged→active-unacknowledged`,
    ],
    final: { [WARN]: "active-unacknowledged" },
  },
  {
    name: "shelving hides the alarm; when it expires a still-active alarm is announced again",
    steps: [["run", 1, 12, hot], ["shelve", 13, WARN, 5], ["tick", 312], ["tick", 313]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@13 alarm.shelve ${WARN} active-unacknowledged→shelved`,
      `@313 alarm.unshelve ${WARN} shelved→active-unacknowledged`,
    ],
    final: { [WARN]: "active-unacknowledged" },
  },
  {
    name: "a shelved alarm whose condition cleared returns to normal when shelving expires",
    steps: [["run", 1, 12, hot], ["shelve", 13, WARN, 5], ["run", 14, 20, cool], ["tick", 313]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@13 alarm.shelve ${WARN} active-unacknowledged→shelved`,
      `@19 alarm.clear ${WARN} shelved→shelved`,
      `@313 alarm.unshelve ${WARN} shelved→normal`,
    ],
    final: { [WARN]: "normal" },
  },
  {
    name: "re-alarm: acknowledged and still active after the re-alarm time, announced again (C → B)",
    steps: [["run", 1, 12, hot], ["ack", 13, WARN], ["tick", 612], ["tick", 613]],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@13 alarm.acknowledge ${WARN} active-unacknowledged→active-acknowledged`,
      `@613 alarm.re_alarm ${WARN} active-acknowledged→active-unacknowledged`,
    ],
    final: { [WARN]: "active-unacknowledged" },
  },
  {
    name: "designed suppression while stopped; returns to normal when the unit has settled with the condition gone",
    steps: [
      ["run", 1, 12, hot],
      ["run", 13, 40, { runState: "standby", finalC: null }],
      ["run", 41, 42, { runState: "starting", finalC: 60 }],
      ["run", 43, 110, cool],
    ],
    events: [
      `@11 alarm.raise ${WARN} normal→active-unacknowledged`,
      `@13 alarm.suppress ${WARN} active-unacknowledged→suppressed`,
      `@103 alarm.unsuppress ${WARN} suppressed→normal`,
    ],
    final: { [WARN]: "normal", [OIL]: "none" },
  },
  {
    name: "a suppressed alarm whose condition is still there after settling is announced again (suppressed → B)",
    steps: [
      ["run", 1, 2, { oilBar: 1.0 }],
      ["run", 3, 20, { runState: "standby" }],
      ["run", 21, 21, { runState: "starting", oilBar: 1.0 }],
      ["run", 22, 90, { oilBar: 1.0 }],
    ],
    events: [
      `@1 alarm.raise ${OIL} normal→active-unacknowledged`,
      `@3 alarm.suppress ${OIL} active-unacknowledged→suppressed`,
      `@82 alarm.raise ${OIL} suppressed→active-unacknowledged`,
    ],
    final: { [OIL]: "active-unacknowledged" },
  },
  {
    name: "comms loss is a warning alarm, raised once; restore clears it",
    steps: [["commsLost", 5], ["commsLost", 6], ["commsRestored", 30], ["ack", 31, "comms"]],
    events: [
      "@5 alarm.raise comms normal→active-unacknowledged",
      "@30 alarm.clear comms active-unacknowledged→cleared-unacknowledged",
      "@31 alarm.acknowledge comms cleared-unacknowledged→normal",
    ],
    final: { comms: "normal" },
  },
  {
    name: "the machine's trip is a critical alarm carrying its code; reset clears it",
    steps: [
      ["run", 1, 1, hot],
      ["run", 2, 20, { runState: "tripped", tripCode: 110, finalC: 190 }],
      ["run", 21, 30, { runState: "stopped" }],
    ],
    events: ["@2 alarm.raise trip normal→active-unacknowledged", "@21 alarm.clear trip active-unacknowledged→cleared-unacknowledged"],
    // Temperature alarms are suppressed by design once the unit is no longer running: no warning from the 190 °C.
    final: { trip: "cleared-unacknowledged", [WARN]: "none", [CRIT]: "none" },
  },
  {
    name: "out of service holds the alarm whatever the condition does; return to service re-evaluates it",
    steps: [["run", 1, 1, { oilBar: 1.0 }], ["oos", 2, OIL], ["run", 3, 5, {}], ["run", 6, 6, { oilBar: 1.0 }], ["run", 7, 8, {}], ["rts", 9, OIL]],
    events: [
      `@1 alarm.raise ${OIL} normal→active-unacknowledged`,
      `@2 alarm.out_of_service ${OIL} active-unacknowledged→out-of-service`,
      `@3 alarm.clear ${OIL} out-of-service→out-of-service`,
      `@6 alarm.raise ${OIL} out-of-service→out-of-service`,
      `@7 alarm.clear ${OIL} out-of-service→out-of-service`,
      `@9 alarm.return_to_service ${OIL} out-of-service→normal`,
    ],
    final: { [OIL]: "normal" },
  },
];

describe("alarm engine through the ISA-18.2 lifecycle, on a real SQLite file", () => {
  for (const c of cases) {
    it(c.name, () => {
      runSteps(c.steps);
      expect(transitions()).toEqual(c.events);
      for (const [key, state] of Object.entries(c.final)) expect(openRow(key)?.state ?? "none", key).toBe(state);
    });
  }
});

describe("alarm rows and event text", () => {
  it("writes the sentence people read: what, where, value against limit", () => {
    runSteps([["run", 1, 1, { finalC: 182.4 }]]);
    const texts = (db.$client.prepare("SELECT kind, text FROM events ORDER BY id").all() as { kind: string; text: string }[]);
    expect(texts).toEqual([{ kind: "alarm", text: "HR-1 Bay compressor: final-stage temperature 182.4 °C above critical limit 180 °C" }]);
    runSteps([["run", 2, 11, { finalC: 182.4 }]]);
    expect(db.$client.prepare("SELECT text FROM events ORDER BY id DESC LIMIT 1").pluck().get()).toBe(
      "HR-1 Bay compressor: final-stage temperature 182.4 °C above warning limit 160 °C",
    );
    const [crit] = listAlarms(db, { siteIds: null });
    expect(crit).toMatchObject({ title: "Final-stage temperature high", priority: "critical", value: 182.4, limitValue: 180, siteName: "Heronfold Ridge Fire Station" });
  });

  it("a trip carries the machine's code into the row, the title and the event", () => {
    runSteps([["run", 1, 3, { runState: "tripped", tripCode: 110 }]]);
    const [trip] = listAlarms(db, { siteIds: null });
    expect(trip).toMatchObject({ key: "trip", priority: "critical", tripCode: 110, title: "Trip 110: Final stage over-temperature" });
    const ev = db.$client.prepare("SELECT kind, text FROM events WHERE action = 'alarm.raise'").get() as { kind: string; text: string };
    expect(ev.kind).toBe("trip");
    expect(ev.text).toContain("HR-1 Bay compressor: tripped (code 110, Final stage over-temperature)");
  });

  it("the third raise inside the chatter window marks the alarm chattering", () => {
    const steps: Step[] = [];
    for (let k = 0; k < 3; k++) steps.push(["run", 1 + k * 20, 10 + k * 20, { deliveryBar: 320 }], ["run", 11 + k * 20, 20 + k * 20, {}]);
    runSteps(steps);
    const row = openRow(DELIVERY)!;
    expect(row.chattering).toBe(1);
    expect(db.$client.prepare("SELECT count(*) FROM alarms WHERE key = ?").pluck().get(DELIVERY)).toBe(1);
    expect(db.$client.prepare("SELECT text FROM events WHERE action = 'alarm.raise' ORDER BY id DESC").pluck().get()).toContain("chattering");
  });

  it("a shelved alarm is not counted on the board and not among the annunciated alarms", () => {
    runSteps([["run", 1, 12, hot]]);
    expect(activeAlarmCounts(db, null).get(fleet.c1)).toEqual({ critical: 0, warning: 1, advisory: 0 });
    runSteps([["shelve", 13, WARN, 30]]);
    expect(activeAlarmCounts(db, null).get(fleet.c1)).toBeUndefined();
    expect(listAlarms(db, { siteIds: null, states: ["active-unacknowledged", "active-acknowledged", "cleared-unacknowledged"] })).toEqual([]);
    expect(listAlarms(db, { siteIds: null })[0]).toMatchObject({ state: "shelved", shelveComment: "Fan being replaced", shelvedUntil: at(13) + 30 * 60_000 });
  });

  it("a reading older than one already evaluated (redelivery) changes nothing", () => {
    runSteps([["run", 1, 12, hot]]);
    const before = transitions();
    expect(feed(db, engine, [reading(fleet.c1, 5, cool), reading(fleet.c1, 12, cool)])).toEqual([]);
    expect(transitions()).toEqual(before);
  });

  it("a restart hidden in a gap (start counter moved on) restarts the settling time", () => {
    runSteps([["run", 1, 12, hot]]);
    // No readings for 10 minutes; the unit stopped and started again in between.
    feed(db, engine, [reading(fleet.c1, 612, { ...hot, starts: 101 })]);
    expect(openRow(WARN)!.state).toBe("suppressed");
  });
});
