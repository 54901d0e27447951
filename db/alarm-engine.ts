/**
 * The live alarm engine: feeds each reading through the pure evaluator (shared/alarm-eval.ts) with the compressor's
 * effective limits, and applies what it reports to the alarms table along the ISA-18.2 lifecycle
 * (shared/alarm-lifecycle.ts), writing every transition to the event log.
 *
 * Cost per reading: a map lookup and one evaluator pass over the cached limits; SQLite is touched only when something
 * changes (a transition, or an evaluator timer to persist), once per batch, in one transaction.
 *
 * Restart safety: open alarms are the truth for what is active; the evaluator's timers are persisted beside them in the
 * same transaction (db/alarm-snapshot.ts). A new engine on the same database neither loses, repeats nor invents an
 * alarm, provided each reading is evaluated in the transaction that stores it (see onReadings).
 */
import { and, eq, inArray, lte } from "drizzle-orm";
import type { Db } from "@/db/client";
import { alarms, compressorModels, compressors, type AlarmRow } from "@/db/schema";
import { allEffectiveLimits, effectiveLimits, thresholdsVersion } from "@/db/thresholds";
import {
  evaluateSample,
  finalStageTemperature,
  initialEvaluatorState,
  TRIP_KEY,
  type AlarmEvent,
  type AlarmSample,
  type EvaluatorState,
} from "@/shared/alarm-eval";
import { alarmStates, dueForReAlarm } from "@/shared/alarm-lifecycle";
import { defaultAlarmSettings, limitKey, type AlarmSettings, type AlarmSignal, type Limit } from "@/shared/alarm-rules";
import { isConditionKey } from "@/shared/alarm-conditions";
import { COMMS_ALARM_KEY } from "@/shared/alarm-text";
import { runStateCode, runStates, type ReadingInput, type RunState } from "@/shared/telemetry";
import { createSnapshotStore, parseSnapshot, type EngineSnapshot } from "./alarm-snapshot";
import {
  applyClear,
  applyRaise,
  applyReAlarm,
  applySuppress,
  applyUnshelve,
  applyUnsuppressAll,
  type AlarmTransition,
  type UnitRef,
} from "./alarm-transitions";

export type { AlarmTransition } from "./alarm-transitions";

export type AlarmEngineOptions = {
  settings?: AlarmSettings;
  /** Server clock (ms); tests pass their own. */
  now?: () => number;
  /** How often tick() re-reads compressor names and sites even when thresholds did not change. Default 60 s. */
  metaRefreshMs?: number;
  log?: (msg: string) => void;
};

export type AlarmEngineStats = {
  compressors: number;
  limits: number;
  readings: number;
  /** Readings not evaluated: older than one already seen for the compressor, or for an unknown compressor. */
  skipped: number;
  transitions: number;
  snapshotsWritten: number;
  reloads: number;
  resyncs: number;
  thresholdsVersion: string;
};

export type AlarmEngine = {
  /** One reading; same as onReadings([reading]). */
  onReading(compressorId: number, reading: ReadingInput, receivedAt?: number): AlarmTransition[];
  /**
   * A batch of readings, in arrival order, evaluated and applied in one transaction (a savepoint when the caller is
   * already inside one). Call it inside the transaction that stores the readings, so both commit or neither does;
   * if that outer transaction fails afterwards, call resync().
   */
  onReadings(batch: readonly ReadingInput[], receivedAt?: number): AlarmTransition[];
  /** No message from the device for the comms timeout, or its last will: raises the "comms" alarm (warning). */
  onCommsLost(compressorId: number, ts: number, receivedAt?: number): AlarmTransition[];
  /** Messages again: clears the "comms" alarm. */
  onCommsRestored(compressorId: number, ts: number, receivedAt?: number): AlarmTransition[];
  /** Call about once a second: shelving expiry, re-alarm, and a reload when thresholds or compressors changed. */
  tick(now?: number): AlarmTransition[];
  /** Rebuilds every compressor's state from SQLite (after a failed outer transaction). */
  resync(): void;
  /** The limits in use for a compressor (tests, diagnostics). */
  limitsOf(compressorId: number): readonly Limit[];
  stats(): AlarmEngineStats;
};

