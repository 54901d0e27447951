/**
 * What a backtest asks and answers: the proposed set is run over stored history next to the set in force, through the
 * same evaluator the ingester uses (shared/alarm-eval.ts). Values are canonical (bar, °C); pages convert when drawing.
 */
import { z } from "zod";
import type { AlarmSignal, Limit, Priority } from "./alarm-rules";
import { MAX_LIMITS, scopeTypeSchema, thresholdRowSchema } from "./threshold-schema";

export const backtestSpans = ["24h", "7d", "30d"] as const;
export const backtestSpanSchema = z.enum(backtestSpans);
export type BacktestSpan = z.infer<typeof backtestSpanSchema>;
export const backtestSpanMs: Record<BacktestSpan, number> = {
  "24h": 86_400_000,
  "7d": 7 * 86_400_000,
  "30d": 30 * 86_400_000,
};
export const backtestSpanLabel: Record<BacktestSpan, string> = { "24h": "24 hours", "7d": "7 days", "30d": "30 days" };

/** Buckets of the backtest's trend chart (mean, min and max per bucket). */
export const BACKTEST_CHART_BUCKETS = 720;
/** Would-be alarms marked on the chart per set; the counts are always complete. */
export const BACKTEST_MAX_MARKERS = 1500;

export const backtestRequestSchema = z.object({
  compressorId: z.number().int().positive(),
  span: backtestSpanSchema,
  /** The set being edited and its proposed rows (the whole set, as it would be saved). */
  scopeType: scopeTypeSchema,
  scopeId: z.number().int().positive(),
  limits: z.array(thresholdRowSchema()).max(MAX_LIMITS),
});
export type BacktestRequest = z.infer<typeof backtestRequestSchema>;

export type BacktestMarker = {
  ts: number;
  key: string;
  priority: Priority;
  signal: AlarmSignal | null;
  /** The value that raised it (null for a trip). */
  value: number | null;
  chattering: boolean;
};

export type BacktestLimitStat = {
  key: string;
  signal: AlarmSignal;
  direction: "high" | "low";
  priority: Priority;
  raises: number;
  timeInAlarmMs: number;
  chatteringRaises: number;
};

export type BacktestSide = {
  limits: Limit[];
  /** Alarms raised by limits inside the window, per priority (the machine's own trips are counted apart). */
  raises: Record<Priority, number>;
  total: number;
  /** Time limits spent active inside the window, per priority (overlapping alarms each count). */
  timeInAlarmMs: Record<Priority, number>;
  totalTimeInAlarmMs: number;
  /** Raises that were the chatterCount-th inside chatterWindowS, and the limits that chattered. */
  chatteringRaises: number;
  chatteringLimits: string[];
  activeAtStart: string[];
  activeAtEnd: string[];
  byLimit: BacktestLimitStat[];
  markers: BacktestMarker[];
  markersTruncated: boolean;
};

export type BacktestSource = {
  kind: "raw" | "1m";
  from: number;
  to: number;
  /** Rows read: readings, or 1-minute buckets. */
  rows: number;
};

/** [t, mean, min, max] per chart bucket; null where the bucket has no value. */
export type BacktestPoint = [t: number, mean: number | null, min: number | null, max: number | null];

export type BacktestResult = {
  compressorId: number;
  compressorName: string;
  timeZone: string;
  span: BacktestSpan;
  from: number;
  to: number;
  /** Evaluation starts this much earlier so timers and settling are in the state they were at the window's start. */
  warmupFrom: number;
  sources: BacktestSource[];
  retentionDays: number;
  samples: number;
  trips: number;
  elapsedMs: number;
  old: BacktestSide;
  new: BacktestSide;
  chart: { bucketMs: number; series: Partial<Record<AlarmSignal, BacktestPoint[]>> };
};

/** One line of the streamed answer (NDJSON). */
export type BacktestMessage =
  | { type: "progress"; fraction: number; phase: "raw" | "1m" }
  | { type: "result"; result: BacktestResult }
  | { type: "error"; status: number; error: string };

/** The sentence that says where the history came from. */
export function backtestSourceText(sources: readonly BacktestSource[], retentionDays: number): string {
  const raw = sources.find((s) => s.kind === "raw" && s.rows > 0);
  const rollup = sources.find((s) => s.kind === "1m" && s.rows > 0);
  if (!raw && !rollup) return "No stored history in this window.";
  if (raw && !rollup) return `Raw readings (${raw.rows.toLocaleString("en-GB")}), every one evaluated as the live engine would.`;
  const rollupText =
    `1-minute rollups (${rollup!.rows.toLocaleString("en-GB")} minutes) where raw readings are no longer kept ` +
    `(raw readings are kept ${retentionDays} days): each minute is fed as a sample at its start and at its last reading, ` +
    "high limits see the minute's maximum and low limits its minimum, so short excursions are kept and on/off delays count in whole minutes; the chart draws the minute's mean.";
  return raw ? `Raw readings (${raw.rows.toLocaleString("en-GB")}) and ${rollupText}` : `Only ${rollupText}`;
}
