/**
 * The backtest's evaluation: every stored sample goes through the pure evaluator (shared/alarm-eval.ts) with the limits
 * in force and with the proposed ones, built exactly as the live engine builds it (db/alarm-engine.ts → evaluate):
 * the final-stage temperature from the model's fitted stages, a restart between two running readings (the start
 * counter moved) restarting the settling time, and a reading no newer than the last one skipped. What it counts is what
 * each set would have raised, to the reading.
 *
 * Limits the two sets share are evaluated once (a limit's timers depend only on its own values and on the run state,
 * which both sets see alike), so a proposal that changes one limit costs little more than a single pass.
 *
 * Rollup buckets (history older than raw retention) are fed as two samples, at the bucket's start and at its last
 * reading; high limits see the bucket's maximum and low limits its minimum.
 */
import {
  evaluateSample,
  initialEvaluatorState,
  TRIP_KEY,
  type AlarmEvent,
  type AlarmSample,
  type EvaluatorState,
} from "@/shared/alarm-eval";
import {
  defaultAlarmSettings,
  limitKey,
  priorities,
  signalInfo,
  type AlarmSettings,
  type AlarmSignal,
  type Limit,
  type Priority,
} from "@/shared/alarm-rules";
import { BACKTEST_MAX_MARKERS, type BacktestLimitStat, type BacktestPoint, type BacktestSide } from "@/shared/backtest";
import { runStates, type RunState } from "@/shared/telemetry";
import { B, RAW_FIXED, U, type BlockStats, type RawRow, type RollupRow } from "@/db/backtest-data";

export type SideName = "old" | "new";

export type BacktestCoreOptions = {
  /** Fitted stages of the compressor's model (the final stage is the highest that reports). */
  stages: number;
  /** Window counted: [from, to). Samples before `from` only bring timers and settling up to date. */
  from: number;
  to: number;
  oldLimits: readonly Limit[];
  newLimits: readonly Limit[];
  /** Value columns of the raw rows fed (after the fixed ones), in order. */
  signals: readonly AlarmSignal[];
  settings?: AlarmSettings;
  /** Signals drawn on the chart (a subset of `signals`), and the number of buckets. */
  chartSignals?: readonly AlarmSignal[];
  chartBuckets?: number;
  maxMarkers?: number;
  /** Every evaluator event of each set, warm-up included (tests compare them with the live engine). */
  onEvent?: (side: SideName, e: AlarmEvent) => void;
};

type Tally = {
  name: SideName;
  limits: Limit[];
  open: Map<string, number>;
  stats: Map<string, BacktestLimitStat>;
  raises: Record<Priority, number>;
  time: Record<Priority, number>;
  chatteringRaises: number;
  chattering: Set<string>;
  activeAtStart: string[];
  markers: BacktestSide["markers"];
  truncated: boolean;
  trips: number;
};

type LimitState = EvaluatorState["limits"][string];

/** What the quiet-reading test needs of one limit, resolved once (see quiet()). */
type Watch = {
  key: string;
  /** Index of the limit's signal in a raw row. */
  col: number;
  high: boolean;
  value: number;
  /** Where the value has returned: value − deadband for a high limit, value + deadband for a low one. */
  back: number;
  onMs: number;
  offMs: number;
  suppressible: boolean;
  /** The evaluator's own timer object for this limit (it keeps the object and mutates it). */
  s: LimitState | undefined;
};

/** Limits evaluated together under one evaluator state, and the sets whose counts their events go to. */
type Group = {
  limits: Limit[];
  high: Limit[];
  low: Limit[];
  state: EvaluatorState;
  to: Tally[];
  countsTrips: boolean;
  watch: Watch[];
  /** Whether the unit counted as settled at the last evaluated reading; null before the first. */
  settled: boolean | null;
};

const zero = (): Record<Priority, number> => ({ critical: 0, warning: 0, advisory: 0 });

/** Order of the signals in a rollup row (db/readings ROLLUP_SIGNALS). */
const ROLLUP_KEYS = ["deliveryBar", "stage1C", "stage2C", "stage3C", "stage4C", "oilBar", "purifierC", "intakeC"] as const;

const sameLimit = (a: Limit, b: Limit) =>
  a.value === b.value && a.deadband === b.deadband && a.onDelayS === b.onDelayS && a.offDelayS === b.offDelayS;

export type BacktestCoreResult = {
  old: BacktestSide;
  new: BacktestSide;
  trips: number;
  samples: number;
  chart: { bucketMs: number; series: Partial<Record<AlarmSignal, BacktestPoint[]>> };
};

