import type { Statement } from "better-sqlite3";
import type { ReadingInput } from "@/shared/telemetry";
import { runStateCode } from "@/shared/telemetry";
import type { Db } from "./client";

export const MINUTE_MS = 60_000;
export const HOUR_MS = 3_600_000;

/** A reading's values hold until the next reading, unless the gap is longer than this (then the time is unknown). */
export const DEFAULT_MAX_GAP_MS = 120_000;

/** Signals aggregated in the rollup tables, as [ReadingInput key, column prefix]. */
export const ROLLUP_SIGNALS = [
  ["deliveryBar", "delivery_bar"],
  ["stage1C", "stage1_c"],
  ["stage2C", "stage2_c"],
  ["stage3C", "stage3_c"],
  ["stage4C", "stage4_c"],
  ["oilBar", "oil_bar"],
  ["purifierC", "purifier_c"],
  ["intakeC", "intake_c"],
] as const satisfies readonly (readonly [keyof ReadingInput, string])[];

const SIGNAL_COUNT = ROLLUP_SIGNALS.length;

const RAW_COLUMNS = [
  "compressor_id",
  "ts",
  "seq",
  "delivery_bar",
  "stage1_bar",
  "stage2_bar",
  "stage3_bar",
  "stage4_bar",
  "stage1_c",
  "stage2_c",
  "stage3_c",
  "stage4_c",
  "oil_bar",
  "purifier_c",
  "intake_c",
  "run_state",
  "motor_on",
  "hour_meter_h",
  "starts",
  "trip_code",
  "implausible",
] as const;

/**
 * duplicates: the same reading (seq and ts) was already stored. conflicts: another reading (other seq) already holds
 * that millisecond; the readings key is (compressor, ts), so the newcomer is not stored and must be counted.
 */
export type InsertResult = { inserted: number; duplicates: number; conflicts: number };

export type StoredAround = {
  at: number | null;
  before: { seq: number; ts: number } | null;
  after: { seq: number; ts: number } | null;
};

export type PruneOptions = { chunkRows?: number; maxRows?: number };

export type ReadingStore = {
  /** Stores readings (raw unless keepRaw is false) and folds each new one into the 1-minute and 1-hour rollups. */
  insert(rows: readonly ReadingInput[], opts?: { keepRaw?: boolean }): InsertResult;
  /** The seq of the raw reading stored at this millisecond, and the nearest stored readings before and after it. */
  around(compressorId: number, ts: number): StoredAround;
  /** Deletes raw readings older than now - retentionMs in small transactions; rollups are kept. Returns rows deleted. */
  prune(now: number, retentionMs: number, opts?: PruneOptions): number;
};

type Acc = {
  compressorId: number;
  bucketTs: number;
  n: number;
  min: (number | null)[];
  max: (number | null)[];
  sum: number[];
  cnt: number[];
  coveredMs: number;
  runMs: number;
  trippedMs: number;
  firstTs: number | null;
  minRunState: number | null;
  maxRunState: number | null;
  minStarts: number | null;
  maxStarts: number | null;
  lastTs: number | null;
  hourMeterH: number | null;
  starts: number | null;
  lastRunState: number | null;
  lastMotorOn: number | null;
};

type Prev = { ts: number; motorOn: number; runState: number };

function newAcc(compressorId: number, bucketTs: number): Acc {
  return {
    compressorId,
    bucketTs,
    n: 0,
    min: new Array<number | null>(SIGNAL_COUNT).fill(null),
    max: new Array<number | null>(SIGNAL_COUNT).fill(null),
    sum: new Array<number>(SIGNAL_COUNT).fill(0),
    cnt: new Array<number>(SIGNAL_COUNT).fill(0),
    coveredMs: 0,
    runMs: 0,
    trippedMs: 0,
    firstTs: null,
    minRunState: null,
    maxRunState: null,
    minStarts: null,
    maxStarts: null,
    lastTs: null,
    hourMeterH: null,
    starts: null,
    lastRunState: null,
    lastMotorOn: null,
  };
}

