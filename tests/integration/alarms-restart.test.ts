import { beforeAll, describe, expect, it } from "vitest";
import { acknowledgeAlarms, shelveAlarms } from "@/db/alarms";
import type { Db } from "@/db/client";
import type { AlarmEngine } from "@/db/alarm-engine";
import type { AlarmSettings } from "@/shared/alarm-rules";
import type { ReadingInput } from "@/shared/telemetry";
import { at, dump, feed, makeTempDb, newEngine, reading, seedFleet, type Fleet, type ReadingPatch } from "./alarms-fixtures";

// A scripted ten minutes of two compressors that exercises every transition of the ISA-18.2 lifecycle the engine drives
// (raise, clear, suppression by design and its end, re-activation, chattering, shelving and its expiry, re-alarm,
// comms loss, the machine's trip), with on-delays, off-delays and the settling time running across the cut points.

const settings: AlarmSettings = { settlingS: 60, reAlarmS: 120, chatterCount: 3, chatterWindowS: 60 };
const END = 600;

function c1At(s: number): ReadingPatch | null {
  if (s >= 480 && s <= 520) return null; // silent: comms loss
  let runState: ReadingPatch["runState"] = "running";
  if (s < 5 || (s >= 200 && s < 260) || (s > 430 && s < 460)) runState = "standby";
  else if (s === 5 || s === 260 || s === 460) runState = "starting";
  else if (s >= 400 && s <= 430) runState = "tripped";
  let finalC = 140;
  if (s >= 80 && s < 120) finalC = 140 + (s - 80) * 1.2;
  else if (s >= 120 && s < 200) finalC = 188;
  else if (s >= 260 && s < 540) finalC = 150;
  else if (s >= 540) finalC = 170;
  const oilBar = s >= 330 && s <= 360 ? 1.2 : undefined;
  return { runState, finalC, ...(oilBar !== undefined ? { oilBar } : {}), ...(runState === "tripped" ? { tripCode: 210 } : {}) };
}

function c2At(s: number): ReadingPatch {
  const runState = s === 0 ? "starting" : "running";
  let deliveryBar = 280;
  if (s >= 100 && s < 160) deliveryBar = Math.floor((s - 100) / 10) % 2 === 0 ? 315 : 300;
  if (s >= 300 && s < 320) deliveryBar = 320;
  const oilBar = s >= 200 && s < 400 ? 1.0 : 3.5;
  return { runState, deliveryBar, oilBar };
}

type Run = { db: Db; fleet: Fleet; cleanup(): void };

function openRowId(db: Db, compressorId: number, key: string): number {
  return db.$client.prepare("SELECT id FROM alarms WHERE compressor_id = ? AND key = ? AND state <> 'normal'").pluck().get(compressorId, key) as number;
}

/** Plays seconds [from, to) with the given engine. */
function play(run: Run, engine: AlarmEngine, from: number, to: number): void {
  const { db, fleet } = run;
  const who = { userId: fleet.supervisor, actor: "Sam Okafor", siteIds: null };
  for (let s = from; s < to; s++) {
    const rows: ReadingInput[] = [];
    const p1 = c1At(s);
    if (p1) rows.push(reading(fleet.c1, s, p1));
    rows.push(reading(fleet.c2, s, c2At(s)));
    feed(db, engine, rows, at(s) + 250);
    const now = at(s) + 500;
    if (s === 110) acknowledgeAlarms(db, { ...who, ids: [openRowId(db, fleet.c1, "finalStageC.high.warning")], comment: "Cooling checked", now });
    if (s === 165) shelveAlarms(db, { ...who, ids: [openRowId(db, fleet.c2, "deliveryBar.high.advisory")], comment: "Gauge under test", minutes: 5, now });
    if (s === 210) acknowledgeAlarms(db, { ...who, ids: [openRowId(db, fleet.c2, "oilBar.low.critical")], comment: "Oil topped up", now });
    if (s === 510) engine.onCommsLost(fleet.c1, at(480), now);
    if (s === 521) engine.onCommsRestored(fleet.c1, at(521), now);
    if (s % 10 === 0) engine.tick(now);
  }
}

function fresh(): Run {
  const t = makeTempDb("airkeep-alarms-restart-");
  return { db: t.db, fleet: seedFleet(t.db), cleanup: t.cleanup };
}

const clock = { now: at(-10) };
let reference: ReturnType<typeof dump>;

beforeAll(() => {
  const run = fresh();
  play(run, newEngine(run.db, clock, settings), 0, END);
  reference = dump(run.db);
  run.cleanup();
});

describe("restart safety: a new engine on the same database continues exactly where the old one stopped", () => {
  it("the scripted run covers the whole lifecycle", () => {
    const actions = new Set((reference.events as { action: string }[]).map((e) => e.action));
    for (const a of [
      "alarm.raise",
      "alarm.clear",
      "alarm.suppress",
      "alarm.unsuppress",
      "alarm.acknowledge",
      "alarm.shelve",
      "alarm.unshelve",
      "alarm.re_alarm",
    ]) {
      expect(actions, a).toContain(a);
    }
    const keys = new Set((reference.alarms as { key: string }[]).map((a) => a.key));
    expect([...keys].sort()).toEqual(
      ["comms", "deliveryBar.high.advisory", "finalStageC.high.critical", "finalStageC.high.warning", "oilBar.low.critical", "trip"].sort(),
    );
    expect((reference.alarms as { chattering: number }[]).some((a) => a.chattering === 1)).toBe(true);
    expect(reference.events.length).toBeGreaterThan(25);
  });

  const cuts = [
    ...Array.from({ length: 19 }, (_, i) => 30 * (i + 1)),
    // inside on-delays, off-delays, the settling time, the chatter window, shelving and the comms gap
    3, 6, 98, 101, 104, 107, 113, 142, 203, 262, 318, 322, 331, 361, 401, 431, 505, 544, 547, 551,
  ].sort((a, b) => a - b);

  it.each(cuts)("cut after %i s: same alarms and events as the uninterrupted run", (cut) => {
    const run = fresh();
    try {
      play(run, newEngine(run.db, clock, settings), 0, cut);
      // The first engine is dropped with its in-memory state; a new one starts from the database alone.
      play(run, newEngine(run.db, clock, settings), cut, END);
      const got = dump(run.db);
      expect(got.alarms).toEqual(reference.alarms);
      expect(got.events).toEqual(reference.events);
    } finally {
      run.cleanup();
    }
  });

  it("without the persisted timers (first start after an upgrade) open alarms are neither repeated nor lost", () => {
    const run = fresh();
    try {
      // At 250 s: c1 stopped with its temperature alarms suppressed, c2's oil alarm active and acknowledged.
      play(run, newEngine(run.db, clock, settings), 0, 250);
      const before = dump(run.db);
      run.db.$client.prepare("DELETE FROM settings WHERE key LIKE 'alarm-engine.state.%'").run();
      const engine = newEngine(run.db, clock, settings);
      // Nothing changed by starting: no raise repeated, none invented.
      expect(dump(run.db)).toEqual(before);
      play(run, engine, 250, 255);
      const raisedAgain = (dump(run.db).events as { action: string; id: number }[]).filter(
        (e) => e.action === "alarm.raise" && e.id > (before.events.at(-1) as { id: number }).id,
      );
      expect(raisedAgain).toEqual([]);
    } finally {
      run.cleanup();
    }
  });
});
