import { z } from "zod";
import { realGasMinutesToPressure } from "./air";
import type { ServiceBadge } from "./service-schema";
import type { CompressorDto } from "./compressor-schema";
import { STALE_AFTER_MS, type LiveCompressor } from "./live";
import type { RunState } from "./telemetry";

// Pure pieces of the board and the compressor page: classification, derived values, geometry, schedules.
// No React and no database here, so every rule is unit-tested on its own.

// ---- State word -----------------------------------------------------------------------------------

export const stateWords = ["Running", "Standby", "Stopped", "Starting", "Tripped", "Offline", "Stale"] as const;
export type StateWord = (typeof stateWords)[number];

const runStateWord: Record<RunState, StateWord> = {
  running: "Running",
  standby: "Standby",
  stopped: "Stopped",
  starting: "Starting",
  tripped: "Tripped",
};

/**
 * live     — a reading younger than the stale limit from a device that is online
 * stale    — online (as far as we know) but the last reading is older than the stale limit
 * offline  — the device's status says offline (retained status or last will), or comms were lost
 * nodata   — no reading has ever arrived
 */
export type Freshness = "live" | "stale" | "offline" | "nodata";

export type Condition = {
  freshness: Freshness;
  word: StateWord;
  /** Age of the last reading in ms at `now`; null when there is none. */
  ageMs: number | null;
  /** True when the values may be shown as current. */
  current: boolean;
};

type ClassifyInput = Pick<LiveCompressor, "online" | "receivedAt" | "runState">;

/** What a tile says about a compressor at server time `nowMs`. Never calls old numbers live. */
export function classifyCondition(
  live: ClassifyInput | null | undefined,
  nowMs: number,
  staleAfterMs: number = STALE_AFTER_MS,
): Condition {
  if (!live || live.receivedAt == null) {
    return { freshness: "nodata", word: "Offline", ageMs: null, current: false };
  }
  const ageMs = Math.max(0, nowMs - live.receivedAt);
  if (!live.online) return { freshness: "offline", word: "Offline", ageMs, current: false };
  if (ageMs > staleAfterMs) return { freshness: "stale", word: "Stale", ageMs, current: false };
  const word = live.runState ? runStateWord[live.runState] : "Stopped";
  return { freshness: "live", word, ageMs, current: true };
}

// ---- Ages and durations ---------------------------------------------------------------------------

/** "4 s ago", "3 min ago", "5 h ago", "12 d ago". */
export function formatAge(ageMs: number | null): string {
  if (ageMs == null || !Number.isFinite(ageMs)) return "no reading yet";
  const s = Math.max(0, Math.floor(ageMs / 1000));
  if (s < 60) return `${s} s ago`;
  const min = Math.floor(s / 60);
  if (min < 60) return `${min} min ago`;
  const h = Math.floor(min / 60);
  if (h < 48) return `${h} h ago`;
  return `${Math.floor(h / 24)} d ago`;
}

/** "< 1 min", "12 min", "1 h 05 min"; "—" for null. */
export function formatMinutes(minutes: number | null): string {
  if (minutes == null || !Number.isFinite(minutes) || minutes < 0) return "—";
  if (minutes < 1) return "< 1 min";
  const whole = Math.round(minutes);
  if (whole < 60) return `${whole} min`;
  const h = Math.floor(whole / 60);
  if (h >= 100) return "> 99 h";
  return `${h} h ${String(whole % 60).padStart(2, "0")} min`;
}

/** Compact form for a tile: {value: "12", unit: "min"}, {value: "1.6", unit: "h"}, {value: "—", unit: ""}. */
export function minutesParts(minutes: number | null): { value: string; unit: string } {
  if (minutes == null || !Number.isFinite(minutes) || minutes < 0) return { value: "—", unit: "" };
  if (minutes < 1) return { value: "<1", unit: "min" };
  if (minutes < 99.5) return { value: String(Math.round(minutes)), unit: "min" };
  const h = minutes / 60;
  return h < 99.95 ? { value: h.toFixed(1), unit: "h" } : { value: ">99", unit: "h" };
}

