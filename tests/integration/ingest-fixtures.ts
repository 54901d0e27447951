import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import mqtt, { type MqttClient } from "mqtt";
import { type Db, openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { type Telemetry, topicFor } from "@/shared/telemetry";

export type TempDb = { db: Db; dir: string; file: string; cleanup(): void };

export function makeTempDb(prefix = "airkeep-ingest-"): TempDb {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  const file = path.join(dir, "airkeep.db");
  const db = openDatabase(file);
  runMigrations(db);
  return {
    db,
    dir,
    file,
    cleanup() {
      try {
        db.$client.close();
      } catch {
        // already closed
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

export type FleetDevice = { deviceId: string; siteCode: string; secret: string | null; compressorId: number; siteId: number };

/** Sites and compressors with device credentials (bcrypt at a low cost: the secrets are random, and tests are quick). */
export function seedFleet(
  db: Db,
  spec: { sites: string[]; devices: { deviceId: string; siteCode: string; secret?: string | null }[] },
): { devices: Map<string, FleetDevice>; siteIds: Map<string, number> } {
  const sqlite = db.$client;
  const now = Date.now();
  const siteIds = new Map<string, number>();
  for (const code of spec.sites) {
    const r = sqlite
      .prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, 'UTC', ?)")
      .run(`Site ${code}`, code, now);
    siteIds.set(code, Number(r.lastInsertRowid));
  }
  const model = sqlite
    .prepare(
      "INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Test 4-stage', 4, 300, 420, ?)",
    )
    .run(now);
  const insert = sqlite.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, device_secret_hash, stop_pressure_bar,
       restart_pressure_bar, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, 300, 270, ?, ?)`,
  );
  const devices = new Map<string, FleetDevice>();
  for (const d of spec.devices) {
    const siteId = siteIds.get(d.siteCode);
    if (siteId === undefined) throw new Error(`unknown site ${d.siteCode}`);
    const secret = d.secret === undefined ? `secret-${d.deviceId}` : d.secret;
    const hash = secret === null ? null : bcrypt.hashSync(secret, 4);
    const r = insert.run(siteId, model.lastInsertRowid, `Compressor ${d.deviceId}`, `SN-${d.deviceId}`, d.deviceId, hash, now, now);
    devices.set(d.deviceId, { deviceId: d.deviceId, siteCode: d.siteCode, secret, compressorId: Number(r.lastInsertRowid), siteId });
  }
  return { devices, siteIds };
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

export async function waitFor<T>(fn: () => T | undefined | null | false, timeoutMs = 10_000, what = "condition"): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

export function connectDevice(
  url: string,
  d: { deviceId: string; secret: string | null },
  extra: mqtt.IClientOptions = {},
): Promise<MqttClient> {
  return mqtt.connectAsync(url, {
    clientId: d.deviceId,
    username: d.deviceId,
    password: d.secret ?? "",
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 5_000,
    ...extra,
  });
}

/** Connects and reports the CONNACK refusal (or null when accepted). */
export function tryConnect(url: string, opts: mqtt.IClientOptions): Promise<{ code: number | null; client: MqttClient }> {
  return new Promise((resolve) => {
    const client = mqtt.connect(url, { protocolVersion: 4, reconnectPeriod: 0, connectTimeout: 5_000, ...opts });
    client.once("connect", () => resolve({ code: null, client }));
    client.once("error", (err) => {
      const code = (err as Error & { code?: number }).code;
      client.end(true);
      resolve({ code: typeof code === "number" ? code : -1, client });
    });
  });
}

export function telemetry(overrides: Partial<Telemetry> = {}): Telemetry {
  return {
    v: 1,
    seq: 1,
    ts: Date.now(),
    runState: "running",
    motorOn: true,
    deliveryBar: 250,
    stageBar: [6, 40, 150],
    stageC: [120, 130, 140],
    oilBar: 4.5,
    purifierC: 30,
    intakeC: 20,
    hourMeterH: 1234.5,
    starts: 456,
    tripCode: null,
    ...overrides,
  };
}

export function topicOf(d: { siteCode: string; deviceId: string }, channel: "telemetry" | "status" | "event" = "telemetry") {
  return topicFor(d.siteCode, d.deviceId, channel);
}

/** Publishes readings in order at QoS 1, waits until the ingester has handled each, and commits what it kept. */
export async function sendReadings(
  ingester: { stats(): { telemetry: number }; flush(): void },
  client: MqttClient,
  d: { siteCode: string; deviceId: string },
  readings: Partial<Telemetry>[],
): Promise<void> {
  const target = ingester.stats().telemetry + readings.length;
  for (const r of readings) await client.publishAsync(topicOf(d), JSON.stringify(telemetry(r)), { qos: 1 });
  await waitFor(() => ingester.stats().telemetry >= target, 3_000, "readings handled");
  ingester.flush();
}

export function count(db: Db, sql: string, ...params: unknown[]): number {
  return (db.$client.prepare(sql).get(...params) as { n: number }).n;
}
