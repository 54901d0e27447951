import { defaultAlarmSettings, limitKey, signalInfo, type AlarmSettings, type AlarmSignal, type Limit, type Priority } from "./alarm-rules";
import type { RunState } from "./telemetry";

export type AlarmSample = {
  ts: number;
  runState: RunState;
  tripCode?: number | null;
  values: Partial<Record<AlarmSignal, number | null>>;
};

export type AlarmEvent = {
  kind: "raise" | "clear";
  key: string;
  priority: Priority;
  ts: number;
  /** The reading that made the change (null for a trip or when cleared by suppression). */
  value: number | null;
  limit: Limit | null;
  tripCode?: number | null;
  /** Raised for the chatterCount-th time inside chatterWindowS. */
  chattering?: boolean;
  /** Cleared because the unit stopped or is settling, not because the value returned. */
  suppressed?: boolean;
};

type LimitState = { active: boolean; since: number | null; raises: number[] };

export type EvaluatorState = {
  runningSince: number | null;
  lastRunState: RunState | null;
  limits: Record<string, LimitState>;
  trip: { active: boolean; code: number | null };
};

export const TRIP_KEY = "trip";

export function initialEvaluatorState(activeKeys: Iterable<string> = []): EvaluatorState {
  const limits: Record<string, LimitState> = {};
  for (const key of activeKeys) if (key !== TRIP_KEY) limits[key] = { active: true, since: null, raises: [] };
  const tripActive = [...activeKeys].includes(TRIP_KEY);
  return { runningSince: null, lastRunState: null, limits, trip: { active: tripActive, code: null } };
}

const keys = new WeakMap<Limit, string>();
// Limits are long-lived objects evaluated for every reading; their keys are built once.
function keyOf(limit: Limit): string {
  let key = keys.get(limit);
  if (key === undefined) keys.set(limit, (key = limitKey(limit)));
  return key;
}

function beyond(limit: Limit, v: number): boolean {
  return limit.direction === "high" ? v > limit.value : v < limit.value;
}

function returned(limit: Limit, v: number): boolean {
  return limit.direction === "high" ? v < limit.value - limit.deadband : v > limit.value + limit.deadband;
}

/**
 * Feeds one sample through every limit: deadband (hysteresis), on-delay and off-delay per limit, suppression by design
 * while stopped or settling after a start, the machine's own trip as a critical alarm, chattering marks.
 * Mutates and returns the state's events; the same function serves the live ingester and history backtests.
 */
export function evaluateSample(
  state: EvaluatorState,
  limits: readonly Limit[],
  sample: AlarmSample,
  settings: AlarmSettings = defaultAlarmSettings,
): AlarmEvent[] {
  const events: AlarmEvent[] = [];
  const { ts, runState } = sample;

  if (runState === "running" && state.lastRunState !== "running") state.runningSince = ts;
  if (runState !== "running") state.runningSince = null;
  state.lastRunState = runState;
  const settled = state.runningSince !== null && ts - state.runningSince >= settings.settlingS * 1000;

  const tripped = runState === "tripped";
  if (tripped && !state.trip.active) {
    state.trip = { active: true, code: sample.tripCode ?? null };
    events.push({ kind: "raise", key: TRIP_KEY, priority: "critical", ts, value: null, limit: null, tripCode: sample.tripCode ?? null });
  } else if (!tripped && state.trip.active) {
    events.push({ kind: "clear", key: TRIP_KEY, priority: "critical", ts, value: null, limit: null, tripCode: state.trip.code });
    state.trip = { active: false, code: null };
  }

  for (const limit of limits) {
    const key = keyOf(limit);
    const s = (state.limits[key] ??= { active: false, since: null, raises: [] });
    const suppressed = signalInfo[limit.signal].suppressWhenStopped && !settled;

    if (suppressed) {
      if (s.active) events.push({ kind: "clear", key, priority: limit.priority, ts, value: null, limit, suppressed: true });
      s.active = false;
      s.since = null;
      continue;
    }

    const v = sample.values[limit.signal];
    if (v == null || !Number.isFinite(v)) continue; // no reading: hold the state, decide on the next one

    if (!s.active) {
      if (!beyond(limit, v)) {
        s.since = null;
        continue;
      }
      s.since ??= ts;
      if (ts - s.since >= limit.onDelayS * 1000) {
        s.active = true;
        s.since = null;
        s.raises = s.raises.filter((t) => ts - t < settings.chatterWindowS * 1000);
        s.raises.push(ts);
        const chattering = s.raises.length >= settings.chatterCount;
        events.push({ kind: "raise", key, priority: limit.priority, ts, value: v, limit, ...(chattering ? { chattering } : {}) });
      }
    } else {
      if (!returned(limit, v)) {
        s.since = null;
        continue;
      }
      s.since ??= ts;
      if (ts - s.since >= limit.offDelayS * 1000) {
        s.active = false;
        s.since = null;
        events.push({ kind: "clear", key, priority: limit.priority, ts, value: v, limit });
      }
    }
  }
  return events;
}

/** The final-stage outlet temperature: the highest-numbered stage that reports one. */
export function finalStageTemperature(stageC: readonly (number | null | undefined)[]): number | null {
  for (let i = stageC.length - 1; i >= 0; i--) {
    const v = stageC[i];
    if (v != null) return v;
  }
  return null;
}
