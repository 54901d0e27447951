/**
 * Runs a backtest over stored history (Node: it reads SQLite). Raw readings where they are kept; where the window
 * reaches past raw retention, 1-minute rollups. Reads one chunk at a time and hands the event loop back between
 * chunks, reporting progress, so other requests keep being served and a closed request stops the work.
 */
import { B, blockReader, firstRawTs, M, minuteBlock, rawCount, rawReader, readMinuteChunk, readRollupChunk } from "@/db/backtest-data";
import type { Db } from "@/db/client";
import { getCompressor } from "@/db/compressors";
import { readSetRows } from "@/db/threshold-edit";
import { effectiveLimits, mergeLimits } from "@/db/thresholds";
import type { AlarmEvent } from "@/shared/alarm-eval";
import { alarmSignals, defaultAlarmSettings, type AlarmSettings, type AlarmSignal, type Limit } from "@/shared/alarm-rules";
import { BACKTEST_CHART_BUCKETS, backtestSpanMs, type BacktestRequest, type BacktestResult, type BacktestSource } from "@/shared/backtest";
import { createBacktestCore, type SideName } from "./core";

const MINUTE = 60_000;
/** A busy stretch with at most this many readings is read reading by reading rather than halved again. */
const MIN_STRETCH = 24;

export class BacktestRefusal extends Error {
  constructor(
    readonly status: 400 | 404,
    message: string,
  ) {
    super(message);
  }
}

export type Progress = (fraction: number, phase: "raw" | "1m") => void;

export type WindowOptions = {
  compressorId: number;
  stages: number;
  from: number;
  to: number;
  oldLimits: readonly Limit[];
  newLimits: readonly Limit[];
  settings?: AlarmSettings;
  chartSignals?: readonly AlarmSignal[];
  /** Rows per read. Default 20 000. */
  chunkRows?: number;
  /** Length of the stretches summed up in SQLite; default adapts to about 240 readings a stretch. */
  blockMs?: number;
  /** Whether whole minutes are judged from their 1-minute summaries first (default true). */
  minuteSummaries?: boolean;
  onProgress?: Progress;
  signal?: AbortSignal;
  onEvent?: (side: SideName, e: AlarmEvent) => void;
};

export type WindowResult = Omit<BacktestResult, "compressorName" | "timeZone" | "span" | "retentionDays">;

/** How far before the window evaluation starts: the settling time, the longest delay and the chatter window. */
export function warmupMs(settings: AlarmSettings, limits: readonly Limit[]): number {
  let delay = 0;
  for (const l of limits) delay = Math.max(delay, l.onDelayS, l.offDelayS);
  return (settings.settlingS + delay + settings.chatterWindowS) * 1000 + MINUTE;
}

const handBack = () => new Promise<void>((resolve) => setImmediate(resolve));

function checkAbort(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw signal.reason instanceof Error ? signal.reason : new Error("Backtest cancelled");
}

