/**
 * History reads for backtests: prepared statements returning arrays (.raw()), read one chunk at a time by key range
 * (compressor_id, ts), so the caller can hand the event loop back between chunks and no statement stays open in
 * between. Only the columns the limits need are read: building JS values is what a bulk read costs here.
 */
import type { Statement } from "better-sqlite3";
import type { AlarmSignal } from "@/shared/alarm-rules";
import type { Db } from "./client";
import { ROLLUP_SIGNALS } from "./readings";

/**
 * A raw row as read: [ts − base, run_state, starts, trip_code, …one value per requested signal]. Times come relative
 * to the chunk's start so they stay small integers (cheaper to build than large ones).
 */
export type RawRow = (number | null)[];
export const RAW_FIXED = 4;

/** SQL for one signal's value in a raw row; the final stage is the highest fitted stage that reports (as the engine). */
export function signalSql(signal: AlarmSignal, stages: number): string {
  switch (signal) {
    case "deliveryBar":
      return "delivery_bar";
    case "finalStageC": {
      const n = Math.max(1, Math.min(4, stages));
      const cols = Array.from({ length: n }, (_, i) => `stage${n - i}_c`);
      return n === 1 ? cols[0]! : `coalesce(${cols.join(", ")})`;
    }
    case "stage1C":
      return "stage1_c";
    case "stage2C":
      return "stage2_c";
    case "stage3C":
      return "stage3_c";
    case "stage4C":
      return "stage4_c";
    case "oilBar":
      return "oil_bar";
    case "purifierC":
      return "purifier_c";
    case "intakeC":
      return "intake_c";
  }
}

/**
 * Column order of a 1-minute rollup row: bucket start, last reading's time, its run state and starts, seconds tripped,
 * then min, max, sum, n of each signal in ROLLUP_SIGNALS order (deliveryBar, stage1C … stage4C, oilBar, purifierC,
 * intakeC) from U.signals on.
 */
export const U = { bucketTs: 0, lastTs: 1, lastRunState: 2, starts: 3, trippedS: 4, signals: 5 } as const;
export type RollupRow = (number | null)[];

const ROLLUP_SELECT = [
  "bucket_ts",
  "last_ts",
  "last_run_state",
  "starts",
  "tripped_s",
  ...ROLLUP_SIGNALS.flatMap(([, c]) => [`${c}_min`, `${c}_max`, `${c}_sum`, `${c}_n`]),
].join(", ");

type Range = { id: number; from: number; to: number; limit: number };

const cache = new WeakMap<object, Map<string, Statement>>();

function prepared<P extends unknown[], R>(db: Db, sql: string, setup: (s: Statement) => Statement): Statement<P, R> {
  let byText = cache.get(db.$client);
  if (!byText) cache.set(db.$client, (byText = new Map()));
  let s = byText.get(sql);
  if (!s) byText.set(sql, (s = setup(db.$client.prepare(sql))));
  return s as unknown as Statement<P, R>;
}

/** Time of the oldest raw reading in [from, to), or null when there is none (pruned, or no data). */
export function firstRawTs(db: Db, compressorId: number, from: number, to: number): number | null {
  return rawAggregate(db, "min(ts)", compressorId, from, to);
}

/** Readings stored in [from, to). */
export function rawCount(db: Db, compressorId: number, from: number, to: number): number {
  return rawAggregate(db, "count(*)", compressorId, from, to) ?? 0;
}

function rawAggregate(db: Db, aggregate: string, compressorId: number, from: number, to: number): number | null {
  const s = prepared<[{ id: number; from: number; to: number }], number | null>(
    db,
    `SELECT ${aggregate} FROM readings WHERE compressor_id = $id AND ts >= $from AND ts < $to`,
    (x) => x.pluck(),
  );
  return s.get({ id: compressorId, from, to }) ?? null;
}

export type RawReader = {
  /** Value columns of each row, after the RAW_FIXED ones. */
  signals: readonly AlarmSignal[];
  /** Up to `limit` readings of [from, to) in time order; row[0] is ts − from. */
  chunk(from: number, to: number, limit: number): RawRow[];
};

/** A reader of the given signals' raw values for one compressor. */
export function rawReader(db: Db, compressorId: number, stages: number, signals: readonly AlarmSignal[]): RawReader {
  const cols = ["ts - $from", "run_state", "starts", "trip_code", ...signals.map((s) => signalSql(s, stages))];
  const stmt = prepared<[Range], RawRow>(
    db,
    `SELECT ${cols.join(", ")} FROM readings WHERE compressor_id = $id AND ts >= $from AND ts < $to ORDER BY ts LIMIT $limit`,
    (x) => x.raw(true),
  );
  return {
    signals,
    chunk: (from, to, limit) => stmt.all({ id: compressorId, from, to, limit }),
  };
}

