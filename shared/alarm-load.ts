import type { Priority } from "./alarm-rules";

// Alarm-system load of one site (one operator position unless configured) over a period, set against the
// benchmarks of ANSI/ISA-18.2 and EEMUA Publication 191. Each benchmark carries its source; a value recalled
// without the text at hand says so ("from memory").
//
// What is counted: an alarm occurrence is one row of the alarms table (one raise, kept until it returns to normal),
// counted at its raise time. Airkeep's priorities map onto the three-level split as critical = high,
// warning = medium, advisory = low.

export type AlarmLoadFigures = {
  siteId: number;
  /** Operator positions the load is shared by. */
  positions: number;
  periodS: number;
  alarms: number;
  /** Alarms per hour per operator position. */
  perHour: number;
  /** Alarms per day per operator position. */
  perDay: number;
  /**
   * Alarm floods by the sliding-window rule (see `floodEpisodes`): how many overlap the period, the time spent in
   * them inside the period, and that time's share of the period.
   */
  floods: number;
  floodS: number;
  floodShare: number;
  /** Most alarms raised in any 10-minute window (sliding, not fixed buckets), and when that window began. */
  peakTenMinute: number;
  peakTenMinuteAt: number | null;
  /** The ten most frequent alarms (by compressor and alarm key) and their share of all alarms. */
  top: TopAlarm[];
  topShare: number | null;
  /** Occurrences marked chattering, and how many distinct alarms chattered. */
  chatteringOccurrences: number;
  chatteringAlarms: number;
  /** Alarms active for more than 24 hours at some time in the period, and the most present on one day. */
  staleAlarms: number;
  staleMaxOnOneDay: number;
  stale: StaleAlarm[];
  byPriority: Record<Priority, number>;
  /** Share of each priority (null without alarms). */
  priorityShare: Record<Priority, number> | null;
};

export type TopAlarm = {
  compressorId: number;
  compressorName: string;
  key: string;
  priority: Priority;
  count: number;
  share: number;
};

export type StaleAlarm = {
  alarmId: number;
  compressorId: number;
  compressorName: string;
  key: string;
  priority: Priority;
  raisedAt: number;
  clearedAt: number | null;
};

export const STALE_AFTER_MS = 24 * 3_600_000;
/** ISA-18.2 / EEMUA 191: more than 10 alarms in 10 minutes per operator position is a flood. */
export const FLOOD_THRESHOLD = 10;
/** ISA-18.2: a flood ends once fewer than 5 alarms fall in the last 10 minutes (per operator position). */
export const FLOOD_END_BELOW = 5;
export const TEN_MINUTES_MS = 600_000;

export type FloodEpisode = { start: number; end: number };

/**
 * Alarm floods over [from, to) from sorted raise times (times from `from − 10 min` on are needed for the rate at the
 * start). The rate at t is the number of alarms raised in (t − 10 min, t]. A flood begins at the alarm that takes the
 * rate above `FLOOD_THRESHOLD × positions` and ends when it falls below `FLOOD_END_BELOW × positions` (as an alarm
 * ages out of the window); one still running at `to` is cut there. Episodes are clipped to [from, to).
 * Source: ANSI/ISA-18.2-2016 flood definition (begins above 10 alarms per 10 minutes per operator, ends below 5),
 * threshold also in EEMUA 191 — from memory, not checked against the texts.
 */
export function floodEpisodes(times: readonly number[], from: number, to: number, positions = 1): FloodEpisode[] {
  const above = FLOOD_THRESHOLD * positions;
  const below = FLOOD_END_BELOW * positions;
  const out: FloodEpisode[] = [];
  let inWindow = 0;
  let start: number | null = null;
  let i = 0; // next arrival
  let j = 0; // next departure (alarm j leaves at times[j] + 10 min)
  while (i < times.length || j < i) {
    const arrive = i < times.length ? times[i]! : Number.POSITIVE_INFINITY;
    const leave = j < i ? times[j]! + TEN_MINUTES_MS : Number.POSITIVE_INFINITY;
    const t = Math.min(arrive, leave);
    if (t >= to) break;
    // Everything at this instant first, then judge the rate.
    while (j < i && times[j]! + TEN_MINUTES_MS === t) {
      j++;
      inWindow--;
    }
    while (i < times.length && times[i] === t) {
      i++;
      inWindow++;
    }
    if (start === null && inWindow > above) start = t;
    else if (start !== null && inWindow < below) {
      if (t > from) out.push({ start: Math.max(start, from), end: t });
      start = null;
    }
  }
  if (start !== null && to > from) out.push({ start: Math.max(start, from), end: to });
  return out;
}

