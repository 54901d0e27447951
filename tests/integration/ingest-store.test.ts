import { Worker } from "node:worker_threads";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { createReadingStore } from "@/db/readings";
import type { ReadingInput } from "@/shared/telemetry";
import { count, makeTempDb, type TempDb } from "./ingest-fixtures";

const T = Date.UTC(2025, 0, 1, 0, 0, 0);
const S = 1_000;

function reading(compressorId: number, ts: number, v: Partial<ReadingInput> = {}): ReadingInput {
  return {
    compressorId,
    ts,
    seq: ts / S,
    deliveryBar: null,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: null,
    stage2C: null,
    stage3C: null,
    stage4C: null,
    oilBar: null,
    purifierC: null,
    intakeC: null,
    runState: 3,
    motorOn: 1,
    hourMeterH: null,
    starts: null,
    tripCode: null,
    ...v,
  };
}

type Rollup = Record<string, number | null>;
const rollup = (t: TempDb, table: string, cid: number, bucket: number) =>
  t.db.$client.prepare(`SELECT * FROM ${table} WHERE compressor_id = ? AND bucket_ts = ?`).get(cid, bucket) as Rollup;

let t: TempDb;
beforeEach(() => {
  t = makeTempDb();
});
afterEach(() => t.cleanup());