// ---- Time to stop pressure ------------------------------------------------------------------------

/** Below this rise the bank is not being filled (sensor noise, a leak-down while running unloaded). */
export const MIN_FILL_RATE_BAR_PER_MIN = 0.05;
/** The fill rate is the least-squares slope of delivery pressure over this window of one run (the ingester's). */
export const FILL_RATE_WINDOW_MS = 120_000;
/** It is shown, and projected, only once it spans this much of the run and its standard error is within this share. */
export const FILL_RATE_MIN_SPAN_MS = 60_000;
export const FILL_RATE_MAX_REL_ERROR = 0.1;
/** Bank temperature assumed when the intake temperature is unknown, °C (the free-air reference temperature). */
const DEFAULT_BANK_C = 20;

/**
 * Minutes until the delivery pressure reaches the stop setpoint, projected with real-gas behaviour: the compressor
 * delivers a steady amount of air per minute, so the pressure rises faster as the bank fills (Z grows above ~150 bar);
 * a straight line through today's slope would overstate the time. The bank is taken at the intake temperature.
 * Null — show nothing — when the unit is not filling a bank, or the rate is not yet steady (the ingester sends no
 * rate until it is). Zero when it is filling and already at or above the stop pressure.
 */
export function timeToStopMinutes(
  live: Pick<LiveCompressor, "runState" | "deliveryBar" | "fillRateBarPerMin" | "intakeC"> | null | undefined,
  stopPressureBar: number,
  bankVolumeL: number,
): number | null {
  if (!live || live.runState !== "running" || !(bankVolumeL > 0)) return null;
  const { deliveryBar, fillRateBarPerMin: rate } = live;
  if (deliveryBar == null || rate == null || !Number.isFinite(rate) || !Number.isFinite(deliveryBar)) return null;
  if (rate < MIN_FILL_RATE_BAR_PER_MIN) return null;
  if (deliveryBar >= stopPressureBar) return 0;
  // the slope describes the middle of its window, half a window's rise below the latest reading
  const at = Math.max(0, deliveryBar - (rate * FILL_RATE_WINDOW_MS) / 120_000);
  const tC = live.intakeC ?? DEFAULT_BANK_C;
  const minutes = realGasMinutesToPressure(at, rate, stopPressureBar, tC) - (deliveryBar - at) / rate;
  return Math.max(0, minutes);
}

/** The label beside the figure: it is the bank's own setpoint, not something Airkeep does to the machine. */
export const TIME_TO_STOP_LABEL = "To stop pressure";

// ---- Horizontal band ------------------------------------------------------------------------------

export type BandMark = { key: string; label: string; value: number };

export type BandGeometry = {
  /** Position of the value along the band, 0–100 (clamped); null without a value. */
  valuePct: number | null;
  /** The value lies beyond the band's ends (drawn at the end with an arrow). */
  over: boolean;
  under: boolean;
  /** Normal range, 0–100, when given. */
  normal: { fromPct: number; toPct: number } | null;
  marks: (BandMark & { pct: number })[];
};

const clampPct = (x: number) => Math.min(100, Math.max(0, x));

/** Geometry of a band running from min to max, with marks (setpoints) and an optional normal range. */
export function bandGeometry(input: {
  min: number;
  max: number;
  value: number | null | undefined;
  marks?: readonly BandMark[];
  normal?: { from: number; to: number } | null;
}): BandGeometry {
  const { min, max, value } = input;
  const span = max - min;
  const pct = (v: number) => (span > 0 ? clampPct(((v - min) / span) * 100) : 0);
  const has = value != null && Number.isFinite(value);
  return {
    valuePct: has ? pct(value) : null,
    over: has && value > max,
    under: has && value < min,
    normal: input.normal ? { fromPct: pct(input.normal.from), toPct: pct(input.normal.to) } : null,
    marks: (input.marks ?? []).filter((m) => Number.isFinite(m.value)).map((m) => ({ ...m, pct: pct(m.value) })),
  };
}

