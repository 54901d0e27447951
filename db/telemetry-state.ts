import type { Statement } from "better-sqlite3";
import type { RunState } from "@/shared/telemetry";
import type { Db } from "./client";
import type { CompressorStateRow } from "./schema";

export type CompressorStateInput = Omit<CompressorStateRow, "online"> & { online: boolean };

const STATE_COLUMNS = [
  ["compressorId", "compressor_id"],
  ["online", "online"],
  ["lastSeenAt", "last_seen_at"],
  ["receivedAt", "received_at"],
  ["ts", "ts"],
  ["seq", "seq"],
  ["runState", "run_state"],
  ["motorOn", "motor_on"],
  ["deliveryBar", "delivery_bar"],
  ["stage1Bar", "stage1_bar"],
  ["stage2Bar", "stage2_bar"],
  ["stage3Bar", "stage3_bar"],
  ["stage4Bar", "stage4_bar"],
  ["stage1C", "stage1_c"],
  ["stage2C", "stage2_c"],
  ["stage3C", "stage3_c"],
  ["stage4C", "stage4_c"],
  ["oilBar", "oil_bar"],
  ["purifierC", "purifier_c"],
  ["intakeC", "intake_c"],
  ["hourMeterH", "hour_meter_h"],
  ["starts", "starts"],
  ["tripCode", "trip_code"],
  ["fillRateBarPerMin", "fill_rate_bar_per_min"],
  ["updatedAt", "updated_at"],
] as const satisfies readonly (readonly [keyof CompressorStateInput, string])[];

const selectStateSql = `SELECT ${STATE_COLUMNS.map(([k, c]) => `${c} AS ${k}`).join(", ")} FROM compressor_state`;

function fromRow(r: Record<string, unknown>): CompressorStateRow {
  return { ...(r as CompressorStateRow), online: r.online === 1 || r.online === true };
}

/** Last known state of every compressor that has reported (or been marked offline). */
export function listCompressorStates(db: Db): CompressorStateRow[] {
  return (db.$client.prepare(selectStateSql).all() as Record<string, unknown>[]).map(fromRow);
}

export function getCompressorState(db: Db, compressorId: number): CompressorStateRow | null {
  const r = db.$client.prepare(`${selectStateSql} WHERE compressor_id = ?`).get(compressorId) as
    | Record<string, unknown>
    | undefined;
  return r ? fromRow(r) : null;
}

export type DeviceEventInput = {
  ts: number;
  compressorId: number;
  kind: "comms_lost" | "comms_restored" | "state" | "trip";
  runState: RunState | null;
  tripCode: number | null;
  text: string;
  receivedAt: number;
};

export type TelemetryStateWriter = {
  upsertStates(states: readonly CompressorStateInput[]): void;
  /** Returns how many were new (a redelivered event with the same compressor, time and kind is ignored). */
  insertEvents(events: readonly DeviceEventInput[]): number;
};

export function createTelemetryStateWriter(db: Db): TelemetryStateWriter {
  const sqlite = db.$client;
  const cols = STATE_COLUMNS.map(([, c]) => c);
  const upsert = sqlite.prepare(
    `INSERT INTO compressor_state (${cols.join(", ")}) VALUES (${cols.map(() => "?").join(", ")})
     ON CONFLICT (compressor_id) DO UPDATE SET ${cols
       .filter((c) => c !== "compressor_id")
       .map((c) => `${c} = excluded.${c}`)
       .join(", ")}`,
  );
  const insertEvent = sqlite.prepare(
    `INSERT OR IGNORE INTO device_events (ts, compressor_id, kind, run_state, trip_code, text, received_at)
     VALUES (?, ?, ?, ?, ?, ?, ?)`,
  );
  return {
    upsertStates(states) {
      for (const s of states) {
        upsert.run(STATE_COLUMNS.map(([k]) => (k === "online" ? (s.online ? 1 : 0) : s[k])));
      }
    },
    insertEvents(events) {
      let n = 0;
      for (const e of events) {
        n += insertEvent.run(e.ts, e.compressorId, e.kind, e.runState, e.tripCode, e.text, e.receivedAt).changes;
      }
      return n;
    },
  };
}

export type ServiceStatusInput = {
  component: "ingester" | "broker";
  pid: number;
  startedAt: number;
  updatedAt: number;
  connected: boolean;
  messagesPerS: number;
  wsClients: number;
  lastFlushAt: number | null;
  counters: Record<string, number>;
};

export type ServiceStatus = ServiceStatusInput & {
  /** True when the service has not written its row for a while (stopped or hung). */
  stale: boolean;
};

/** A status row older than this means the service is not running. */
export const STATUS_STALE_MS = 20_000;

export function writeServiceStatus(db: Db, s: ServiceStatusInput): void {
  db.$client
    .prepare(
      `INSERT INTO ingester_status (component, pid, started_at, updated_at, connected, messages_per_s, ws_clients, last_flush_at, counters)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)
       ON CONFLICT (component) DO UPDATE SET pid = excluded.pid, started_at = excluded.started_at,
         updated_at = excluded.updated_at, connected = excluded.connected, messages_per_s = excluded.messages_per_s,
         ws_clients = excluded.ws_clients, last_flush_at = excluded.last_flush_at, counters = excluded.counters`,
    )
    .run(
      s.component,
      s.pid,
      s.startedAt,
      s.updatedAt,
      s.connected ? 1 : 0,
      s.messagesPerS,
      s.wsClients,
      s.lastFlushAt,
      JSON.stringify(s.counters),
    );
}

type StatusRow = {
  component: "ingester" | "broker";
  pid: number;
  startedAt: number;
  updatedAt: number;
  connected: number;
  messagesPerS: number;
  wsClients: number;
  lastFlushAt: number | null;
  counters: string;
};

const selectStatus = `SELECT component, pid, started_at AS startedAt, updated_at AS updatedAt, connected,
  messages_per_s AS messagesPerS, ws_clients AS wsClients, last_flush_at AS lastFlushAt, counters
  FROM ingester_status WHERE component = ?`;

function readStatus(db: Db, component: "ingester" | "broker", now: number): ServiceStatus | null {
  const r = (db.$client.prepare(selectStatus) as Statement<[string], StatusRow>).get(component);
  if (!r) return null;
  let counters: Record<string, number> = {};
  try {
    counters = JSON.parse(r.counters) as Record<string, number>;
  } catch {
    // a torn or hand-edited row reads as no counters
  }
  return { ...r, connected: r.connected === 1, counters, stale: now - r.updatedAt > STATUS_STALE_MS };
}

/** The ingester's last reported counters (for GET /api/health); null when it has never run. */
export function getIngesterStatus(db: Db, now = Date.now()): ServiceStatus | null {
  return readStatus(db, "ingester", now);
}

/** The embedded broker's last reported counters; null when it has never run (or an external broker is used). */
export function getBrokerStatus(db: Db, now = Date.now()): ServiceStatus | null {
  return readStatus(db, "broker", now);
}