export type BacktestCore = {
  /** One raw row as read by db/backtest-data rawReader (row[0] is ts − base). */
  feedRaw(row: RawRow, base: number): void;
  /**
   * A summary of the next stretch of raw readings (db/backtest-data blockReader). Applied, and true, when it proves
   * that no reading in it raises or clears anything; false when its readings must be fed one by one instead.
   */
  feedBlock(stats: BlockStats): boolean;
  feedRollup(row: RollupRow): void;
  /** A rollup bucket drawn on the chart only (the chart of raw stretches comes from their rollups). */
  chartRollup(row: RollupRow): void;
  finish(): BacktestCoreResult;
};

export function createBacktestCore(o: BacktestCoreOptions): BacktestCore {
  const settings = o.settings ?? defaultAlarmSettings;
  const maxMarkers = o.maxMarkers ?? BACKTEST_MAX_MARKERS;
  const { from, to } = o;
  const stageCount = Math.max(1, Math.min(4, o.stages));
  const signals = [...o.signals];
  const nSignals = signals.length;
  type Sample = AlarmSample & { values: Partial<Record<AlarmSignal, number | null>> };
  const sample: Sample = { ts: 0, runState: "stopped", tripCode: null, values: {} };
  const v = sample.values;
  // Rollups: one sample of maxima for high limits and one of minima for low limits.
  const hi: Sample = { ts: 0, runState: "stopped", tripCode: null, values: {} };
  const lo: Sample = { ts: 0, runState: "stopped", tripCode: null, values: {} };

  function tally(name: SideName, limits: readonly Limit[]): Tally {
    const stats = new Map<string, BacktestLimitStat>();
    for (const l of limits) {
      const key = limitKey(l);
      stats.set(key, { key, signal: l.signal, direction: l.direction, priority: l.priority, raises: 0, timeInAlarmMs: 0, chatteringRaises: 0 });
    }
    return {
      name,
      limits: [...limits],
      open: new Map(),
      stats,
      raises: zero(),
      time: zero(),
      chatteringRaises: 0,
      chattering: new Set(),
      activeAtStart: [],
      markers: [],
      truncated: false,
      trips: 0,
    };
  }
  const oldT = tally("old", o.oldLimits);
  const newT = tally("new", o.newLimits);

  function group(limits: Limit[], to: Tally[], countsTrips: boolean): Group {
    return {
      limits,
      high: limits.filter((l) => l.direction === "high"),
      low: limits.filter((l) => l.direction === "low"),
      state: initialEvaluatorState(),
      to,
      countsTrips,
      watch: limits.map((l) => ({
        key: limitKey(l),
        col: RAW_FIXED + signals.indexOf(l.signal),
        high: l.direction === "high",
        value: l.value,
        back: l.direction === "high" ? l.value - l.deadband : l.value + l.deadband,
        onMs: l.onDelayS * 1000,
        offMs: l.offDelayS * 1000,
        suppressible: signalInfo[l.signal].suppressWhenStopped,
        s: undefined,
      })),
      settled: null,
    };
  }
  const newByKey = new Map(o.newLimits.map((l) => [limitKey(l), l]));
  const shared = o.oldLimits.filter((l) => {
    const n = newByKey.get(limitKey(l));
    return n !== undefined && sameLimit(l, n);
  });
  const sharedKeys = new Set(shared.map(limitKey));
  const groups: Group[] = [
    // The shared group always exists: it carries the machine's trips for both sets.
    group(shared, [oldT, newT], true),
    group(o.oldLimits.filter((l) => !sharedKeys.has(limitKey(l))), [oldT], false),
    group(o.newLimits.filter((l) => !sharedKeys.has(limitKey(l))), [newT], false),
  ].filter((g, i) => i === 0 || g.limits.length > 0);

  let lastTs = 0;
  let lastStarts: number | null = null;
  let started = false;
  let count = 0;

  function start(): void {
    started = true;
    for (const t of [oldT, newT]) t.activeAtStart = [...t.open.keys()];
  }

  function record(t: Tally, e: AlarmEvent): void {
    const counted = e.ts >= from;
    const stat = t.stats.get(e.key);
    if (e.kind === "raise") {
      t.open.set(e.key, e.ts);
      if (!counted) return;
      t.raises[e.priority]++;
      if (stat) stat.raises++;
      if (e.chattering) {
        t.chatteringRaises++;
        t.chattering.add(e.key);
        if (stat) stat.chatteringRaises++;
      }
      if (t.markers.length < maxMarkers) {
        t.markers.push({ ts: e.ts, key: e.key, priority: e.priority, signal: e.limit?.signal ?? null, value: e.value, chattering: e.chattering === true });
      } else t.truncated = true;
      return;
    }
    const since = t.open.get(e.key);
    if (since === undefined) return;
    t.open.delete(e.key);
    const begin = since > from ? since : from;
    if (e.ts > begin) {
      t.time[e.priority] += e.ts - begin;
      if (stat) stat.timeInAlarmMs += e.ts - begin;
    }
  }

  function onEvents(g: Group, events: AlarmEvent[]): void {
    for (const e of events) {
      if (e.key === TRIP_KEY) {
        // The machine's own trip: the same whatever the limits; reported once, by the shared group.
        if (!g.countsTrips) continue;
        for (const t of g.to) {
          o.onEvent?.(t.name, e);
          if (e.kind === "raise" && e.ts >= from) t.trips++;
        }
        continue;
      }
      for (const t of g.to) {
        o.onEvent?.(t.name, e);
        record(t, e);
      }
    }
  }

  // ——— chart ———
  const chartSignals = (o.chartSignals ?? []).filter((s) => signals.includes(s));
  const buckets = Math.max(1, o.chartBuckets ?? 720);
  const bucketMs = Math.max(1000, Math.ceil((to - from) / buckets / 1000) * 1000);
  const nb = Math.max(1, Math.ceil((to - from) / bucketMs));
  const acc = chartSignals.map(() => ({
    min: new Float64Array(nb).fill(Infinity),
    max: new Float64Array(nb).fill(-Infinity),
    sum: new Float64Array(nb),
    n: new Float64Array(nb),
  }));

  // ——— raw readings ———

  const settlingMs = settings.settlingS * 1000;

  /**
   * True when evaluating this reading would change nothing in the group's state and raise no event, judged with the
   * evaluator's own rules (shared/alarm-eval.ts evaluateSample): same run state, no trip change, settled as before, and
   * for every limit a reading that keeps its timer where it is (no timer starting, none running out, none to reset).
   * Most readings of a long history are like this; they are skipped without building a sample. Anything else goes
   * through evaluateSample itself. The property test against the live engine holds the two to the same answers.
   */
  function quiet(g: Group, r: RawRow, ts: number, runState: RunState): boolean {
    const st = g.state;
    if (g.settled === null || runState !== st.lastRunState || (runState === "tripped") !== st.trip.active) return false;
    const settled = st.runningSince !== null && ts - st.runningSince >= settlingMs;
    if (settled !== g.settled) return false;
    const watch = g.watch;
    for (let i = 0; i < watch.length; i++) {
      const w = watch[i]!;
      const s = w.s;
      if (s === undefined) return false;
      if (w.suppressible && !settled) {
        if (s.active || s.since !== null) return false;
        continue;
      }
      const x = r[w.col];
      if (x == null || !Number.isFinite(x)) continue;
      if (!s.active) {
        if (w.high ? x > w.value : x < w.value) {
          if (s.since === null || ts - s.since >= w.onMs) return false;
        } else if (s.since !== null) return false;
      } else if (w.high ? x < w.back : x > w.back) {
        if (s.since === null || ts - s.since >= w.offMs) return false;
      } else if (s.since !== null) return false;
    }
    return true;
  }

  function evaluateGroup(g: Group, events: AlarmEvent[]): void {
    if (events.length) onEvents(g, events);
    const st = g.state;
    g.settled = st.runningSince !== null && sample.ts - st.runningSince >= settlingMs;
    for (const w of g.watch) w.s = st.limits[w.key];
  }

  function feedRaw(r: RawRow, base: number): void {
    const ts = (r[0] as number) + base;
    if (!(ts > lastTs)) return;
    if (!started && ts >= from) start();
    const runState: RunState = runStates[r[1] as number] ?? "stopped";
    const starts = r[2];
    // As the engine: a stop and start between two readings (the start counter moved) restarts the settling time.
    const restarted = starts != null && lastStarts != null && starts > lastStarts && runState === "running";
    lastTs = ts;
    if (starts != null) lastStarts = starts;
    let filled = false;
    for (let k = 0; k < groups.length; k++) {
      const g = groups[k]!;
      if (!restarted && quiet(g, r, ts, runState)) continue;
      if (!filled) {
        filled = true;
        for (let i = 0; i < nSignals; i++) v[signals[i]!] = r[RAW_FIXED + i];
        sample.ts = ts;
        sample.runState = runState;
        sample.tripCode = r[3];
      }
      if (restarted && g.state.lastRunState === "running") g.state.lastRunState = null;
      evaluateGroup(g, evaluateSample(g.state, g.limits, sample, settings));
    }
    count++;
  }

  // ——— summaries of quiet stretches ———

  type Plan = { w: Watch; since: number | null }[];

  /**
   * What evaluating every reading of the stretch would do to one group, if that is provably nothing but timers being
   * reset or started (no event): the same rules as quiet(), applied to the stretch's minima and maxima. Null when a
   * reading inside could change the state otherwise (a run-state change, a restart, settling running out, a mixed
   * stretch, a timer running out): then the readings are fed one by one.
   */
  function planBlock(g: Group, b: BlockStats, runState: RunState, firstTs: number, lastTs: number): Plan | null {
    const st = g.state;
    if (g.settled === null || runState !== st.lastRunState || (runState === "tripped") !== st.trip.active) return null;
    const settled = st.runningSince !== null && firstTs - st.runningSince >= settlingMs;
    if (settled !== g.settled || settled !== (st.runningSince !== null && lastTs - st.runningSince >= settlingMs)) return null;
    const plan: Plan = [];
    for (const w of g.watch) {
      const s = w.s;
      if (s === undefined) return null;
      if (w.suppressible && !settled) {
        if (s.active || s.since !== null) return null;
        continue;
      }
      const at = B.signals + 2 * (w.col - RAW_FIXED);
      if (b[at] === null) continue; // no reading of the stretch has a value: each holds the state
      const mn = b[at] as number;
      const mx = b[at + 1] as number;
      if (!Number.isFinite(mn) || !Number.isFinite(mx)) return null;
      const allBeyond = w.high ? mn > w.value : mx < w.value;
      const noneBeyond = w.high ? mx <= w.value : mn >= w.value;
      const allBack = w.high ? mx < w.back : mn > w.back;
      const noneBack = w.high ? mn >= w.back : mx <= w.back;
      const [all, none, delay] = s.active ? [allBack, noneBack, w.offMs] : [allBeyond, noneBeyond, w.onMs];
      if (none) {
        if (s.since !== null) plan.push({ w, since: null });
      } else if (all) {
        // The timer runs (or starts at the first reading, which needs every reading to have its values): it must not
        // run out inside the stretch.
        const since = s.since ?? (b[B.gaps] === 0 ? firstTs : null);
        if (since === null || lastTs - since >= delay) return null;
        if (s.since === null) plan.push({ w, since });
      } else return null;
    }
    return plan;
  }

  function feedBlock(b: BlockStats): boolean {
    const n = b[B.n] as number;
    if (n === 0) return true;
    const firstTs = b[B.firstTs] as number;
    const lastTsInBlock = b[B.lastTs] as number;
    if (!(firstTs > lastTs) || b[B.minRunState] !== b[B.maxRunState]) return false;
    const starts = b[B.minStarts] as number | null;
    if (starts !== null && (starts !== b[B.maxStarts] || (lastStarts !== null && starts !== lastStarts))) return false;
    const runState: RunState = runStates[b[B.minRunState] as number] ?? "stopped";
    const plans: Plan[] = [];
    for (const g of groups) {
      const plan = planBlock(g, b, runState, firstTs, lastTsInBlock);
      if (!plan) return false;
      plans.push(plan);
    }
    if (!started && lastTsInBlock >= from) start();
    for (const plan of plans) for (const { w, since } of plan) w.s!.since = since;
    lastTs = lastTsInBlock;
    if (starts !== null) lastStarts = starts;
    count += n;
    return true;
  }

  // ——— 1-minute rollups ———

  function setRollupValues(u: RollupRow): void {
    for (let i = 0; i < ROLLUP_KEYS.length; i++) {
      const k = ROLLUP_KEYS[i]!;
      const at = U.signals + i * 4;
      const n = (u[at + 3] as number | null) ?? 0;
      hi.values[k] = n > 0 ? u[at + 1] : null;
      lo.values[k] = n > 0 ? u[at] : null;
    }
    const fin = finalStageIndex(u);
    hi.values.finalStageC = fin < 0 ? null : u[U.signals + (1 + fin) * 4 + 1];
    lo.values.finalStageC = fin < 0 ? null : u[U.signals + (1 + fin) * 4];
  }

  /** The highest fitted stage that reported in the bucket (0-based), or −1. */
  function finalStageIndex(u: RollupRow): number {
    for (let s = stageCount - 1; s >= 0; s--) if (((u[U.signals + (1 + s) * 4 + 3] as number | null) ?? 0) > 0) return s;
    return -1;
  }

  function evaluateRollup(ts: number, runState: RunState, starts: number | null): void {
    const restarted = starts != null && lastStarts != null && starts > lastStarts && runState === "running";
    lastTs = ts;
    if (starts != null) lastStarts = starts;
    hi.ts = lo.ts = ts;
    hi.runState = lo.runState = runState;
    hi.tripCode = lo.tripCode = null;
    for (const g of groups) {
      if (restarted && g.state.lastRunState === "running") g.state.lastRunState = null;
      // Run state, settling and trips are decided by the first call; the second finds them already current.
      const a = evaluateSample(g.state, g.high, hi, settings);
      if (a.length) onEvents(g, a);
      const b = evaluateSample(g.state, g.low, lo, settings);
      if (b.length) onEvents(g, b);
      g.settled = g.state.runningSince !== null && ts - g.state.runningSince >= settlingMs;
      for (const w of g.watch) w.s = g.state.limits[w.key];
    }
  }

  function chartRollup(u: RollupRow): void {
    const ts = u[U.bucketTs] as number;
    if (ts < from) return;
    const b = Math.floor((ts - from) / bucketMs);
    if (b >= nb) return;
    for (let i = 0; i < chartSignals.length; i++) {
      const signal = chartSignals[i]!;
      const idx = signal === "finalStageC" ? finalStageIndex(u) + 1 : ROLLUP_KEYS.indexOf(signal as (typeof ROLLUP_KEYS)[number]);
      if (idx < 0 || (signal === "finalStageC" && idx === 0)) continue;
      const at = U.signals + idx * 4;
      const n = (u[at + 3] as number | null) ?? 0;
      if (n <= 0) continue;
      const a = acc[i]!;
      const mn = u[at] as number;
      const mx = u[at + 1] as number;
      if (mn < a.min[b]!) a.min[b] = mn;
      if (mx > a.max[b]!) a.max[b] = mx;
      a.sum[b] = a.sum[b]! + (u[at + 2] as number);
      a.n[b] = a.n[b]! + n;
    }
  }

  function feedRollup(u: RollupRow): void {
    const bucketTs = u[U.bucketTs] as number;
    const last = (u[U.lastTs] as number | null) ?? bucketTs + 59_999;
    const lastRunState = runStates[(u[U.lastRunState] as number | null) ?? 0] ?? "stopped";
    const tripped = ((u[U.trippedS] as number | null) ?? 0) > 0;
    const starts = u[U.starts] as number | null;
    setRollupValues(u);
    if (bucketTs > lastTs) {
      if (!started && bucketTs >= from) start();
      evaluateRollup(bucketTs, tripped ? "tripped" : lastRunState, starts);
      count++;
    }
    if (last > lastTs) {
      if (!started && last >= from) start();
      evaluateRollup(last, lastRunState, starts);
      count++;
    }
    chartRollup(u);
  }

  function side(t: Tally): BacktestSide {
    const activeAtEnd: string[] = [];
    for (const [key, since] of t.open) {
      activeAtEnd.push(key);
      const begin = since > from ? since : from;
      const stat = t.stats.get(key);
      if (stat && to > begin) {
        t.time[stat.priority] += to - begin;
        stat.timeInAlarmMs += to - begin;
      }
    }
    return {
      limits: t.limits,
      raises: t.raises,
      total: priorities.reduce((n, p) => n + t.raises[p], 0),
      timeInAlarmMs: t.time,
      totalTimeInAlarmMs: priorities.reduce((n, p) => n + t.time[p], 0),
      chatteringRaises: t.chatteringRaises,
      chatteringLimits: [...t.chattering],
      activeAtStart: t.activeAtStart,
      activeAtEnd,
      byLimit: [...t.stats.values()],
      markers: t.markers,
      markersTruncated: t.truncated,
    };
  }

  return {
    feedRaw,
    feedBlock,
    feedRollup,
    chartRollup,
    finish() {
      if (!started) start();
      const series: Partial<Record<AlarmSignal, BacktestPoint[]>> = {};
      chartSignals.forEach((signal, i) => {
        const a = acc[i]!;
        const points: BacktestPoint[] = new Array(nb);
        for (let b = 0; b < nb; b++) {
          const t = from + b * bucketMs;
          points[b] = a.n[b]! > 0 ? [t, a.sum[b]! / a.n[b]!, a.min[b]!, a.max[b]!] : [t, null, null, null];
        }
        series[signal] = points;
      });
      return { old: side(oldT), new: side(newT), trips: oldT.trips, samples: count, chart: { bucketMs, series } };
    },
  };
}
