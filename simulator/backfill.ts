import cliProgress from "cli-progress";
import type { Db } from "../db/client";
import { createReadingStore } from "../db/readings";
import { acknowledgeAlarms } from "../db/alarms";
import { createAlarmEngine } from "../db/alarm-engine";
import { createDeliveryRecorder } from "../db/delivery-recorder";
import { createTelemetryStateWriter, type DeviceEventInput } from "../db/telemetry-state";
import type { ReadingInput } from "../shared/telemetry";
import { DeviceSim } from "./device-sim";
import { type DemoDevice, specFor } from "./devices";
import { readingRow, SequenceCounter } from "./messages";
import type { ModelCounters } from "./model/compressor";
import { demoIncidents, type FaultSpec } from "./model/faults";
import { DAY_MS } from "./model/local-time";
import type { SavedCounters } from "./state-file";

export type BackfillOptions = {
  db: Db;
  devices: readonly DemoDevice[];
  seed: string;
  /** How far back to start, ms. */
  spanMs: number;
  /** Seconds between readings (the publishing interval). */
  intervalS: number;
  /** Raw readings are kept only this far back; older ones go into the rollups alone. */
  retentionDays: number;
  incidentsPerDay: number;
  faults?: readonly FaultSpec[];
  now?: number;
  progress?: boolean;
  /** Called after each stored batch with readings written so far and in all. */
  onProgress?: (done: number, total: number) => void;
  log?: (line: string) => void;
  /** Rows per store transaction. */
  batchRows?: number;
  /** Evaluate alarms over the history (default true). */
  alarms?: boolean;
  /** The ingester notices silence after this long (its COMMS_TIMEOUT_S). */
  commsTimeoutMs?: number;
};

export type DeviceBackfill = {
  deviceId: string;
  compressorId: number;
  segments: { fromMs: number; toMs: number }[];
  rows: number;
  rawRows: number;
  inserted: number;
  duplicates: number;
  events: number;
  skipped?: string;
};

export type BackfillResult = {
  devices: DeviceBackfill[];
  elapsedMs: number;
  /** Every device's counters at the end of the history written, for the live simulator to continue from. */
  counters: Map<string, SavedCounters>;
};

type Stored = { ts: number; hourMeterH: number | null; starts: number | null; deliveryBar: number | null };
type Segment = { fromMs: number; toMs: number; init: Partial<ModelCounters>; align?: Stored };

/**
 * Writes history for every device straight into the database through the reading store, as if the ingester had
 * received it. Re-running adds only what is missing: before the earliest stored reading and after the latest.
 */