/** The 10-minute window [t, t + 10 min) with the most alarms, among sorted raise times; the earliest such window. */
export function busiestTenMinutes(times: readonly number[]): { count: number; at: number | null } {
  let best = 0;
  let at: number | null = null;
  let j = 0;
  for (let i = 0; i < times.length; i++) {
    while (j < times.length && times[j]! < times[i]! + TEN_MINUTES_MS) j++;
    if (j - i > best) {
      best = j - i;
      at = times[i]!;
    }
  }
  return { count: best, at };
}

export const priorityLevel: Record<Priority, "high" | "medium" | "low"> = { critical: "high", warning: "medium", advisory: "low" };

export type BenchmarkId = "rate" | "flood" | "peak" | "top10" | "chattering" | "stale" | "priority";

export type Benchmark = {
  id: BenchmarkId;
  metric: string;
  target: string;
  source: string;
  /** True when the value is recalled without the text in front of us. */
  fromMemory: boolean;
};

export const alarmBenchmarks: readonly Benchmark[] = [
  {
    id: "rate",
    metric: "Average alarm rate per operator position",
    target: "≤ 6 per hour (~150 per day) very likely acceptable; ≤ 12 per hour (~300 per day) maximum manageable",
    source:
      "ANSI/ISA-18.2-2016, alarm performance metrics table (from memory). Consistent with EEMUA 191 (1999): under 1 alarm per 10 minutes the goal, 2 per 10 minutes manageable, as reported by Strobhar & Harvey, Chemical Processing, Dec. 2011.",
    fromMemory: true,
  },
  {
    id: "flood",
    metric: "Share of time in alarm flood (sliding 10-minute window)",
    target: "~< 1 %",
    source:
      "ANSI/ISA-18.2-2016: a flood begins above 10 alarms in 10 minutes per operator position and ends below 5 in 10 minutes; the metrics table asks for ~< 1 % of the time in flood. EEMUA 191 uses the same 10 per 10 minutes. From memory, not checked against the texts.",
    fromMemory: true,
  },
  {
    id: "peak",
    metric: "Most alarms in any 10 minutes (sliding window)",
    target: "≤ 10 per operator position",
    source:
      "ANSI/ISA-18.2 (fewer than 10 in any 10-minute period) and EEMUA 191 (under 10 in the first 10 minutes after an upset manageable), as reported by Strobhar & Harvey, Chemical Processing, Dec. 2011.",
    fromMemory: false,
  },
  {
    id: "top10",
    metric: "Share of all alarms from the ten most frequent",
    target: "~< 1 % to 5 % at most, with action plans",
    source: "ANSI/ISA-18.2-2016, alarm performance metrics table (from memory). Written for plant-scale alarm systems with thousands of points; with a few compressors per site the ten most frequent are most of the load.",
    fromMemory: true,
  },
  {
    id: "chattering",
    metric: "Chattering alarms",
    target: "Zero; an action plan for any that occur",
    source: "ANSI/ISA-18.2-2016, alarm performance metrics table (from memory).",
    fromMemory: true,
  },
  {
    id: "stale",
    metric: "Stale alarms (active more than 24 h)",
    target: "Fewer than 5 present on any day, with action plans",
    source: "ANSI/ISA-18.2-2016, alarm performance metrics table (from memory); 24 h as the stale threshold is common practice.",
    fromMemory: true,
  },
  {
    id: "priority",
    metric: "Priority split of annunciated alarms (low / medium / high)",
    target: "~80 % / ~15 % / ~5 % (flagged here when high > 5 % or medium > 15 %)",
    source: "ANSI/ISA-18.2-2016 and EEMUA 191, commonly recommended three-priority distribution (from memory).",
    fromMemory: true,
  },
];