type Unit = UnitRef & {
  limits: Limit[];
  state: EvaluatorState;
  /** Device time of the last evaluated reading. */
  lastTs: number;
  lastStarts: number | null;
  /** Settled (running past the settling time) at the last reading. */
  settled: boolean;
  /** Some alarm of this unit may be in the suppressed state. */
  maySuppressed: boolean;
  commsActive: boolean;
  /** The persisted timers differ from these (write them with the next transaction). */
  dirty: boolean;
  sample: AlarmSample & { values: Partial<Record<AlarmSignal, number | null>> };
  stageScratch: (number | null)[];
};

type Meta = UnitRef & { stages: number };

type LimitState = EvaluatorState["limits"][string];

const OPEN_STATES = alarmStates.filter((x) => x !== "normal");

/** What a batch may need to undo: the unit as it was before the batch touched it. */
type Backup = {
  u: Unit;
  state: EvaluatorState;
  lastTs: number;
  lastStarts: number | null;
  settled: boolean;
  maySuppressed: boolean;
  dirty: boolean;
};

function cloneState(s: EvaluatorState): EvaluatorState {
  const limits: Record<string, LimitState> = {};
  for (const key in s.limits) {
    const l = s.limits[key]!;
    limits[key] = { active: l.active, since: l.since, raises: l.raises.slice() };
  }
  return { runningSince: s.runningSince, lastRunState: s.lastRunState, limits, trip: { active: s.trip.active, code: s.trip.code } };
}

/** Whether two states differ in anything a restart would need (timers, run start, active flags, recent raises). */
function sameState(a: EvaluatorState, b: EvaluatorState): boolean {
  if (a.runningSince !== b.runningSince || a.lastRunState !== b.lastRunState) return false;
  if (a.trip.active !== b.trip.active || a.trip.code !== b.trip.code) return false;
  let n = 0;
  for (const key in b.limits) {
    const x = a.limits[key];
    const y = b.limits[key]!;
    if (!x || x.active !== y.active || x.since !== y.since || x.raises.length !== y.raises.length) return false;
    for (let i = 0; i < y.raises.length; i++) if (x.raises[i] !== y.raises[i]) return false;
    n++;
  }
  for (const _ in a.limits) n--;
  return n === 0;
}

type Pending =
  | { kind: "event"; u: Unit; e: AlarmEvent; runState: RunState }
  | { kind: "settled"; u: Unit; ts: number };