export function backfill(opts: BackfillOptions): BackfillResult {
  const t0 = performance.now();
  const now = opts.now ?? Date.now();
  const intervalMs = Math.round(opts.intervalS * 1000);
  const from = Math.floor((now - opts.spanMs) / intervalMs) * intervalMs;
  const retentionCutoff = now - opts.retentionDays * DAY_MS;
  const batchRows = opts.batchRows ?? 20_000;
  const commsTimeoutMs = opts.commsTimeoutMs ?? 60_000;
  const log = opts.log ?? (() => {});
  const sqlite = opts.db.$client;
  const store = createReadingStore(opts.db);
  const events = createTelemetryStateWriter(opts.db);
  // History goes through the same alarm engine as live readings, so the demo has alarms and an event log.
  const alarmEngine = opts.alarms === false ? null : createAlarmEngine(opts.db);
  // ... and the same delivery-health measurement of each fill.
  const delivery = createDeliveryRecorder(opts.db, { alarms: alarmEngine !== null, now: () => 0 });

  const compressorIdOf = sqlite.prepare("SELECT id FROM compressors WHERE device_id = ?");
  const bounds = sqlite.prepare(
    `SELECT
       (SELECT MIN(ts) FROM readings WHERE compressor_id = @id) AS rawMin,
       (SELECT MAX(ts) FROM readings WHERE compressor_id = @id) AS rawMax,
       (SELECT MIN(bucket_ts) FROM readings_1m WHERE compressor_id = @id) AS rollMin,
       (SELECT MAX(last_ts) FROM readings_1m WHERE compressor_id = @id) AS rollMax`,
  );
  const rawAt = sqlite.prepare(
    "SELECT ts, hour_meter_h AS hourMeterH, starts, delivery_bar AS deliveryBar FROM readings WHERE compressor_id = ? AND ts = ?",
  );
  const rollAt = sqlite.prepare(
    `SELECT last_ts AS ts, hour_meter_h AS hourMeterH, starts, delivery_bar_sum / NULLIF(delivery_bar_n, 0) AS deliveryBar
     FROM readings_1m WHERE compressor_id = ? AND last_ts = ?`,
  );
  const rollFirst = sqlite.prepare(
    `SELECT last_ts AS ts, hour_meter_h AS hourMeterH, starts, delivery_bar_sum / NULLIF(delivery_bar_n, 0) AS deliveryBar
     FROM readings_1m WHERE compressor_id = ? AND bucket_ts = ?`,
  );
  const storedAt = (id: number, ts: number): Stored | null =>
    ((rawAt.get(id, ts) ?? rollAt.get(id, ts)) as Stored | undefined) ?? null;

  const incidents = demoIncidents(
    opts.seed,
    opts.devices.map((d) => ({ deviceId: d.deviceId, oilPump: specFor(d).oilPump })),
    from,
    now,
    opts.incidentsPerDay,
  );
  const faults = [...incidents, ...(opts.faults ?? [])];

  // plan every device first so the progress bar knows the total
  const plans: { device: DemoDevice; result: DeviceBackfill; segments: Segment[] }[] = [];
  for (const device of opts.devices) {
    const row = compressorIdOf.get(device.deviceId) as { id: number } | undefined;
    const result: DeviceBackfill = {
      deviceId: device.deviceId,
      compressorId: row?.id ?? device.compressorId,
      segments: [],
      rows: 0,
      rawRows: 0,
      inserted: 0,
      duplicates: 0,
      events: 0,
    };
    plans.push({ device, result, segments: [] });
    if (!row) {
      result.skipped = "no compressor with this device id in the database";
      continue;
    }
    const id = row.id;
    const b = bounds.get({ id }) as { rawMin: number | null; rawMax: number | null; rollMin: number | null; rollMax: number | null };
    const mins = [b.rawMin, b.rollMin].filter((x): x is number => x !== null);
    const maxs = [b.rawMax, b.rollMax].filter((x): x is number => x !== null);
    const plan = plans[plans.length - 1]!;
    if (mins.length === 0) {
      plan.segments.push({ fromMs: from, toMs: now, init: {} });
    } else {
      // the earliest reading lies at or after the start of the earliest minute bucket
      const earliest = Math.min(...mins);
      const latest = Math.max(...maxs);
      if (earliest - from > 60_000 + intervalMs) {
        // history missing before the first stored reading: end the model's counters just short of it
        const first =
          b.rawMin !== null && b.rawMin === earliest
            ? storedAt(id, b.rawMin)
            : ((rollFirst.get(id, earliest) as Stored | undefined) ?? null);
        const toMs = Math.floor((earliest - 1) / intervalMs) * intervalMs;
        plan.segments.push({ fromMs: from, toMs, init: {}, ...(first ? { align: first } : {}) });
      }
      if (now - latest > 2 * intervalMs) {
        const last = storedAt(id, latest);
        plan.segments.push({
          // the model starts at the last stored reading; its first new reading is one interval later
          fromMs: Math.floor(latest / intervalMs) * intervalMs,
          toMs: now,
          init: {
            ...(last?.hourMeterH != null ? { hourMeterH: last.hourMeterH } : {}),
            ...(last?.starts != null ? { starts: last.starts } : {}),
            ...(last?.deliveryBar != null ? { bankBar: last.deliveryBar } : {}),
          },
        });
      }
    }
  }

  const totalSteps = plans.reduce((s, p) => s + p.segments.reduce((a, g) => a + Math.max(0, (g.toMs - g.fromMs) / intervalMs), 0), 0);
  const bar =
    opts.progress && totalSteps > 0
      ? new cliProgress.SingleBar(
          { format: "backfill [{bar}] {percentage}% | {device} | {value}/{total} readings | eta {eta_formatted}", hideCursor: true },
          cliProgress.Presets.shades_classic,
        )
      : null;
  bar?.start(Math.round(totalSteps), 0, { device: "" });
  let done = 0;

  const counters = new Map<string, SavedCounters>();
  for (const { device, result, segments } of plans) {
    if (result.skipped) {
      log(`${device.deviceId}: skipped, ${result.skipped}`);
      continue;
    }
    for (const seg of segments) {
      if (seg.toMs - seg.fromMs < intervalMs) continue;
      let init = seg.init;
      if (seg.align) init = alignedInit(device, opts.seed, seg, faults, intervalMs, seg.align);
      const sim = new DeviceSim(device, { seed: opts.seed, startMs: seg.fromMs, init, faults, maxStepS: opts.intervalS });
      const seq = new SequenceCounter();
      let raw: ReadingInput[] = [];
      let old: ReadingInput[] = [];
      let evs: DeviceEventInput[] = [];
      let commsWas = "ok";
      const flush = () => {
        // older rows first: the store attributes time between consecutive readings only in order
        if (old.length > 0) {
          const r = store.insert(old, { keepRaw: false });
          result.inserted += r.inserted;
          result.duplicates += r.duplicates;
        }
        if (raw.length > 0) {
          const r = store.insert(raw, { keepRaw: true });
          result.inserted += r.inserted;
          result.duplicates += r.duplicates;
        }
        const batch = old.length ? old.concat(raw) : raw;
        if (alarmEngine) {
          if (batch.length) opts.db.$client.transaction(() => alarmEngine.onReadings(batch, batch[batch.length - 1]!.ts)).immediate();
          for (const e of evs) {
            if (e.kind === "comms_lost") alarmEngine.onCommsLost(e.compressorId, e.ts, e.ts);
            else if (e.kind === "comms_restored") alarmEngine.onCommsRestored(e.compressorId, e.ts, e.ts);
          }
        }
        if (batch.length) opts.db.$client.transaction(() => delivery.onReadings(batch)).immediate();
        if (evs.length > 0) result.events += events.insertEvents(evs);
        raw = [];
        old = [];
        evs = [];
      };
      bar?.update(done, { device: device.deviceId });
      for (let t = seg.fromMs + intervalMs; t <= seg.toMs; t += intervalMs) {
        for (const e of sim.advance(opts.intervalS)) {
          evs.push({ ts: e.ts, compressorId: result.compressorId, kind: e.kind, runState: e.runState, tripCode: e.tripCode, text: e.text, receivedAt: e.ts });
        }
        const comms = sim.commsAt(t);
        if (comms.state !== commsWas) {
          const f = comms.fault;
          if (comms.state === "dropped" && f) {
            evs.push(commsEvent(result.compressorId, f.atMs, "comms_lost", "Device went offline (last will or disconnect)"));
          } else if (comms.state === "silent" && f) {
            const at = f.atMs + commsTimeoutMs;
            if (f.durationMs === null || f.durationMs > commsTimeoutMs) {
              evs.push(commsEvent(result.compressorId, at, "comms_lost", `No message for ${Math.round(commsTimeoutMs / 1000)} s`));
            }
          } else if (comms.state === "ok") {
            evs.push(commsEvent(result.compressorId, t, "comms_restored", commsWas === "dropped" ? "Device connected" : "Telemetry resumed"));
          }
          commsWas = comms.state;
        }
        const reading = sim.model.reading();
        if (comms.state === "ok") {
          const row = readingRow(result.compressorId, reading, seq.next(t), t);
          (t >= retentionCutoff ? raw : old).push(row);
          result.rows++;
          if (t >= retentionCutoff) result.rawRows++;
        }
        if (raw.length + old.length >= batchRows) {
          flush();
          bar?.update(done + (t - seg.fromMs) / intervalMs, { device: device.deviceId });
          opts.onProgress?.(done + (t - seg.fromMs) / intervalMs, totalSteps);
        }
      }
      flush();
      done += (seg.toMs - seg.fromMs) / intervalMs;
      result.segments.push({ fromMs: seg.fromMs, toMs: seg.toMs });
      if (seg.toMs >= now - 2 * intervalMs) counters.set(device.deviceId, { ...sim.model.counters, atMs: seg.toMs });
    }
  }
  bar?.update(Math.round(totalSteps));
  bar?.stop();
  opts.onProgress?.(totalSteps, totalSteps);
  if (alarmEngine) acknowledgeHistory(opts.db, now - DAY_MS);
  return { devices: plans.map((p) => p.result), elapsedMs: performance.now() - t0, counters };
}