// ---- Reconnection schedule ------------------------------------------------------------------------

export type BackoffOptions = { baseMs: number; maxMs: number };
export const LIVE_BACKOFF: BackoffOptions = { baseMs: 1_000, maxMs: 30_000 };

/**
 * Delay before reconnect attempt `attempt` (0 for the first retry): exponential growth capped at maxMs,
 * with "equal jitter" — half the step fixed, half random — so a room of screens that lost the server together
 * does not reconnect in lockstep, yet none retries at once.
 */
export function backoffDelayMs(attempt: number, opts: BackoffOptions = LIVE_BACKOFF, random: () => number = Math.random): number {
  const n = Math.max(0, Math.floor(attempt));
  const step = Math.min(opts.maxMs, opts.baseMs * 2 ** Math.min(n, 30));
  const r = Math.min(1, Math.max(0, random()));
  return Math.round(step / 2 + (r * step) / 2);
}

// ---- Stage values ---------------------------------------------------------------------------------

/** Outlet temperature of the last stage (index stages − 1), falling back to the last one reported. */
export function finalStageC(live: Pick<LiveCompressor, "stageC"> | null | undefined, stages: number): number | null {
  if (!live) return null;
  const own = live.stageC[stages - 1];
  if (own != null) return own;
  for (let i = live.stageC.length - 1; i >= 0; i--) {
    const v = live.stageC[i];
    if (v != null) return v;
  }
  return null;
}

// ---- Display ranges -------------------------------------------------------------------------------

/**
 * Display ranges and typical normal bands for values without a setpoint of their own. These are common practice
 * for multi-stage breathing-air compressors, recalled from memory, not from a maker's data: the maker's manual
 * governs for each machine. Airkeep's alarm limits (warning and critical) are set on the thresholds page.
 */
export const displayRanges = {
  stageC: { min: 0, max: 250, normal: { from: 40, to: 180 } },
  oilBar: { min: 0, max: 10, normal: { from: 2, to: 6 } },
  purifierC: { min: -10, max: 70, normal: { from: 5, to: 40 } },
  intakeC: { min: -20, max: 60, normal: { from: 5, to: 40 } },
} as const;
export const DISPLAY_RANGE_SOURCE = "Typical range: common practice, from memory; the maker's manual governs.";

// ---- Trends ---------------------------------------------------------------------------------------

export const trendSignals = [
  "deliveryBar",
  "stage1C",
  "stage2C",
  "stage3C",
  "stage4C",
  "oilBar",
  "purifierC",
  "intakeC",
] as const;
export type TrendSignal = (typeof trendSignals)[number];
export const trendSignalSchema = z.enum(trendSignals);

export const trendSignalInfo: Record<TrendSignal, { label: string; quantity: "pressure" | "temperature" }> = {
  deliveryBar: { label: "Delivery pressure", quantity: "pressure" },
  stage1C: { label: "Stage 1 outlet temperature", quantity: "temperature" },
  stage2C: { label: "Stage 2 outlet temperature", quantity: "temperature" },
  stage3C: { label: "Stage 3 outlet temperature", quantity: "temperature" },
  stage4C: { label: "Stage 4 outlet temperature", quantity: "temperature" },
  oilBar: { label: "Oil pressure", quantity: "pressure" },
  purifierC: { label: "Purifier temperature", quantity: "temperature" },
  intakeC: { label: "Intake temperature", quantity: "temperature" },
};