function rollupUpsertSql(table: string): string {
  const cols = ["compressor_id", "bucket_ts", "n"];
  const sets = ["n = n + excluded.n"];
  for (const [, c] of ROLLUP_SIGNALS) {
    cols.push(`${c}_min`, `${c}_max`, `${c}_sum`, `${c}_n`);
    sets.push(
      `${c}_min = CASE WHEN ${c}_min IS NULL OR excluded.${c}_min < ${c}_min THEN excluded.${c}_min ELSE ${c}_min END`,
      `${c}_max = CASE WHEN ${c}_max IS NULL OR excluded.${c}_max > ${c}_max THEN excluded.${c}_max ELSE ${c}_max END`,
      `${c}_sum = ${c}_sum + excluded.${c}_sum`,
      `${c}_n = ${c}_n + excluded.${c}_n`,
    );
  }
  cols.push("covered_s", "run_s", "tripped_s");
  sets.push("covered_s = covered_s + excluded.covered_s", "run_s = run_s + excluded.run_s", "tripped_s = tripped_s + excluded.tripped_s");
  // A bucket written before these columns existed keeps them null: its ranges are unknown, not those of the new rows.
  const known = "(n = 0 OR first_ts IS NOT NULL)";
  for (const [c, op] of [["first_ts", "<"], ["min_run_state", "<"], ["max_run_state", ">"], ["min_starts", "<"], ["max_starts", ">"]] as const) {
    cols.push(c);
    sets.push(`${c} = CASE WHEN NOT ${known} THEN NULL WHEN ${c} IS NULL OR excluded.${c} ${op} ${c} THEN excluded.${c} ELSE ${c} END`);
  }
  const newer = "excluded.last_ts IS NOT NULL AND (last_ts IS NULL OR excluded.last_ts >= last_ts)";
  for (const c of ["hour_meter_h", "starts", "last_run_state", "last_motor_on", "last_ts"]) {
    cols.push(c);
    sets.push(`${c} = CASE WHEN ${newer} THEN excluded.${c} ELSE ${c} END`);
  }
  // SQLite evaluates every SET expression against the old row, so last_ts may be compared above and set here.
  return `INSERT INTO ${table} (${cols.join(", ")}) VALUES (${cols.map(() => "?").join(", ")})
    ON CONFLICT (compressor_id, bucket_ts) DO UPDATE SET ${sets.join(", ")}`;
}

function accParams(a: Acc): unknown[] {
  const p: unknown[] = [a.compressorId, a.bucketTs, a.n];
  for (let i = 0; i < SIGNAL_COUNT; i++) p.push(a.min[i], a.max[i], a.sum[i], a.cnt[i]);
  p.push(a.coveredMs / 1000, a.runMs / 1000, a.trippedMs / 1000);
  p.push(a.firstTs, a.minRunState, a.maxRunState, a.minStarts, a.maxStarts);
  p.push(a.hourMeterH, a.starts, a.lastRunState, a.lastMotorOn, a.lastTs);
  return p;
}

