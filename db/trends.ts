import type { Statement } from "better-sqlite3";
import {
  breakGaps,
  trendBucketMs,
  trendSourceFor,
  trendSpanMs,
  type TrendPoint,
  type TrendResponse,
  type TrendSignal,
  type TrendSource,
  type TrendSpan,
  type DeviceEventDto,
} from "@/shared/board";
import type { Db } from "./client";

// Trend reads: aggregated in SQL to at most ~1000 buckets and returned as arrays (.raw()), so a year of
// hourly rollups or six hours of raw readings costs one indexed range scan and no per-row objects.

/** Column prefix of each signal in readings (and in the rollup tables, with _min/_max/_sum/_n). */
const signalColumn: Record<TrendSignal, string> = {
  deliveryBar: "delivery_bar",
  stage1C: "stage1_c",
  stage2C: "stage2_c",
  stage3C: "stage3_c",
  stage4C: "stage4_c",
  oilBar: "oil_bar",
  purifierC: "purifier_c",
  intakeC: "intake_c",
};

type TrendParams = { id: number; bucket: number; from: number; to: number };
type TrendStatement = Statement<[TrendParams], unknown[]>;

function trendSql(source: TrendSource, signal: TrendSignal): string {
  const c = signalColumn[signal];
  if (source === "raw") {
    return `SELECT (ts / CAST($bucket AS INTEGER)) * CAST($bucket AS INTEGER) AS t, AVG(${c}), MIN(${c}), MAX(${c})
            FROM readings
            WHERE compressor_id = $id AND ts >= $from AND ts < $to AND ${c} IS NOT NULL
            GROUP BY ts / CAST($bucket AS INTEGER) ORDER BY t`;
  }
  const table = source === "1m" ? "readings_1m" : "readings_1h";
  return `SELECT (bucket_ts / CAST($bucket AS INTEGER)) * CAST($bucket AS INTEGER) AS t, SUM(${c}_sum) / SUM(${c}_n), MIN(${c}_min), MAX(${c}_max)
          FROM ${table}
          WHERE compressor_id = $id AND bucket_ts >= $from AND bucket_ts < $to AND ${c}_n > 0
          GROUP BY bucket_ts / CAST($bucket AS INTEGER) ORDER BY t`;
}

const cache = new WeakMap<Db, Map<string, TrendStatement>>();

function statement(db: Db, source: TrendSource, signal: TrendSignal): TrendStatement {
  let byKey = cache.get(db);
  if (!byKey) cache.set(db, (byKey = new Map()));
  const key = `${source}:${signal}`;
  let s = byKey.get(key);
  if (!s) {
    s = (db.$client.prepare(trendSql(source, signal)) as TrendStatement).raw(true);
    byKey.set(key, s);
  }
  return s;
}

const num = (x: unknown): number | null => (typeof x === "number" && Number.isFinite(x) ? x : null);

/** Mean, min and max of one signal over the span ending at `now`, from the source that suits the span. */
export function readTrend(db: Db, compressorId: number, signal: TrendSignal, span: TrendSpan, now = Date.now()): TrendResponse {
  const spanMs = trendSpanMs[span];
  const source = trendSourceFor(spanMs);
  const bucketMs = trendBucketMs(spanMs, source);
  // Align the window to whole buckets so a refresh does not shift every bucket's contents.
  const to = Math.floor(now / bucketMs) * bucketMs + bucketMs;
  const from = to - Math.ceil(spanMs / bucketMs) * bucketMs;
  const rows = statement(db, source, signal).all({ id: compressorId, bucket: bucketMs, from, to });
  const points: TrendPoint[] = rows.map((r) => [Number(r[0]), num(r[1]), num(r[2]), num(r[3])]);
  return { compressorId, signal, span, source, bucketMs, from, to, points: breakGaps(points, bucketMs) };
}

const eventStatements = new WeakMap<Db, Statement<[{ id: number; before: number; limit: number }], DeviceEventDto>>();

/** Newest first; `before` (a device time, ms) pages further back. */
export function listDeviceEvents(db: Db, compressorId: number, opts: { before?: number | null; limit?: number } = {}): DeviceEventDto[] {
  let s = eventStatements.get(db);
  if (!s) {
    s = db.$client.prepare(
      `SELECT id, ts, kind, run_state AS runState, trip_code AS tripCode, text, received_at AS receivedAt
       FROM device_events WHERE compressor_id = $id AND ts < $before ORDER BY ts DESC, id DESC LIMIT $limit`,
    ) as Statement<[{ id: number; before: number; limit: number }], DeviceEventDto>;
    eventStatements.set(db, s);
  }
  const limit = Math.min(500, Math.max(1, opts.limit ?? 100));
  return s.all({ id: compressorId, before: opts.before ?? Number.MAX_SAFE_INTEGER, limit });
}