/** The backtest of one compressor over [from, to) with both sets of limits. */
export async function backtestWindow(db: Db, o: WindowOptions): Promise<WindowResult> {
  const started = performance.now();
  const settings = o.settings ?? defaultAlarmSettings;
  const chunkRows = o.chunkRows ?? 20_000;
  const limits = [...o.oldLimits, ...o.newLimits];
  const warmupFrom = o.from - warmupMs(settings, limits);
  // Only the columns some limit watches are read (and the chart's, which are the same signals).
  const signals = alarmSignals.filter((x) => limits.some((l) => l.signal === x) || o.chartSignals?.includes(x));
  const core = createBacktestCore({
    stages: o.stages,
    from: o.from,
    to: o.to,
    oldLimits: o.oldLimits,
    newLimits: o.newLimits,
    signals,
    settings,
    chartSignals: o.chartSignals,
    chartBuckets: BACKTEST_CHART_BUCKETS,
    onEvent: o.onEvent,
  });
  const span = o.to - warmupFrom;
  const progress = (ts: number, phase: "raw" | "1m") => o.onProgress?.(Math.min(1, Math.max(0, (ts - warmupFrom) / span)), phase);

  // Raw readings from the oldest one kept; 1-minute buckets wholly before it.
  const rawFrom = firstRawTs(db, o.compressorId, warmupFrom, o.to) ?? o.to;
  const sources: BacktestSource[] = [];

  if (rawFrom - warmupFrom >= MINUTE) {
    const rollupTo = rawFrom - MINUTE + 1;
    let cursor = Math.floor(warmupFrom / MINUTE) * MINUTE;
    let rows = 0;
    for (;;) {
      const chunk = readRollupChunk(db, o.compressorId, cursor, rollupTo, chunkRows);
      for (const row of chunk) {
        core.feedRollup(row);
        if ((row[0] as number) >= o.from) rows++;
      }
      if (chunk.length < chunkRows) break;
      cursor = (chunk[chunk.length - 1]![0] as number) + 1;
      progress(cursor, "1m");
      await handBack();
      checkAbort(o.signal);
    }
    // Buckets read for the warm-up only are not a source of the window (rows counts those inside it).
    if (rows > 0 && rawFrom > o.from) sources.push({ kind: "1m", from: o.from, to: Math.min(rawFrom, o.to), rows });
  }

  if (rawFrom < o.to) {
    const reader = rawReader(db, o.compressorId, o.stages, signals);
    const blocks = blockReader(db, o.compressorId, o.stages, signals);
    let rows = 0;
    let lastYield = performance.now();
    let blockMs = o.blockMs ?? 60_000;
    /** Share of recent stretches that had to be read reading by reading (a moving average). */
    let busy = 0;
    let k = 0;
    let read = 0;

    const pause = async (cursor: number) => {
      checkAbort(o.signal);
      if (performance.now() - lastYield > 25) {
        progress(cursor, "raw");
        await handBack();
        lastYield = performance.now();
      }
    };
    const readRows = (a: number, b: number): number => {
      let n = 0;
      let at = a;
      for (;;) {
        const chunk = reader.chunk(at, b, chunkRows);
        for (let i = 0; i < chunk.length; i++) core.feedRaw(chunk[i]!, at);
        n += chunk.length;
        if (chunk.length < chunkRows) break;
        at += (chunk[chunk.length - 1]![0] as number) + 1;
      }
      read += n;
      return n;
    };
    // A quiet stretch is summed up in SQLite and applied at once; a busy one is halved until its halves are quiet or
    // short, and short busy ones are read reading by reading.
    const stretch = (a: number, b: number): number => {
      const stats = blocks(a, b);
      const count = stats[B.n] as number;
      if (core.feedBlock(stats)) return count;
      if (count <= MIN_STRETCH || b - a < 2) return readRows(a, b);
      const mid = a + Math.floor((b - a) / 2);
      return stretch(a, mid) + stretch(mid, b);
    };
    /** [a, b) in stretches summed up in SQLite; where almost every stretch is busy, summing first is skipped (but tried again now and then). */
    const stretches = async (a: number, b: number): Promise<number> => {
      let total = 0;
      let cursor = a;
      while (cursor < b) {
        const end = Math.min(b, cursor + blockMs);
        const before = read;
        const n = busy > 0.7 && k++ % 8 !== 0 ? readRows(cursor, end) : stretch(cursor, end);
        busy = busy * 0.9 + (n > 0 ? (0.1 * (read - before)) / n : 0);
        total += n;
        cursor = end;
        // About 240 readings a stretch, whatever the reporting rate.
        if (!o.blockMs) blockMs = Math.min(3_600_000, Math.max(5_000, n === 0 ? blockMs * 2 : Math.round((blockMs * 240) / n)));
        await pause(cursor);
      }
      return total;
    };
    /**
     * Whole minutes [a, b) from their 1-minute summaries (written with the readings, so no reading needs reading to
     * know a quiet minute); a busy minute is read as above. A run of minutes whose summaries do not add up to the raw
     * readings stored (pruned in part, or written by other means) is summed up from the readings instead.
     */
    const minutes = async (a: number, b: number): Promise<number> => {
      let total = 0;
      let cursor = a;
      while (cursor < b) {
        const chunk = readMinuteChunk(db, o.compressorId, cursor, b, chunkRows);
        const end = chunk.length < chunkRows ? b : (chunk[chunk.length - 1]![M.bucketTs] as number) + MINUTE;
        let summed = 0;
        for (const u of chunk) summed += u[M.n] as number;
        if (summed !== rawCount(db, o.compressorId, cursor, end)) total += await stretches(cursor, end);
        else {
          for (const u of chunk) {
            const at = u[M.bucketTs] as number;
            const stats = minuteBlock(u, o.stages, signals);
            if (stats && core.feedBlock(stats)) total += stats[B.n] as number;
            else total += (u[M.n] as number) > 4 * MIN_STRETCH ? stretch(at, at + MINUTE) : readRows(at, at + MINUTE);
            await pause(at + MINUTE);
          }
        }
        cursor = end;
      }
      return total;
    };

    // Stretches end at the window's start, so the warm-up's readings are told apart from the window's.
    for (const [segFrom, segTo] of [[rawFrom, Math.max(rawFrom, o.from)], [Math.max(rawFrom, o.from), o.to]] as const) {
      if (segFrom >= segTo) continue;
      const first = Math.ceil(segFrom / MINUTE) * MINUTE;
      const last = Math.floor(segTo / MINUTE) * MINUTE;
      let n: number;
      if (o.minuteSummaries === false || first >= last) n = await stretches(segFrom, segTo);
      else n = (await stretches(segFrom, first)) + (await minutes(first, last)) + (await stretches(last, segTo));
      if (segFrom >= o.from) rows += n;
    }
    if (rows > 0) sources.push({ kind: "raw", from: Math.max(o.from, rawFrom), to: o.to, rows });
    // The chart of the raw stretch comes from its 1-minute rollups (mean, min and max per minute, written with it).
    const chartFrom = Math.max(o.from, Math.floor(rawFrom / MINUTE) * MINUTE);
    let cursor = chartFrom;
    for (;;) {
      const chunk = readRollupChunk(db, o.compressorId, cursor, o.to, chunkRows);
      for (const row of chunk) core.chartRollup(row);
      if (chunk.length < chunkRows) break;
      cursor = (chunk[chunk.length - 1]![0] as number) + 1;
    }
  }
  o.onProgress?.(1, sources.at(-1)?.kind ?? "raw");

  const out = core.finish();
  return {
    compressorId: o.compressorId,
    from: o.from,
    to: o.to,
    warmupFrom,
    sources,
    samples: out.samples,
    trips: out.trips,
    elapsedMs: Math.round(performance.now() - started),
    old: out.old,
    new: out.new,
    chart: out.chart,
  };
}