export const trendSpans = ["15m", "1h", "6h", "24h", "7d", "30d", "90d", "1y"] as const;
export type TrendSpan = (typeof trendSpans)[number];
export const trendSpanSchema = z.enum(trendSpans);

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
export const trendSpanMs: Record<TrendSpan, number> = {
  "15m": 15 * MIN,
  "1h": HOUR,
  "6h": 6 * HOUR,
  "24h": DAY,
  "7d": 7 * DAY,
  "30d": 30 * DAY,
  "90d": 90 * DAY,
  "1y": 365 * DAY,
};

export type TrendSource = "raw" | "1m" | "1h";
export const trendSourceLabel: Record<TrendSource, string> = {
  raw: "raw readings",
  "1m": "1-minute rollups",
  "1h": "1-hour rollups",
};
const sourceResolutionMs: Record<TrendSource, number> = { raw: 1_000, "1m": MIN, "1h": HOUR };

/** Raw readings up to 6 h, 1-minute rollups up to 7 d, 1-hour rollups beyond. */
export function trendSourceFor(spanMs: number): TrendSource {
  if (spanMs <= 6 * HOUR) return "raw";
  if (spanMs <= 7 * DAY) return "1m";
  return "1h";
}

export const MAX_TREND_POINTS = 1000;

/** Bucket width: a whole multiple of the source's resolution that keeps the span within maxPoints buckets. */
export function trendBucketMs(spanMs: number, source: TrendSource, maxPoints = MAX_TREND_POINTS): number {
  const res = sourceResolutionMs[source];
  return Math.max(1, Math.ceil(spanMs / maxPoints / res)) * res;
}

/** One trend point: bucket start (ms), mean, min, max. */
export type TrendPoint = [t: number, mean: number | null, min: number | null, max: number | null];

export type TrendResponse = {
  compressorId: number;
  signal: TrendSignal;
  span: TrendSpan;
  source: TrendSource;
  bucketMs: number;
  from: number;
  to: number;
  points: TrendPoint[];
};

/** Inserts an empty point where readings stop for more than `maxGapBuckets` buckets, so the line breaks there. */
export function breakGaps(points: readonly TrendPoint[], bucketMs: number, maxGapBuckets = 2): TrendPoint[] {
  const out: TrendPoint[] = [];
  let prev: number | null = null;
  for (const p of points) {
    if (prev !== null && p[0] - prev > bucketMs * maxGapBuckets) out.push([prev + bucketMs, null, null, null]);
    out.push(p);
    prev = p[0];
  }
  return out;
}

// ---- Board data (what the server prefetches and the socket keeps current) -------------------------

export type BoardSite = { id: number; name: string; code: string; timeZone: string };

export type BoardCompressor = {
  id: number;
  name: string;
  siteId: number;
  modelName: string;
  stages: number;
  ratedPressureBar: number;
  stopPressureBar: number;
  restartPressureBar: number;
  bankVolumeL: number;
  inService: boolean;
  /** Service tasks due or overdue (null: none, or no plan). */
  service: ServiceBadge | null;
  live: LiveCompressor | null;
  /** Server time at which `live` was known to be current; the newer of two versions wins. */
  liveStamp: number;
  /** Purifier cartridge use, % of its water capacity, and the advisory level, as last computed (absent when unrated). */
  cartridge?: { usedPct: number; advisoryPct: number } | null;
};

export type BoardData = {
  /** Server time the data was read. */
  at: number;
  sites: BoardSite[];
  compressors: BoardCompressor[];
};

/** The compressor page's live part: configuration and last known state. */
export type CompressorDetail = {
  at: number;
  compressor: CompressorDto;
  live: LiveCompressor | null;
  liveStamp: number;
};

/** Path parameter of a compressor: a positive integer id. */
export const compressorIdSchema = z.coerce.number().int().positive();

/** One entry of a compressor's device history (GET /api/compressors/:id/events). */
export type DeviceEventDto = {
  id: number;
  ts: number;
  kind: "comms_lost" | "comms_restored" | "state" | "trip";
  runState: RunState | null;
  tripCode: number | null;
  text: string;
  receivedAt: number;
};