describe("reading store", () => {
  // Six readings of one compressor; a 300 s gap (longer than the 120 s maximum) between r4 and r5.
  const r1 = reading(1, T + 10 * S, { deliveryBar: 200, stage1C: 100, hourMeterH: 10, starts: 5 });
  const r2 = reading(1, T + 40 * S, { deliveryBar: 210, stage1C: 110, hourMeterH: 10.01, starts: 5 });
  const r3 = reading(1, T + 70 * S, { deliveryBar: 220, runState: 0, motorOn: 0, hourMeterH: 10.02, starts: 5 });
  const r4 = reading(1, T + 100 * S, { deliveryBar: 215, stage1C: 90, runState: 0, motorOn: 0, hourMeterH: 10.02, starts: 5 });
  const r5 = reading(1, T + 400 * S, { deliveryBar: 230, runState: 4, motorOn: 0, tripCode: 7, hourMeterH: 10.02, starts: 6 });
  const r6 = reading(1, T + 430 * S, { deliveryBar: 228, runState: 4, motorOn: 0, tripCode: 7, hourMeterH: 10.03, starts: 6 });

  it("keeps one raw row per (compressor, time) and counts replays as duplicates", () => {
    const store = createReadingStore(t.db);
    expect(store.insert([r1, r2, r3])).toEqual({ inserted: 3, duplicates: 0, conflicts: 0 });
    expect(store.insert([r2, r3, { ...r3, deliveryBar: 999 }])).toEqual({ inserted: 0, duplicates: 3, conflicts: 0 });
    expect(count(t.db, "SELECT count(*) AS n FROM readings")).toBe(3);
    expect(count(t.db, "SELECT delivery_bar AS n FROM readings WHERE ts = ?", r3.ts)).toBe(220);
    expect(rollup(t, "readings_1m", 1, T).n).toBe(2);
  });

  it("counts another reading (other seq) in a stored millisecond as a conflict, not as a duplicate", () => {
    const store = createReadingStore(t.db);
    store.insert([r1, r2]);
    expect(store.insert([{ ...r2, seq: r2.seq + 1, deliveryBar: 211 }, r2])).toEqual({ inserted: 0, duplicates: 1, conflicts: 1 });
    expect(store.around(1, r2.ts)).toEqual({ at: r2.seq, before: { seq: r1.seq, ts: r1.ts }, after: null });
    expect(store.around(1, r2.ts - 1)).toEqual({ at: null, before: { seq: r1.seq, ts: r1.ts }, after: { seq: r2.seq, ts: r2.ts } });
    expect(count(t.db, "SELECT delivery_bar AS n FROM readings WHERE ts = ?", r2.ts)).toBe(210);
  });

  it("maintains 1-minute and 1-hour rollups that match a hand computation, across batches and a restart", () => {
    createReadingStore(t.db).insert([r3, r1, r2]); // out of order within a batch is fine
    const afterRestart = createReadingStore(t.db); // a new process: the previous reading comes from the rollup
    expect(afterRestart.insert([r4, r5, r6, r2])).toEqual({ inserted: 3, duplicates: 1, conflicts: 0 });

    // Minute 0 holds r1, r2. Time: r1→r2 30 s running, r2→r3 [40 s, 60 s) 20 s running.
    expect(rollup(t, "readings_1m", 1, T)).toMatchObject({
      n: 2,
      delivery_bar_min: 200,
      delivery_bar_max: 210,
      delivery_bar_sum: 410,
      delivery_bar_n: 2,
      stage1_c_min: 100,
      stage1_c_max: 110,
      stage1_c_sum: 210,
      stage1_c_n: 2,
      stage2_c_n: 0,
      stage2_c_min: null,
      covered_s: 50,
      run_s: 50,
      tripped_s: 0,
      last_ts: r2.ts,
      hour_meter_h: 10.01,
      starts: 5,
      last_motor_on: 1,
    });
    // Minute 1 holds r3, r4. Time: [60 s, 70 s) still running from r2, then r3→r4 30 s stopped; r4→r5 is a gap.
    expect(rollup(t, "readings_1m", 1, T + 60 * S)).toMatchObject({
      n: 2,
      delivery_bar_min: 215,
      delivery_bar_max: 220,
      delivery_bar_sum: 435,
      stage1_c_min: 90,
      stage1_c_max: 90,
      stage1_c_n: 1,
      covered_s: 40,
      run_s: 10,
      tripped_s: 0,
      last_ts: r4.ts,
      last_motor_on: 0,
    });
    expect(rollup(t, "readings_1m", 1, T + 120 * S)).toBeUndefined();
    // r5→r6 is 30 s tripped: 20 s in minute 6, 10 s in minute 7.
    expect(rollup(t, "readings_1m", 1, T + 360 * S)).toMatchObject({ n: 1, covered_s: 20, tripped_s: 20, run_s: 0 });
    expect(rollup(t, "readings_1m", 1, T + 420 * S)).toMatchObject({
      n: 1,
      covered_s: 10,
      tripped_s: 10,
      hour_meter_h: 10.03,
      starts: 6,
      last_run_state: 4,
    });
    const h = rollup(t, "readings_1h", 1, T);
    expect(h).toMatchObject({
      n: 6,
      delivery_bar_min: 200,
      delivery_bar_max: 230,
      delivery_bar_n: 6,
      stage1_c_min: 90,
      stage1_c_max: 110,
      stage1_c_sum: 300,
      stage1_c_n: 3,
      covered_s: 120,
      run_s: 60,
      tripped_s: 30,
      last_ts: r6.ts,
      hour_meter_h: 10.03,
      starts: 6,
    });
    expect(h.delivery_bar_sum).toBeCloseTo(200 + 210 + 220 + 215 + 230 + 228, 9);
  });

  it("keeps each bucket's first reading time and its run-state and starts ranges, across batches", () => {
    const store = createReadingStore(t.db);
    store.insert([r4, r3]);
    store.insert([r2, r5]);
    store.insert([r1, r6]);
    expect(rollup(t, "readings_1m", 1, T)).toMatchObject({ n: 2, first_ts: r1.ts, min_run_state: 3, max_run_state: 3, min_starts: 5, max_starts: 5 });
    expect(rollup(t, "readings_1m", 1, T + 60 * S)).toMatchObject({ first_ts: r3.ts, last_ts: r4.ts, min_run_state: 0, max_run_state: 0 });
    expect(rollup(t, "readings_1h", 1, T)).toMatchObject({ n: 6, first_ts: r1.ts, min_run_state: 0, max_run_state: 4, min_starts: 5, max_starts: 6 });

    // A bucket written before the ranges were kept stays unknown rather than taking the ranges of its newer readings.
    t.db.$client.prepare("UPDATE readings_1m SET first_ts = NULL, min_run_state = NULL, max_run_state = NULL, min_starts = NULL, max_starts = NULL WHERE bucket_ts = ?").run(T + 420 * S);
    store.insert([reading(1, T + 450 * S, { runState: 3, starts: 7 })]);
    expect(rollup(t, "readings_1m", 1, T + 420 * S)).toMatchObject({ n: 2, first_ts: null, min_run_state: null, max_run_state: null, min_starts: null, max_starts: null });
  });

  it("waits for another process's write to finish instead of failing on a stale snapshot", async () => {
    const store = createReadingStore(t.db);
    store.insert([r1]);
    // Another writer (a thread with its own connection, as the web app or the backfill would be) holds the write lock
    // for 300 ms and then commits a change.
    const worker = new Worker(
      `const { parentPort, workerData } = require("node:worker_threads");
       const db = new (require("better-sqlite3"))(workerData);
       db.exec("BEGIN IMMEDIATE; INSERT INTO settings (key, value, updated_at) VALUES ('other-writer', '1', 0)");
       parentPort.postMessage("locked");
       Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 300);
       db.exec("COMMIT");
       db.close();`,
      { eval: true, workerData: t.file },
    );
    await new Promise((resolve) => worker.once("message", resolve));
    // Without a raw row to write first, the store reads before it writes: a deferred transaction would see the other
    // commit land under it and fail with SQLITE_BUSY_SNAPSHOT; an immediate one waits for the lock (busy timeout).
    expect(store.insert([r2], { keepRaw: false })).toEqual({ inserted: 1, duplicates: 0, conflicts: 0 });
    await new Promise((resolve) => worker.once("exit", resolve));
    expect(count(t.db, "SELECT count(*) AS n FROM settings WHERE key = 'other-writer'")).toBe(1);
    expect(rollup(t, "readings_1m", 1, T).n).toBe(2);
  });

  it("folds readings into the rollups without keeping raw rows, and recognises a replay of them", () => {
    const store = createReadingStore(t.db);
    const rows = [r1, r2, r3, r4].map((r) => ({ ...r, compressorId: 2 }));
    expect(store.insert(rows, { keepRaw: false })).toEqual({ inserted: 4, duplicates: 0, conflicts: 0 });
    expect(count(t.db, "SELECT count(*) AS n FROM readings")).toBe(0);
    expect(rollup(t, "readings_1m", 2, T)).toMatchObject({ n: 2, delivery_bar_sum: 410, run_s: 50 });
    expect(rollup(t, "readings_1h", 2, T)).toMatchObject({ n: 4, covered_s: 90, run_s: 60 });
    expect(createReadingStore(t.db).insert(rows, { keepRaw: false })).toEqual({ inserted: 0, duplicates: 4, conflicts: 0 });
    expect(rollup(t, "readings_1h", 2, T)).toMatchObject({ n: 4, covered_s: 90, run_s: 60 });
  });

  it("prunes raw readings past retention in chunks and keeps the rollups", () => {
    const store = createReadingStore(t.db);
    const now = T + 40 * 86_400_000;
    const old = Array.from({ length: 25 }, (_, i) => reading(1, T + i * 10 * S, { deliveryBar: 100 + i }));
    const oldOther = Array.from({ length: 5 }, (_, i) => reading(3, T + i * 10 * S, { deliveryBar: 50 }));
    const recent = Array.from({ length: 10 }, (_, i) => reading(1, now - 86_400_000 + i * 10 * S, { deliveryBar: 300 }));
    store.insert([...old, ...oldOther, ...recent]);
    const minuteBefore = rollup(t, "readings_1m", 1, T);
    const hourBefore = rollup(t, "readings_1h", 1, T);

    expect(store.prune(now, 30 * 86_400_000, { chunkRows: 4, maxRows: 10 })).toBe(10);
    expect(count(t.db, "SELECT count(*) AS n FROM readings")).toBe(30);
    expect(store.prune(now, 30 * 86_400_000, { chunkRows: 4 })).toBe(20);
    expect(count(t.db, "SELECT count(*) AS n FROM readings")).toBe(10);
    expect(count(t.db, "SELECT count(*) AS n FROM readings WHERE ts < ?", now - 30 * 86_400_000)).toBe(0);
    expect(store.prune(now, 30 * 86_400_000)).toBe(0);

    expect(rollup(t, "readings_1m", 1, T)).toEqual(minuteBefore);
    expect(rollup(t, "readings_1h", 1, T)).toEqual(hourBefore);
    expect(hourBefore).toMatchObject({ n: 25, delivery_bar_min: 100, delivery_bar_max: 124 });
    expect(rollup(t, "readings_1h", 3, T)).toMatchObject({ n: 5 });
  });
});