export function retentionDays(env: NodeJS.ProcessEnv = process.env): number {
  const n = Number(env.RETENTION_DAYS);
  return Number.isFinite(n) && n >= 1 ? n : 30;
}

/** Limits in force for the compressor, and what they would be with the proposed rows of the set being edited. */
export function limitsForBacktest(db: Db, req: Pick<BacktestRequest, "compressorId" | "scopeType" | "scopeId" | "limits">, modelId: number) {
  if (req.scopeType === "compressor" && req.scopeId !== req.compressorId) {
    throw new BacktestRefusal(400, "A compressor's own set can only be backtested on that compressor.");
  }
  if (req.scopeType === "model" && req.scopeId !== modelId) {
    throw new BacktestRefusal(400, "Choose a compressor of this model for the backtest.");
  }
  const oldLimits = effectiveLimits(db, req.compressorId);
  const newLimits =
    req.scopeType === "model"
      ? mergeLimits(req.limits, readSetRows(db, "compressor", req.compressorId))
      : mergeLimits(readSetRows(db, "model", modelId), req.limits);
  return { oldLimits, newLimits };
}

/** The page's backtest: the window ending now, the set in force against the proposed one. */
export async function runBacktest(
  db: Db,
  req: BacktestRequest,
  opts: { now?: number; settings?: AlarmSettings; onProgress?: Progress; signal?: AbortSignal; chunkRows?: number } = {},
): Promise<BacktestResult> {
  const compressor = getCompressor(db, req.compressorId);
  if (!compressor) throw new BacktestRefusal(404, "No such compressor.");
  const { oldLimits, newLimits } = limitsForBacktest(db, req, compressor.modelId);
  const used = new Set<AlarmSignal>([...oldLimits, ...newLimits].map((l) => l.signal));
  const to = opts.now ?? Date.now();
  const result = await backtestWindow(db, {
    compressorId: compressor.id,
    stages: compressor.stages,
    from: to - backtestSpanMs[req.span],
    to,
    oldLimits,
    newLimits,
    settings: opts.settings,
    chartSignals: alarmSignals.filter((s) => used.has(s)),
    chunkRows: opts.chunkRows,
    onProgress: opts.onProgress,
    signal: opts.signal,
  });
  return { ...result, compressorName: compressor.name, timeZone: compressor.timeZone, span: req.span, retentionDays: retentionDays() };
}