export type BenchmarkVerdict = "within" | "above" | "no-data";

export type BenchmarkResult = {
  id: BenchmarkId;
  value: string;
  verdict: BenchmarkVerdict;
  /** A second line, e.g. "manageable, above the acceptable rate". */
  note?: string;
};

const pct = (x: number) => `${(x * 100).toFixed(1)} %`;

/** How one site's figures stand against each benchmark. Above a benchmark is the abnormal case. */
export function assessAlarmLoad(f: AlarmLoadFigures): BenchmarkResult[] {
  const out: BenchmarkResult[] = [];
  out.push({
    id: "rate",
    value: `${f.perHour.toFixed(2)} per hour (${f.perDay.toFixed(1)} per day)`,
    verdict: f.perHour <= 6 ? "within" : "above",
    note: f.perHour > 6 && f.perHour <= 12 ? "Above the acceptable rate, within the maximum manageable" : f.perHour > 12 ? "Above the maximum manageable rate" : undefined,
  });
  out.push({
    id: "flood",
    value: `${pct(f.floodShare)} (${f.floods} flood${f.floods === 1 ? "" : "s"}, ${Math.round(f.floodS / 60)} min)`,
    verdict: f.floodShare < 0.01 ? "within" : "above",
  });
  out.push({ id: "peak", value: String(f.peakTenMinute), verdict: f.peakTenMinute <= FLOOD_THRESHOLD * f.positions ? "within" : "above" });
  out.push({
    id: "top10",
    value: f.topShare == null ? "—" : pct(f.topShare),
    verdict: f.topShare == null ? "no-data" : f.topShare <= 0.05 ? "within" : "above",
  });
  out.push({
    id: "chattering",
    value: `${f.chatteringAlarms} alarm${f.chatteringAlarms === 1 ? "" : "s"} (${f.chatteringOccurrences} occurrence${f.chatteringOccurrences === 1 ? "" : "s"})`,
    verdict: f.chatteringAlarms === 0 ? "within" : "above",
  });
  out.push({
    id: "stale",
    value: `${f.staleAlarms} in the period; at most ${f.staleMaxOnOneDay} on one day`,
    verdict: f.staleMaxOnOneDay < 5 ? "within" : "above",
  });
  const s = f.priorityShare;
  out.push({
    id: "priority",
    value: s ? `${pct(s.advisory)} / ${pct(s.warning)} / ${pct(s.critical)}` : "—",
    verdict: s ? (s.critical > 0.05 || s.warning > 0.15 ? "above" : "within") : "no-data",
    note: s && s.critical > 0.05 ? "More high-priority (critical) alarms than the recommended split" : undefined,
  });
  return out;
}

export const alarmLoadTerms = [
  {
    term: "Alarm",
    definition:
      "One raise of an alarm (a limit, a machine trip or a communication loss), counted when raised. Shelving, suppression and acknowledgement do not add alarms.",
  },
  { term: "Operator position", definition: "One per site unless configured (setting reports.operator_positions)." },
  {
    term: "Alarm flood",
    definition:
      "From the alarm that brings more than 10 alarms into the last 10 minutes (per operator position) until fewer than 5 remain in the last 10 minutes, on a sliding window — not fixed 10-minute buckets, so a burst across a bucket edge still counts (ANSI/ISA-18.2-2016, from memory).",
  },
  { term: "Busiest 10 minutes", definition: "The most alarms raised in any 10-minute window, wherever it begins." },
  {
    term: "Chattering",
    definition: "An occurrence the alarm evaluator marked as chattering: raised for the 3rd time within 60 s (the configured count and window).",
  },
  { term: "Stale", definition: "An alarm whose condition stayed active for more than 24 hours." },
  { term: "Priority split", definition: "critical = high, warning = medium, advisory = low." },
] as const;