/** Up to `limit` 1-minute buckets whose start lies in [from, to), in time order, as arrays of the selected columns. */
function readMinuteBuckets<R>(db: Db, select: string, compressorId: number, from: number, to: number, limit: number): R[] {
  const s = prepared<[Range], R>(
    db,
    `SELECT ${select} FROM readings_1m
     WHERE compressor_id = $id AND bucket_ts >= $from AND bucket_ts < $to ORDER BY bucket_ts LIMIT $limit`,
    (x) => x.raw(true),
  );
  return s.all({ id: compressorId, from, to, limit });
}

/** Up to `limit` 1-minute rollup buckets whose start lies in [from, to), in time order. */
export function readRollupChunk(db: Db, compressorId: number, from: number, to: number, limit: number): RollupRow[] {
  return readMinuteBuckets<RollupRow>(db, ROLLUP_SELECT, compressorId, from, to, limit);
}

/**
 * A summary of the raw readings in [from, to): [n, first ts, last ts, min run_state, max run_state, min starts,
 * max starts, readings missing a value of some requested signal, then min and max of each requested signal (null when
 * none has a value)]. Aggregated in SQLite, so a quiet stretch of history costs no JS value per reading.
 */
export type BlockStats = (number | null)[];
export const B = { n: 0, firstTs: 1, lastTs: 2, minRunState: 3, maxRunState: 4, minStarts: 5, maxStarts: 6, gaps: 7, signals: 8 } as const;

export function blockReader(db: Db, compressorId: number, stages: number, signals: readonly AlarmSignal[]): (from: number, to: number) => BlockStats {
  const exprs = signals.map((s) => signalSql(s, stages));
  const cols = [
    "count(*)",
    "min(ts)",
    "max(ts)",
    "min(run_state)",
    "max(run_state)",
    "min(starts)",
    "max(starts)",
    exprs.length ? `total(${exprs.map((x) => `${x} IS NULL`).join(" OR ")})` : "0",
    ...exprs.flatMap((x) => [`min(${x})`, `max(${x})`]),
  ];
  const stmt = prepared<[{ id: number; from: number; to: number }], BlockStats>(
    db,
    `SELECT ${cols.join(", ")} FROM readings WHERE compressor_id = $id AND ts >= $from AND ts < $to`,
    (x) => x.raw(true),
  );
  return (from, to) => stmt.get({ id: compressorId, from, to })!;
}

/**
 * Column order of a minute summary row: bucket start, readings, first and last reading's time, run-state and starts
 * ranges, then min, max, n of each signal in ROLLUP_SIGNALS order from M.signals on.
 */
export const M = { bucketTs: 0, n: 1, firstTs: 2, lastTs: 3, minRunState: 4, maxRunState: 5, minStarts: 6, maxStarts: 7, signals: 8 } as const;
export type MinuteRow = (number | null)[];

const MINUTE_SELECT = [
  "bucket_ts",
  "n",
  "first_ts",
  "last_ts",
  "min_run_state",
  "max_run_state",
  "min_starts",
  "max_starts",
  ...ROLLUP_SIGNALS.flatMap(([, c]) => [`${c}_min`, `${c}_max`, `${c}_n`]),
].join(", ");

/** Up to `limit` 1-minute buckets starting in [from, to), as minute summary rows, in time order. */
export function readMinuteChunk(db: Db, compressorId: number, from: number, to: number, limit: number): MinuteRow[] {
  return readMinuteBuckets<MinuteRow>(db, MINUTE_SELECT, compressorId, from, to, limit);
}

const signalIndex = new Map<string, number>(ROLLUP_SIGNALS.map(([k], i) => [k, i]));

/**
 * A minute summary as the BlockStats of its raw readings (blockReader over the same minute gives the same answer), or
 * null when it cannot say: a bucket written before its ranges were kept, or a final-stage temperature that comes from
 * different stages within the minute. Its gaps count is non-zero exactly when blockReader's is.
 */
export function minuteBlock(u: MinuteRow, stages: number, signals: readonly AlarmSignal[]): BlockStats | null {
  const n = u[M.n] as number;
  if (n > 0 && u[M.firstTs] === null) return null;
  const out: BlockStats = [n, u[M.firstTs]!, u[M.lastTs]!, u[M.minRunState]!, u[M.maxRunState]!, u[M.minStarts]!, u[M.maxStarts]!, 0];
  let gaps = 0;
  for (const signal of signals) {
    let i: number;
    if (signal === "finalStageC") {
      // The highest fitted stage that reports; every reading must report it, else the stage differs between readings.
      i = -1;
      for (let st = Math.max(1, Math.min(4, stages)); st >= 1 && i < 0; st--) {
        const k = signalIndex.get(`stage${st}C`)!;
        if (((u[M.signals + 3 * k + 2] as number | null) ?? 0) > 0) i = k;
      }
      if (i >= 0 && u[M.signals + 3 * i + 2] !== n) return null;
    } else i = signalIndex.get(signal)!;
    const cnt = i < 0 ? 0 : ((u[M.signals + 3 * i + 2] as number | null) ?? 0);
    if (cnt < n) gaps += n - cnt;
    out.push(cnt > 0 ? u[M.signals + 3 * i]! : null, cnt > 0 ? u[M.signals + 3 * i + 1]! : null);
  }
  out[B.gaps] = gaps;
  return out;
}