export function createAlarmEngine(db: Db, opts: AlarmEngineOptions = {}): AlarmEngine {
  const settings = opts.settings ?? defaultAlarmSettings;
  const settlingMs = settings.settlingS * 1000;
  const clock = opts.now ?? Date.now;
  const metaRefreshMs = opts.metaRefreshMs ?? 60_000;
  const log = opts.log ?? ((m: string) => console.log(`[alarms] ${m}`));
  const sqlite = db.$client;
  const snapshots = createSnapshotStore(db);
  const lastReadingStmt = sqlite.prepare(
    `SELECT ts, run_state AS runState, starts FROM readings WHERE compressor_id = ? ORDER BY ts DESC LIMIT 1`,
  );
  const lastStoppedStmt = sqlite.prepare(`SELECT max(ts) AS ts FROM readings WHERE compressor_id = ? AND run_state <> ?`);
  const runStartStmt = sqlite.prepare(
    `SELECT min(ts) AS ts FROM readings WHERE compressor_id = ? AND ts > ? AND run_state = ?`,
  );
  const stateTsStmt = sqlite.prepare(`SELECT compressor_id AS id, ts, starts FROM compressor_state`);
  const stateTsOneStmt = sqlite.prepare(`SELECT ts, starts FROM compressor_state WHERE compressor_id = ?`);

  const units = new Map<number, Unit>();
  /** Compressor ids looked up and not found (cleared on reload). */
  const unknown = new Set<number>();
  let version = "";
  let lastMetaAt = 0;
  /** A write failed inside the caller's transaction: rebuild from SQLite once outside it. */
  let needsResync = false;
  const st = { readings: 0, skipped: 0, transitions: 0, snapshotsWritten: 0, reloads: 0, resyncs: 0 };

  // ——— loading ———

  function loadMeta(id?: number): Meta[] {
    const q = db
      .select({ id: compressors.id, siteId: compressors.siteId, name: compressors.name, stages: compressorModels.stages })
      .from(compressors)
      .innerJoin(compressorModels, eq(compressorModels.id, compressors.modelId));
    return id === undefined ? q.all() : q.where(eq(compressors.id, id)).all();
  }

  function openRows(id?: number): AlarmRow[] {
    const open = inArray(alarms.state, OPEN_STATES);
    return db
      .select()
      .from(alarms)
      .where(id === undefined ? open : and(eq(alarms.compressorId, id), open))
      .all();
  }

  /** Run state and run start from stored readings, for a compressor with no persisted timers. */
  function runFromReadings(id: number): { lastRunState: RunState | null; runningSince: number | null; ts: number; starts: number | null } {
    const last = lastReadingStmt.get(id) as { ts: number; runState: number; starts: number | null } | undefined;
    if (!last) return { lastRunState: null, runningSince: null, ts: 0, starts: null };
    const lastRunState = runStates[last.runState] ?? "stopped";
    let runningSince: number | null = null;
    if (lastRunState === "running") {
      const stopped = (lastStoppedStmt.get(id, runStateCode.running) as { ts: number | null }).ts;
      runningSince = (runStartStmt.get(id, stopped ?? Number.MIN_SAFE_INTEGER, runStateCode.running) as { ts: number | null }).ts;
    }
    return { lastRunState, runningSince, ts: last.ts, starts: last.starts };
  }

  function buildUnit(
    meta: Meta,
    limits: Limit[],
    open: readonly AlarmRow[],
    snapshotText: string | undefined,
    stateTs: { ts: number | null; starts: number | null } | undefined,
  ): Unit {
    const snap = parseSnapshot(snapshotText);
    let state: EvaluatorState;
    let lastTs: number;
    let lastStarts: number | null;
    const fromReadings = runFromReadings(meta.id);
    const original = snap ? cloneState(snap.state) : null;
    if (snap) {
      state = snap.state;
      lastTs = snap.lastTs;
      lastStarts = snap.lastStarts;
    } else {
      state = initialEvaluatorState();
      state.lastRunState = fromReadings.lastRunState;
      state.runningSince = fromReadings.runningSince;
      lastTs = 0;
      lastStarts = fromReadings.starts;
    }
    // Readings up to the newest stored one were evaluated when they were stored (same transaction).
    lastTs = Math.max(lastTs, fromReadings.ts, stateTs?.ts ?? 0);
    if (lastStarts === null) lastStarts = fromReadings.starts ?? stateTs?.starts ?? null;

    // The open alarms decide what is active; the snapshot only supplies timers.
    const activeKeys = new Set(open.filter((r) => r.active).map((r) => r.key));
    for (const [key, s] of Object.entries(state.limits)) {
      const active = activeKeys.has(key);
      if (s.active !== active) {
        s.active = active;
        s.since = null;
      }
    }
    for (const key of activeKeys) {
      // Condition alarms (db/alarm-conditions.ts) are raised and cleared by their own callers, never by limits.
      if (key === TRIP_KEY || key === COMMS_ALARM_KEY || isConditionKey(key)) continue;
      state.limits[key] ??= { active: true, since: null, raises: [] };
    }
    const trip = open.find((r) => r.key === TRIP_KEY && r.active);
    state.trip = trip ? { active: true, code: trip.tripCode } : { active: false, code: null };

    const u: Unit = {
      id: meta.id,
      siteId: meta.siteId,
      name: meta.name,
      limits,
      state,
      lastTs,
      lastStarts,
      settled: state.runningSince !== null && lastTs - state.runningSince >= settlingMs,
      maySuppressed: open.some((r) => r.state === "suppressed"),
      commsActive: activeKeys.has(COMMS_ALARM_KEY),
      dirty: false,
      sample: { ts: 0, runState: "stopped", tripCode: null, values: {} },
      stageScratch: new Array<number | null>(Math.max(1, Math.min(4, meta.stages))).fill(null),
    };
    // Persist when reconciliation changed what the stored snapshot said.
    u.dirty = original === null || !sameState(original, state) || snap?.lastStarts !== lastStarts;
    return u;
  }

  function loadAll(): void {
    units.clear();
    unknown.clear();
    version = thresholdsVersion(db);
    const limits = allEffectiveLimits(db);
    const open = new Map<number, AlarmRow[]>();
    for (const r of openRows()) {
      let list = open.get(r.compressorId);
      if (!list) open.set(r.compressorId, (list = []));
      list.push(r);
    }
    const snaps = snapshots.all();
    const stateTs = new Map(
      (stateTsStmt.all() as { id: number; ts: number | null; starts: number | null }[]).map((r) => [r.id, r]),
    );
    for (const m of loadMeta()) {
      units.set(m.id, buildUnit(m, limits.get(m.id) ?? [], open.get(m.id) ?? [], snaps.get(m.id), stateTs.get(m.id)));
    }
    lastMetaAt = clock();
  }

  function unitFor(id: number): Unit | undefined {
    const u = units.get(id);
    if (u || unknown.has(id)) return u;
    // A compressor added since the engine started: one lookup, then cached.
    const meta = loadMeta(id)[0];
    if (!meta) {
      unknown.add(id);
      return undefined;
    }
    const stateTs = stateTsOneStmt.get(id) as { ts: number | null; starts: number | null } | undefined;
    const nu = buildUnit(meta, effectiveLimits(db, id), openRows(id), snapshots.one(id), stateTs);
    units.set(id, nu);
    return nu;
  }

  /**
   * Drops the timers of limits a unit no longer has; returns the keys among them that are still active, which the
   * caller clears ("the limit was removed") before dropping them.
   */
  function dropStaleLimitStates(u: Unit): string[] {
    const keep = new Set(u.limits.map(limitKey));
    const removedActive: string[] = [];
    for (const [key, s] of Object.entries(u.state.limits)) {
      if (keep.has(key)) continue;
      if (s.active) removedActive.push(key);
      else {
        delete u.state.limits[key];
        u.dirty = true;
      }
    }
    return removedActive;
  }

  /** After limits changed (or at start): clears alarms whose limit is gone and persists every changed timer set. */
  function reconcile(now: number): AlarmTransition[] {
    const removed: { u: Unit; key: string }[] = [];
    for (const u of units.values()) for (const key of dropStaleLimitStates(u)) removed.push({ u, key });
    const dirty = [...units.values()].filter((u) => u.dirty || removed.some((x) => x.u === u));
    if (dirty.length === 0) return [];
    return write(() => {
      const out: AlarmTransition[] = [];
      for (const { u, key } of removed) {
        const t = applyClear(db, u, { key, priority: priorityOfKey(key), ts: now, value: null, limit: null }, now, "limit-removed");
        if (t) out.push(t);
        delete u.state.limits[key];
      }
      for (const u of dirty) persist(u, now);
      return out;
    });
  }

  // ——— persistence of timers ———

  function snapshotJson(u: Unit): string {
    const snap: EngineSnapshot = { v: 1, lastTs: u.lastTs, lastStarts: u.lastStarts, state: u.state };
    return JSON.stringify(snap);
  }
  function persist(u: Unit, now: number): void {
    snapshots.write(u.id, snapshotJson(u), now);
    u.dirty = false;
    st.snapshotsWritten++;
  }

  // ——— evaluation ———

  function evaluate(u: Unit, r: ReadingInput, out: Pending[]): void {
    const runState = runStates[r.runState] ?? "stopped";
    const state = u.state;
    // A stop and start between two readings (a gap in the data) still restarts the settling time.
    if (r.starts != null && u.lastStarts != null && r.starts > u.lastStarts && state.lastRunState === "running" && runState === "running") {
      state.lastRunState = null;
    }
    u.lastTs = r.ts;
    if (r.starts != null) u.lastStarts = r.starts;

    const stages = u.stageScratch;
    const n = stages.length;
    stages[0] = r.stage1C;
    if (n > 1) stages[1] = r.stage2C;
    if (n > 2) stages[2] = r.stage3C;
    if (n > 3) stages[3] = r.stage4C;
    const s = u.sample;
    const v = s.values;
    s.ts = r.ts;
    s.runState = runState;
    s.tripCode = r.tripCode;
    v.deliveryBar = r.deliveryBar;
    v.finalStageC = finalStageTemperature(stages);
    v.stage1C = r.stage1C;
    v.stage2C = r.stage2C;
    v.stage3C = r.stage3C;
    v.stage4C = r.stage4C;
    v.oilBar = r.oilBar;
    v.purifierC = r.purifierC;
    v.intakeC = r.intakeC;

    const events = evaluateSample(state, u.limits, s, settings);
    for (const e of events) out.push({ kind: "event", u, e, runState });
    const settled = state.runningSince !== null && r.ts - state.runningSince >= settlingMs;
    if (settled && !u.settled && u.maySuppressed) out.push({ kind: "settled", u, ts: r.ts });
    u.settled = settled;
  }

  function applyPending(p: Pending, receivedAt: number, out: AlarmTransition[]): void {
    if (p.kind === "settled") {
      out.push(...applyUnsuppressAll(db, p.u, p.ts, receivedAt));
      p.u.maySuppressed = false;
      return;
    }
    const { u, e } = p;
    let t: AlarmTransition | null;
    if (e.kind === "raise") t = applyRaise(db, u, e, receivedAt);
    else if (e.suppressed) {
      t = applySuppress(db, u, e, p.runState, receivedAt);
      if (t?.to === "suppressed") u.maySuppressed = true;
    } else t = applyClear(db, u, e, receivedAt);
    if (t) out.push(t);
  }

  function onReadings(batch: readonly ReadingInput[], receivedAt = clock()): AlarmTransition[] {
    const pending: Pending[] = [];
    const backups: Backup[] = [];
    const touched = new Set<Unit>();
    for (const r of batch) {
      const u = unitFor(r.compressorId);
      if (!u || !(r.ts > u.lastTs)) {
        st.skipped++;
        continue;
      }
      if (!touched.has(u)) {
        touched.add(u);
        backups.push({
          u,
          state: cloneState(u.state),
          lastTs: u.lastTs,
          lastStarts: u.lastStarts,
          settled: u.settled,
          maySuppressed: u.maySuppressed,
          dirty: u.dirty,
        });
      }
      st.readings++;
      evaluate(u, r, pending);
    }
    const toPersist: Unit[] = [];
    for (const b of backups) {
      const u = b.u;
      if (u.dirty || u.lastStarts !== b.lastStarts || !sameState(b.state, u.state)) toPersist.push(u);
    }
    if (pending.length === 0 && toPersist.length === 0) return [];
    return write(
      () => {
        const out: AlarmTransition[] = [];
        for (const p of pending) applyPending(p, receivedAt, out);
        for (const u of toPersist) persist(u, receivedAt);
        return out;
      },
      () => {
        for (const b of backups) {
          Object.assign(b.u, { state: b.state, lastTs: b.lastTs, lastStarts: b.lastStarts, settled: b.settled, maySuppressed: b.maySuppressed, dirty: b.dirty });
        }
      },
    );
  }

  /**
   * Runs fn in one transaction (a savepoint inside the caller's). If it fails, SQLite rolled it back: undo() puts the
   * in-memory state back as it was, or without undo the state is rebuilt from the database.
   */
  function write(fn: () => AlarmTransition[], undo?: () => void): AlarmTransition[] {
    try {
      const out = sqlite.transaction(fn).immediate();
      st.transitions += out.length;
      return out;
    } catch (e) {
      log(`alarm write failed and was rolled back: ${(e as Error).message}`);
      if (undo) undo();
      else if (!sqlite.inTransaction) {
        st.resyncs++;
        loadAll();
      } else needsResync = true;
      throw e;
    }
  }

  // ——— comms ———

  function onCommsLost(compressorId: number, ts: number, receivedAt = clock()): AlarmTransition[] {
    const u = unitFor(compressorId);
    if (!u || u.commsActive) return [];
    const out = write(() => [
      applyRaise(db, u, { key: COMMS_ALARM_KEY, priority: "warning", ts, value: null, limit: null }, receivedAt),
    ]);
    u.commsActive = true;
    return out;
  }

  function onCommsRestored(compressorId: number, ts: number, receivedAt = clock()): AlarmTransition[] {
    const u = unitFor(compressorId);
    if (!u || !u.commsActive) return [];
    const out = write(() => {
      const t = applyClear(db, u, { key: COMMS_ALARM_KEY, priority: "warning", ts, value: null, limit: null }, receivedAt);
      return t ? [t] : [];
    });
    u.commsActive = false;
    return out;
  }

  // ——— time-driven work ———

  function refreshMeta(now: number): void {
    for (const m of loadMeta()) {
      const u = units.get(m.id);
      if (u) {
        u.name = m.name;
        u.siteId = m.siteId;
      }
    }
    lastMetaAt = now;
  }

  /** New limits for every unit; an active alarm whose limit is gone is cleared ("the limit was removed"). */
  function reload(now: number): AlarmTransition[] {
    version = thresholdsVersion(db);
    const limits = allEffectiveLimits(db);
    refreshMeta(now);
    unknown.clear();
    for (const u of units.values()) u.limits = limits.get(u.id) ?? [];
    st.reloads++;
    log(`thresholds reloaded: ${[...limits.values()].reduce((n, l) => n + l.length, 0)} limits on ${limits.size} compressors`);
    return reconcile(now);
  }

  function tick(now = clock()): AlarmTransition[] {
    if (needsResync && !sqlite.inTransaction) resync();
    const out: AlarmTransition[] = [];
    if (thresholdsVersion(db) !== version) out.push(...reload(now));
    else if (now - lastMetaAt >= metaRefreshMs) refreshMeta(now);

    const shelved = db
      .select()
      .from(alarms)
      .where(and(eq(alarms.state, "shelved"), lte(alarms.shelvedUntil, now)))
      .all();
    const reAlarm =
      settings.reAlarmS > 0
        ? db
            .select()
            .from(alarms)
            .where(and(eq(alarms.state, "active-acknowledged"), lte(alarms.ackAt, now - settings.reAlarmS * 1000)))
            .all()
            .filter((r) => r.active && dueForReAlarm(r.state, r.ackAt, now, settings.reAlarmS))
        : [];
    if (shelved.length === 0 && reAlarm.length === 0) return out;
    out.push(
      ...write(() => {
        const done: AlarmTransition[] = [];
        for (const row of shelved) {
          const u = unitFor(row.compressorId) ?? { id: row.compressorId, siteId: row.siteId, name: `Compressor ${row.compressorId}` };
          const t = applyUnshelve(db, u, row, now);
          if (t) done.push(t);
        }
        for (const row of reAlarm) {
          const u = unitFor(row.compressorId) ?? { id: row.compressorId, siteId: row.siteId, name: `Compressor ${row.compressorId}` };
          done.push(applyReAlarm(db, u, row, now));
        }
        return done;
      }),
    );
    return out;
  }

  function resync(): void {
    needsResync = false;
    st.resyncs++;
    loadAll();
    if (!sqlite.inTransaction) reconcile(clock());
  }

  loadAll();
  // First start, or limits and alarms changed while no engine ran: settle the differences now.
  reconcile(clock());

  return {
    onReading: (compressorId, reading, receivedAt) => onReadings([{ ...reading, compressorId }], receivedAt),
    onReadings,
    onCommsLost,
    onCommsRestored,
    tick,
    resync,
    limitsOf: (id) => unitFor(id)?.limits ?? [],
    stats: () => ({
      compressors: units.size,
      limits: [...units.values()].reduce((n, u) => n + u.limits.length, 0),
      ...st,
      thresholdsVersion: version,
    }),
  };
}

function priorityOfKey(key: string): "critical" | "warning" | "advisory" {
  const p = key.split(".")[2];
  return p === "critical" || p === "advisory" ? p : "warning";
}
