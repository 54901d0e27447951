import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { B, blockReader, M, minuteBlock, readMinuteChunk } from "@/db/backtest-data";
import type { Db } from "@/db/client";
import { createReadingStore } from "@/db/readings";
import { backtestWindow } from "@/lib/backtest/run";
import { alarmSignals, type AlarmSettings, type Limit } from "@/shared/alarm-rules";
import type { RunState } from "@/shared/telemetry";
import { at, makeTempDb, reading, seedFleet, type Fleet, type TempDb } from "./alarms-fixtures";

// A minute's summary, written with its readings, stands in for summing up those readings in SQLite: the two must agree
// for every minute, and where they cannot (summaries missing, written before their ranges were kept, or not adding up
// to the readings stored) the backtest must come out as it does from the readings alone.

let t: TempDb;
let db: Db;
let fleet: Fleet;
beforeEach(() => {
  t = makeTempDb("airkeep-backtest-minutes-");
  db = t.db;
  fleet = seedFleet(db);
});
afterEach(() => t.cleanup());

const settings: AlarmSettings = { settlingS: 30, reAlarmS: 0, chatterCount: 3, chatterWindowS: 60 };
const limits: Limit[] = [
  { signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 5, offDelayS: 5 },
  { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 0, offDelayS: 0 },
  { signal: "intakeC", direction: "high", priority: "advisory", value: 30, deadband: 1, onDelayS: 20, offDelayS: 10 },
];
const proposed = limits.map((l) => (l.signal === "finalStageC" ? { ...l, value: 150 } : l));

/** An hour and a half of a unit's life: runs and stops, a hot spell, missing sensors, a restart, a gap. */
function history() {
  const states: RunState[] = ["running", "standby", "tripped", "stopped"];
  const rows = [];
  let starts = 100;
  for (let s = 0; s < 5400; s++) {
    if (s >= 3000 && s < 3300) continue; // comms gap
    const state = states[Math.floor(s / 700) % 4]!;
    if (s % 2800 === 0) starts++;
    // Hot spells: one past both warning limits, one past the proposed limit only.
    const hot = s % 900 > 600 && s % 900 < 700 ? (s % 1800 < 900 ? 30 : 15) : 0;
    rows.push(
      reading(fleet.c1, s, {
        runState: state,
        starts,
        finalC: s % 2800 === 100 ? null : 140 + hot + (s % 7),
        oilBar: state === "running" ? (s % 1000 < 4 ? 1.2 : 3.5) : s % 97 === 0 ? null : 0,
        intakeC: 18 + (s % 3000 > 2000 ? 15 : 0),
      }),
    );
  }
  return rows;
}

describe("minute summaries", () => {
  it("sum up a minute's readings as SQLite sums them up from the readings", () => {
    createReadingStore(db).insert(history());
    const signals = [...alarmSignals];
    const fromReadings = blockReader(db, fleet.c1, 3, signals);
    const minutes = readMinuteChunk(db, fleet.c1, at(0), at(5400), 1000);
    expect(minutes.length).toBe(90 - 5); // the comms gap leaves five minutes without a reading
    let mixed = 0;
    for (const u of minutes) {
      const bucket = u[M.bucketTs] as number;
      const want = fromReadings(bucket, bucket + 60_000);
      const got = minuteBlock(u, 3, signals);
      if (got === null) {
        // Only a minute whose final stage comes from different stages (a missing stage-3 reading) is left to the readings.
        mixed++;
        expect(want[B.gaps]).toBeGreaterThan(0);
        continue;
      }
      expect(got.slice(0, B.gaps)).toEqual(want.slice(0, B.gaps));
      expect(got[B.gaps] === 0).toBe(want[B.gaps] === 0);
      expect(got.slice(B.signals)).toEqual(want.slice(B.signals));
    }
    expect(mixed).toBe(2); // no stage-3 reading at 100 s and 2,900 s, both while running
  });

  it("give the same backtest as the readings alone, and are not trusted where they cannot stand in for them", async () => {
    const rows = history();
    createReadingStore(db).insert(rows);
    const run = (minuteSummaries: boolean) =>
      backtestWindow(db, { compressorId: fleet.c1, stages: 3, from: at(600), to: at(5400), oldLimits: limits, newLimits: proposed, settings, minuteSummaries });
    const strip = (r: Awaited<ReturnType<typeof run>>) => ({ ...r, elapsedMs: 0 });
    const exact = strip(await run(false));
    expect(exact.old.total).toBeGreaterThanOrEqual(3);
    expect(exact.new.total).toBeGreaterThan(exact.old.total);
    expect(strip(await run(true))).toEqual(exact);

    // Buckets from before their ranges were kept.
    db.$client.prepare("UPDATE readings_1m SET first_ts = NULL, min_run_state = NULL, max_run_state = NULL, min_starts = NULL, max_starts = NULL WHERE bucket_ts >= ? AND bucket_ts < ?").run(at(1200), at(2400));
    expect(strip(await run(true))).toEqual(exact);

    // Readings the summaries do not know of (written by other means): a hot minute the summary calls cool.
    db.$client.prepare("UPDATE readings SET stage3_c = 175 WHERE compressor_id = ? AND ts >= ? AND ts < ?").run(fleet.c1, at(2950), at(2960));
    db.$client.prepare("INSERT INTO readings (compressor_id, ts, seq, run_state, motor_on) VALUES (?, ?, 0, 0, 0)").run(fleet.c1, at(2960) + 500);
    const changed = strip(await run(false));
    expect(changed.old.total).not.toBe(exact.old.total);
    expect(strip(await run(true))).toEqual(changed);
  });
});