const historyComments = [
  "Checked on site; unit restarted after cooling down.",
  "Seen on the board, technician informed.",
  "Acknowledged from the on-call phone; follow-up booked.",
];

/** Alarms older than a day were dealt with in the invented history: a supervisor acknowledged each some minutes later. */
function acknowledgeHistory(db: Db, before: number): void {
  const supervisor = db.$client.prepare("SELECT id, email FROM users WHERE role = 'supervisor' AND disabled = 0 ORDER BY id LIMIT 1").get() as
    | { id: number; email: string }
    | undefined;
  if (!supervisor) return;
  const open = db.$client
    .prepare("SELECT id, raised_at AS raisedAt FROM alarms WHERE state IN ('active-unacknowledged', 'cleared-unacknowledged') AND raised_at < ?")
    .all(before) as { id: number; raisedAt: number }[];
  for (const [i, a] of open.entries()) {
    acknowledgeAlarms(db, {
      ids: [a.id],
      comment: historyComments[i % historyComments.length]!,
      userId: supervisor.id,
      actor: supervisor.email,
      siteIds: null,
      now: a.raisedAt + (4 + (i % 7) * 3) * 60_000,
    });
  }
}

function commsEvent(compressorId: number, ts: number, kind: "comms_lost" | "comms_restored", text: string): DeviceEventInput {
  return { ts: Math.round(ts), compressorId, kind, runState: null, tripCode: null, text, receivedAt: Math.round(ts) };
}

/**
 * Counters for a segment that must end where stored history begins: a dry run measures the run hours and starts
 * the segment adds, and the real run starts that much lower.
 */
function alignedInit(
  device: DemoDevice,
  seed: string,
  seg: Segment,
  faults: readonly FaultSpec[],
  intervalMs: number,
  first: Stored,
): Partial<ModelCounters> {
  const dry = new DeviceSim(device, { seed, startMs: seg.fromMs, init: { hourMeterH: 0, starts: 0 }, faults, maxStepS: intervalMs / 1000 });
  for (let t = seg.fromMs + intervalMs; t <= seg.toMs; t += intervalMs) dry.advance(intervalMs / 1000);
  const c = dry.model.counters;
  return {
    hourMeterH: Math.max(0, (first.hourMeterH ?? c.hourMeterH) - c.hourMeterH),
    starts: Math.max(0, (first.starts ?? c.starts) - c.starts),
  };
}