export function createReadingStore(db: Db, options: { maxGapMs?: number } = {}): ReadingStore {
  const sqlite = db.$client;
  const maxGapMs = options.maxGapMs ?? DEFAULT_MAX_GAP_MS;
  const insertRaw = sqlite.prepare(
    `INSERT OR IGNORE INTO readings (${RAW_COLUMNS.join(", ")}) VALUES (${RAW_COLUMNS.map(() => "?").join(", ")})`,
  );
  const selectSeqAt = sqlite
    .prepare("SELECT seq FROM readings WHERE compressor_id = ? AND ts = ?")
    .pluck() as Statement<[number, number], number>;
  type Point = { seq: number; ts: number };
  const selectBefore = sqlite.prepare(
    "SELECT seq, ts FROM readings WHERE compressor_id = ? AND ts < ? ORDER BY ts DESC LIMIT 1",
  ) as Statement<[number, number], Point>;
  const selectAfter = sqlite.prepare(
    "SELECT seq, ts FROM readings WHERE compressor_id = ? AND ts > ? ORDER BY ts LIMIT 1",
  ) as Statement<[number, number], Point>;
  const upsert1m = sqlite.prepare(rollupUpsertSql("readings_1m"));
  const upsert1h = sqlite.prepare(rollupUpsertSql("readings_1h"));
  const selectPrev = sqlite.prepare(
    `SELECT last_ts AS ts, last_motor_on AS motorOn, last_run_state AS runState FROM readings_1m
     WHERE compressor_id = ? AND bucket_ts <= ? AND last_ts IS NOT NULL ORDER BY bucket_ts DESC LIMIT 1`,
  ) as Statement<[number, number], { ts: number; motorOn: number | null; runState: number | null }>;
  const selectBucketLast = sqlite.prepare(
    "SELECT last_ts AS lastTs FROM readings_1m WHERE compressor_id = ? AND bucket_ts = ?",
  ) as Statement<[number, number], { lastTs: number | null }>;

  // Latest reading folded in per compressor, to attribute the time until the next one.
  const prevByCompressor = new Map<number, Prev>();
  // Without raw rows, a replay is recognised by the minute bucket already holding a later reading.
  const bucketLast = new Map<number, { bucketTs: number; lastTs: number | null }>();

  function prevFor(compressorId: number, ts: number): Prev | null {
    const cached = prevByCompressor.get(compressorId);
    if (cached && cached.ts < ts) return cached;
    if (cached && cached.ts >= ts) return null;
    const row = selectPrev.get(compressorId, Math.floor(ts / MINUTE_MS) * MINUTE_MS);
    if (!row || row.ts >= ts) return null;
    return { ts: row.ts, motorOn: row.motorOn ?? 0, runState: row.runState ?? runStateCode.stopped };
  }

  function seenInBucket(r: ReadingInput): boolean {
    const bucketTs = Math.floor(r.ts / MINUTE_MS) * MINUTE_MS;
    let e = bucketLast.get(r.compressorId);
    if (!e || e.bucketTs !== bucketTs) {
      e = { bucketTs, lastTs: selectBucketLast.get(r.compressorId, bucketTs)?.lastTs ?? null };
      bucketLast.set(r.compressorId, e);
    }
    return e.lastTs !== null && r.ts <= e.lastTs;
  }

  function noteInBucket(r: ReadingInput): void {
    const e = bucketLast.get(r.compressorId);
    if (e && e.bucketTs === Math.floor(r.ts / MINUTE_MS) * MINUTE_MS && (e.lastTs === null || r.ts > e.lastTs)) {
      e.lastTs = r.ts;
    }
  }

  const insertTx = sqlite.transaction((rows: readonly ReadingInput[], keepRaw: boolean): InsertResult => {
    const sorted = rows.slice().sort((a, b) => a.compressorId - b.compressorId || a.ts - b.ts);
    const minute = new Map<number, Acc>();
    const hour = new Map<number, Acc>();
    // Rows come sorted by compressor and time, so the bucket is nearly always the one just used.
    let lastMinute: Acc | null = null;
    let lastHour: Acc | null = null;
    const accFor = (map: Map<number, Acc>, compressorId: number, ts: number, size: number): Acc => {
      const index = Math.floor(ts / size);
      const last = size === MINUTE_MS ? lastMinute : lastHour;
      if (last && last.compressorId === compressorId && last.bucketTs === index * size) return last;
      const key = compressorId * 4_294_967_296 + index;
      let a = map.get(key);
      if (!a) {
        a = newAcc(compressorId, index * size);
        map.set(key, a);
      }
      if (size === MINUTE_MS) lastMinute = a;
      else lastHour = a;
      return a;
    };
    const addTime = (compressorId: number, from: number, to: number, prev: Prev): void => {
      let t = from;
      while (t < to) {
        const end = Math.min(to, (Math.floor(t / MINUTE_MS) + 1) * MINUTE_MS);
        const ms = end - t;
        for (const a of [accFor(minute, compressorId, t, MINUTE_MS), accFor(hour, compressorId, t, HOUR_MS)]) {
          a.coveredMs += ms;
          if (prev.motorOn) a.runMs += ms;
          if (prev.runState === runStateCode.tripped) a.trippedMs += ms;
        }
        t = end;
      }
    };
    const addValues = (a: Acc, r: ReadingInput): void => {
      a.n++;
      for (let i = 0; i < SIGNAL_COUNT; i++) {
        const v = r[ROLLUP_SIGNALS[i]![0]];
        if (v === null || v === undefined) continue;
        const mn = a.min[i];
        const mx = a.max[i];
        if (mn === null || mn === undefined || v < mn) a.min[i] = v;
        if (mx === null || mx === undefined || v > mx) a.max[i] = v;
        a.sum[i]! += v;
        a.cnt[i]!++;
      }
      if (a.firstTs === null || r.ts < a.firstTs) a.firstTs = r.ts;
      if (a.minRunState === null || r.runState < a.minRunState) a.minRunState = r.runState;
      if (a.maxRunState === null || r.runState > a.maxRunState) a.maxRunState = r.runState;
      if (r.starts !== null) {
        if (a.minStarts === null || r.starts < a.minStarts) a.minStarts = r.starts;
        if (a.maxStarts === null || r.starts > a.maxStarts) a.maxStarts = r.starts;
      }
      if (a.lastTs === null || r.ts >= a.lastTs) {
        a.lastTs = r.ts;
        a.hourMeterH = r.hourMeterH;
        a.starts = r.starts;
        a.lastRunState = r.runState;
        a.lastMotorOn = r.motorOn;
      }
    };

    let inserted = 0;
    let duplicates = 0;
    let conflicts = 0;
    for (const r of sorted) {
      if (keepRaw) {
        const res = insertRaw.run(
          r.compressorId,
          r.ts,
          r.seq,
          r.deliveryBar,
          r.stage1Bar,
          r.stage2Bar,
          r.stage3Bar,
          r.stage4Bar,
          r.stage1C,
          r.stage2C,
          r.stage3C,
          r.stage4C,
          r.oilBar,
          r.purifierC,
          r.intakeC,
          r.runState,
          r.motorOn,
          r.hourMeterH,
          r.starts,
          r.tripCode,
          r.implausible ? JSON.stringify(r.implausible) : null,
        );
        if (res.changes === 0) {
          if (selectSeqAt.get(r.compressorId, r.ts) === r.seq) duplicates++;
          else conflicts++;
          continue;
        }
        noteInBucket(r);
      } else {
        if (seenInBucket(r)) {
          duplicates++;
          continue;
        }
        noteInBucket(r);
      }
      inserted++;
      addValues(accFor(minute, r.compressorId, r.ts, MINUTE_MS), r);
      addValues(accFor(hour, r.compressorId, r.ts, HOUR_MS), r);
      const prev = prevFor(r.compressorId, r.ts);
      if (prev) {
        if (r.ts - prev.ts <= maxGapMs) addTime(r.compressorId, prev.ts, r.ts, prev);
      }
      // An out-of-order reading adds its values but leaves the time attribution of its neighbours alone.
      const cached = prevByCompressor.get(r.compressorId);
      if (!cached || r.ts > cached.ts) {
        prevByCompressor.set(r.compressorId, { ts: r.ts, motorOn: r.motorOn, runState: r.runState });
      }
    }
    for (const a of minute.values()) upsert1m.run(...accParams(a));
    for (const a of hour.values()) upsert1h.run(...accParams(a));
    return { inserted, duplicates, conflicts };
  });

  const nextCompressor = sqlite.prepare(
    "SELECT compressor_id AS id FROM readings WHERE compressor_id > ? ORDER BY compressor_id LIMIT 1",
  ) as Statement<[number], { id: number }>;
  const nthOld = sqlite.prepare(
    "SELECT ts FROM readings WHERE compressor_id = ? AND ts < ? ORDER BY ts LIMIT 1 OFFSET ?",
  ) as Statement<[number, number, number], { ts: number }>;
  const deleteUpTo = sqlite.prepare("DELETE FROM readings WHERE compressor_id = ? AND ts <= ?");
  const deleteBefore = sqlite.prepare("DELETE FROM readings WHERE compressor_id = ? AND ts < ?");

  return {
    insert(rows, opts) {
      if (rows.length === 0) return { inserted: 0, duplicates: 0, conflicts: 0 };
      // Immediate: a deferred transaction that reads first fails outright (SQLITE_BUSY_SNAPSHOT) if another process
      // commits before its first write; waiting for the write lock up front lets the busy timeout handle it.
      return insertTx.immediate(rows, opts?.keepRaw ?? true);
    },
    around: (compressorId, ts) => ({
      at: selectSeqAt.get(compressorId, ts) ?? null,
      before: selectBefore.get(compressorId, ts) ?? null,
      after: selectAfter.get(compressorId, ts) ?? null,
    }),
    prune(now, retentionMs, opts = {}) {
      const chunk = Math.max(1, opts.chunkRows ?? 5000);
      const maxRows = opts.maxRows ?? Number.POSITIVE_INFINITY;
      const cutoff = now - retentionMs;
      let deleted = 0;
      let cursor = Number.MIN_SAFE_INTEGER;
      for (let next = nextCompressor.get(cursor); next && deleted < maxRows; next = nextCompressor.get(cursor)) {
        cursor = next.id;
        while (deleted < maxRows) {
          const take = Math.min(chunk, maxRows - deleted);
          const edge = nthOld.get(cursor, cutoff, take - 1);
          // Each statement commits on its own, so readers and the ingester's batches interleave between chunks.
          const n = edge ? deleteUpTo.run(cursor, edge.ts).changes : deleteBefore.run(cursor, cutoff).changes;
          deleted += n;
          if (!edge) break;
        }
      }
      return deleted;
    },
  };
}
