import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import WebSocket from "ws";
import { listFillDeliveries } from "@/db/delivery";
import { getCompressorState, getIngesterStatus } from "@/db/telemetry-state";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import { createLiveToken } from "@/lib/live-token";
import { type LiveMessage, liveMessageSchema } from "@/shared/live";
import { freeAirLitres } from "@/shared/air";
import { MAX_PAYLOAD_BYTES } from "@/shared/telemetry";
import {
  connectDevice,
  count,
  type FleetDevice,
  makeTempDb,
  seedFleet,
  type TempDb,
  telemetry,
  topicOf,
  waitFor,
} from "./ingest-fixtures";

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";
const SECRET = "live-secret-for-tests-0123456789abcdef";
const ORIGIN = "http://board.test";

let t: TempDb;
let broker: BrokerHandle;
let ingester: Ingester;
let url: string;
let dev: Map<string, FleetDevice>;
let sites: Map<string, number>;
const clients: MqttClient[] = [];
const sockets: WebSocket[] = [];

beforeAll(async () => {
  t = makeTempDb("airkeep-pipeline-");
  const fleet = seedFleet(t.db, {
    sites: ["north", "south"],
    devices: ["hp-1", "hp-2", "hp-5", "hp-6", "hp-7", "hp-8", "hp-9"]
      .map((deviceId) => ({ deviceId, siteCode: "north" }))
      .concat([{ deviceId: "hp-3", siteCode: "south" }]),
  });
  dev = fleet.devices;
  sites = fleet.siteIds;
  // The hub opens a socket only for a live account and sign-in session, or an unrevoked display link.
  const now = Date.now();
  t.db.$client
    .prepare("INSERT INTO users (id, email, name, password_hash, role, all_sites, created_at, updated_at) VALUES (1, 'ana@airkeep.demo', 'Ana', '-', 'viewer', 1, ?, ?)")
    .run(now, now);
  t.db.$client.prepare("INSERT INTO user_sessions (id, user_id, created_at, last_seen_at) VALUES ('s-ana', 1, ?, ?)").run(now, now);
  t.db.$client
    .prepare("INSERT INTO display_links (id, token_hash, label, site_ids, created_by, created_at) VALUES (3, 'h3', 'South bay', ?, 1, ?)")
    .run(JSON.stringify([sites.get("south")]), now);
  broker = await startBroker({ db: t.db, port: 0, ingestPassword: INGEST_PASSWORD, log: () => {} });
  url = `mqtt://127.0.0.1:${broker.port}`;
  ingester = await startIngester({
    db: t.db,
    mqttUrl: url,
    password: INGEST_PASSWORD,
    flushMs: 30,
    // As the demo runs it against the embedded broker: commits by size and age only.
    brokerInflightCap: null,
    commsTimeoutMs: 1_500,
    commsSweepMs: 100,
    statusIntervalMs: 200,
    live: { port: 0, allowedOrigins: [ORIGIN], secret: SECRET, pingMs: 60_000 },
    log: () => {},
  });
  await waitFor(() => broker.stats().ingesterConnected && ingester.stats().connected, 5_000, "ingester");
});

afterAll(async () => {
  for (const s of sockets) s.terminate();
  for (const c of clients) c.end(true);
  await ingester?.close();
  await broker?.close();
  t?.cleanup();
});

async function device(id: string, extra = {}): Promise<MqttClient> {
  const c = await connectDevice(url, dev.get(id)!, extra);
  clients.push(c);
  return c;
}

type Live = { ws: WebSocket; messages: LiveMessage[] };

function openLive(opts: { token?: string | null; origin?: string }): Promise<Live | { status: number }> {
  const token = opts.token === undefined ? createLiveToken({ userId: 1, sessionId: "s-ana", siteIds: null }, SECRET) : opts.token;
  const q = token === null ? "" : `?token=${encodeURIComponent(token)}`;
  return new Promise((resolve, reject) => {
    const ws = new WebSocket(`ws://127.0.0.1:${ingester.livePort}/live${q}`, { origin: opts.origin ?? ORIGIN });
    sockets.push(ws);
    const messages: LiveMessage[] = [];
    ws.on("message", (data) => messages.push(liveMessageSchema.parse(JSON.parse(String(data)))));
    ws.once("open", () => resolve({ ws, messages }));
    ws.once("unexpected-response", (_req, res) => resolve({ status: res.statusCode ?? 0 }));
    ws.once("error", reject);
  });
}

async function live(opts: { token?: string | null; origin?: string } = {}): Promise<Live> {
  const r = await openLive(opts);
  if (!("ws" in r)) throw new Error(`refused with ${r.status}`);
  await waitFor(() => r.messages.some((m) => m.type === "snapshot"), 3_000, "snapshot");
  return r;
}

const readingsOf = (id: string) =>
  count(t.db, "SELECT count(*) AS n FROM readings WHERE compressor_id = ?", dev.get(id)!.compressorId);

describe("delivery health", () => {
  it("measures a fill from restart to stop pressure in the commit that stores it", async () => {
    const d = dev.get("hp-9")!;
    const c = await device("hp-9");
    // 240 l/min of free air into the 200 l bank at 20 °C, 269 → 300 bar, read every 5 s; then 2 min of standby
    const lpm = 240;
    const barFor = (litres: number) => {
      let lo = 0;
      let hi = 400;
      for (let i = 0; i < 50; i++) {
        const mid = (lo + hi) / 2;
        if (freeAirLitres(200, mid, 20) < litres) lo = mid;
        else hi = mid;
      }
      return Math.round(lo * 100) / 100;
    };
    const l0 = freeAirLitres(200, 269, 20);
    const minutes = (freeAirLitres(200, 300, 20) - l0) / lpm;
    const steps = Math.ceil((minutes * 60) / 5);
    // runs first, and ends before the fill-rate test below sends newer readings from this unit
    const start = Date.now() - (steps + 50) * 5_000;
    let seq = 1000;
    for (let i = 0; i <= steps; i++) {
      const bar = Math.min(300, barFor(l0 + (lpm * i * 5) / 60));
      await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: start + i * 5_000, seq: seq++, deliveryBar: bar, intakeC: 20 })), { qos: 1 });
    }
    for (let i = steps + 1; i <= steps + 26; i++) {
      const r = telemetry({ ts: start + i * 5_000, seq: seq++, runState: "standby", motorOn: false, deliveryBar: 300, intakeC: 20 });
      await c.publishAsync(topicOf(d), JSON.stringify(r), { qos: 1 });
    }
    await waitFor(() => listFillDeliveries(t.db, d.compressorId, 0).length === 1, 5_000, "a measured fill");
    const f = listFillDeliveries(t.db, d.compressorId, 0)[0]!;
    expect(f.deliveryLpm).toBeCloseTo(lpm, 0);
    expect(f.share).toBeCloseTo(lpm / 300, 2);
    expect(f.toBar).toBe(300);
  });
});

describe("publish → SQLite → WebSocket", () => {
  it("stores a reading, updates state and rollups, and pushes it to a live client", async () => {
    const l = await live();
    const snap = l.messages[0]!;
    expect(snap.type).toBe("snapshot");
    if (snap.type === "snapshot") expect(snap.compressors).toHaveLength(8);

    const d = dev.get("hp-1")!;
    const c = await device("hp-1");
    const ts = Date.now() - 500;
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts, seq: 1, deliveryBar: 287.5 })), { qos: 1 });

    await waitFor(() => readingsOf("hp-1") === 1, 3_000, "row");
    const row = t.db.$client.prepare("SELECT * FROM readings WHERE compressor_id = ?").get(d.compressorId) as Record<string, number>;
    expect(row).toMatchObject({ ts, seq: 1, delivery_bar: 287.5, stage3_bar: 150, stage4_bar: null, run_state: 3, motor_on: 1 });
    const update = await waitFor(
      () => l.messages.find((m) => m.type === "update" && m.compressor.compressorId === d.compressorId),
      3_000,
      "update",
    );
    if (update.type !== "update") throw new Error("not an update");
    expect(update.compressor).toMatchObject({ online: true, ts, deliveryBar: 287.5, runState: "running", stageBar: [6, 40, 150] });
    expect(getCompressorState(t.db, d.compressorId)).toMatchObject({ online: true, ts, deliveryBar: 287.5 });
    expect(count(t.db, "SELECT n FROM readings_1m WHERE compressor_id = ?", d.compressorId)).toBe(1);
    expect(count(t.db, "SELECT n FROM readings_1h WHERE compressor_id = ?", d.compressorId)).toBe(1);
  });

  it("stores a duplicate (a QoS 1 redelivery or a replay) once and counts it", async () => {
    const d = dev.get("hp-2")!;
    const c = await device("hp-2");
    const payload = JSON.stringify(telemetry({ ts: Date.now() - 1_000, seq: 9 }));
    const before = ingester.stats().rejects.duplicate;
    await c.publishAsync(topicOf(d), payload, { qos: 1 });
    await waitFor(() => readingsOf("hp-2") === 1, 3_000, "first copy");
    await c.publishAsync(topicOf(d), payload, { qos: 1 });
    await c.publishAsync(topicOf(d), payload, { qos: 1 });
    await waitFor(() => ingester.stats().rejects.duplicate === before + 2, 3_000, "duplicates counted");
    expect(readingsOf("hp-2")).toBe(1);
  });
});

describe("rejections (counted per reason; the stream carries on)", () => {
  it("counts oversized, bad JSON, schema, future and too-old messages from a device", async () => {
    const d = dev.get("hp-8")!;
    const c = await device("hp-8");
    const before = ingester.stats().rejects;
    const now = Date.now();
    const send = (p: string) => c.publishAsync(topicOf(d), p, { qos: 1 });
    await send(JSON.stringify({ ...telemetry(), pad: "x".repeat(MAX_PAYLOAD_BYTES) }));
    await send("{ not json");
    await send(JSON.stringify(telemetry({ deliveryBar: "high" as unknown as number })));
    await send(`${JSON.stringify(telemetry({ ts: now - 10_000 })).slice(0, -1)},"oilBar":-1e999}`.replace(/"oilBar":4.5,/, ""));
    await send(JSON.stringify(telemetry({ deliveryBar: -9_999 })));
    await send(JSON.stringify(telemetry({ ts: now + 10 * 60_000 })));
    await send(JSON.stringify(telemetry({ ts: now - 8 * 86_400_000 })));
    await send(JSON.stringify(telemetry({ ts: now - 2_000, seq: 77 })));
    await waitFor(() => readingsOf("hp-8") === 1, 3_000, "the good reading after the bad ones");
    const after = ingester.stats().rejects;
    expect(after.oversized - before.oversized).toBe(1);
    expect(after.badJson - before.badJson).toBe(1);
    expect(after.schema - before.schema).toBe(3);
    expect(after.future - before.future).toBe(1);
    expect(after.tooOld - before.tooOld).toBe(1);
    expect(c.connected).toBe(true);
  });

  it("counts unknown topics and unknown devices that reach it through a permissive broker", async () => {
    const before = ingester.stats().rejects;
    const publish = (topic: string) =>
      new Promise<void>((resolve, reject) =>
        // Server-side publish bypasses the broker's ACL, as a misconfigured external broker would.
        broker.aedes.publish(
          { cmd: "publish", topic, payload: Buffer.from(JSON.stringify(telemetry())), qos: 1, retain: false, dup: false },
          (err) => (err ? reject(err) : resolve()),
        ),
      );
    await publish("airkeep/v1/north/hp-1/telemetry/extra");
    await publish("airkeep/v1/north/hp-1/diagnostics");
    await publish("airkeep/v1/north/hp-404/telemetry");
    await publish("airkeep/v1/south/hp-1/telemetry");
    await waitFor(() => ingester.stats().rejects.unknownDevice - before.unknownDevice === 2, 3_000, "unknown devices");
    expect(ingester.stats().rejects.unknownTopic - before.unknownTopic).toBe(2);
  });
});

describe("live WebSocket access", () => {
  it("refuses a missing, forged or expired token with 401, and a foreign origin with 403", async () => {
    const before = ingester.stats().live!;
    expect(await openLive({ token: null })).toEqual({ status: 401 });
    expect(await openLive({ token: "abc.def" })).toEqual({ status: 401 });
    expect(await openLive({ token: createLiveToken({ userId: 1, sessionId: "s-ana", siteIds: null }, "some-other-secret-0123456789") })).toEqual({
      status: 401,
    });
    const expired = createLiveToken({ userId: 1, sessionId: "s-ana", siteIds: null, ttlMs: 60_000 }, SECRET, Date.now() - 61_000);
    expect(await openLive({ token: expired })).toEqual({ status: 401 });
    expect(await openLive({ origin: "http://evil.test" })).toEqual({ status: 403 });
    const after = ingester.stats().live!;
    expect(after.refusedToken - before.refusedToken).toBe(4);
    expect(after.refusedOrigin - before.refusedOrigin).toBe(1);
  });

  it("limits the snapshot and the updates to the token's sites", async () => {
    const south = sites.get("south")!;
    const l = await live({ token: createLiveToken({ displayLinkId: 3, siteIds: [south] }, SECRET) });
    const snap = l.messages[0]!;
    if (snap.type !== "snapshot") throw new Error("no snapshot");
    expect(snap.compressors.map((x) => x.compressorId)).toEqual([dev.get("hp-3")!.compressorId]);

    const north = dev.get("hp-1")!;
    const southDev = dev.get("hp-3")!;
    const cn = await device("hp-1");
    const cs = await device("hp-3");
    await cn.publishAsync(topicOf(north), JSON.stringify(telemetry({ ts: Date.now() - 100, seq: 2 })), { qos: 1 });
    await cs.publishAsync(topicOf(southDev), JSON.stringify(telemetry({ ts: Date.now() - 100, seq: 2 })), { qos: 1 });
    await waitFor(
      () => l.messages.some((m) => m.type === "update" && m.compressor.compressorId === southDev.compressorId),
      3_000,
      "south update",
    );
    await waitFor(() => readingsOf("hp-1") >= 2, 3_000, "north row");
    await new Promise((r) => setTimeout(r, 300));
    expect(l.messages.some((m) => m.type === "update" && m.compressor.compressorId === north.compressorId)).toBe(false);
  });
});

describe("comms, events and fill rate", () => {
  it("records comms loss after silence and its restoration, and shows it live", async () => {
    const d = dev.get("hp-5")!;
    const l = await live();
    const c = await device("hp-5");
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: Date.now() - 100, seq: 1 })), { qos: 1 });
    await waitFor(() => getCompressorState(t.db, d.compressorId)?.online === true, 3_000, "online");
    const lost = await waitFor(
      () =>
        t.db.$client
          .prepare("SELECT * FROM device_events WHERE compressor_id = ? AND kind = 'comms_lost'")
          .get(d.compressorId) as { text: string } | undefined,
      5_000,
      "comms_lost event",
    );
    expect(lost.text).toMatch(/No message for \d+ s/);
    expect(getCompressorState(t.db, d.compressorId)?.online).toBe(false);
    await waitFor(
      () => l.messages.some((m) => m.type === "update" && m.compressor.compressorId === d.compressorId && !m.compressor.online),
      3_000,
      "offline update",
    );
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: Date.now() - 100, seq: 2 })), { qos: 1 });
    await waitFor(
      () => count(t.db, "SELECT count(*) AS n FROM device_events WHERE compressor_id = ? AND kind = 'comms_restored'", d.compressorId) === 1,
      3_000,
      "comms_restored event",
    );
    expect(getCompressorState(t.db, d.compressorId)?.online).toBe(true);
  });

  it("records comms loss at once when the device's last will arrives", async () => {
    const d = dev.get("hp-6")!;
    const will = { topic: topicOf(d, "status"), payload: Buffer.from(JSON.stringify({ v: 1, status: "offline" })), qos: 1 as const, retain: true };
    const c = await device("hp-6", { will });
    await c.publishAsync(topicOf(d, "status"), JSON.stringify({ v: 1, status: "online", ts: Date.now() }), { qos: 1, retain: true });
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: Date.now() - 100 })), { qos: 1 });
    await waitFor(() => getCompressorState(t.db, d.compressorId)?.online === true, 3_000, "online");
    (c as unknown as { stream: { destroy(): void } }).stream.destroy();
    const ev = await waitFor(
      () =>
        t.db.$client.prepare("SELECT * FROM device_events WHERE compressor_id = ? AND kind = 'comms_lost'").get(d.compressorId) as
          | { text: string }
          | undefined,
      1_000,
      "comms_lost from the last will (well before the 1.5 s timeout)",
    );
    expect(ev.text).toMatch(/last will/);
  });

  it("stores state and trip events from the event channel once, and shows the trip live", async () => {
    const d = dev.get("hp-7")!;
    const l = await live();
    const c = await device("hp-7");
    const ts = Date.now() - 50;
    const trip = { v: 1, seq: 5, ts, kind: "trip", runState: "tripped", tripCode: 31, text: "Final stage temperature high" };
    await c.publishAsync(topicOf(d, "event"), JSON.stringify(trip), { qos: 1 });
    await c.publishAsync(topicOf(d, "event"), JSON.stringify(trip), { qos: 1 });
    await c.publishAsync(topicOf(d, "event"), JSON.stringify({ ...trip, seq: 6, ts: ts + 1, kind: "state", runState: "stopped", tripCode: null, text: undefined }), {
      qos: 1,
    });
    await waitFor(() => count(t.db, "SELECT count(*) AS n FROM device_events WHERE compressor_id = ? AND kind IN ('trip','state')", d.compressorId) === 2, 3_000, "events");
    expect(
      t.db.$client.prepare("SELECT kind, run_state, trip_code, text FROM device_events WHERE compressor_id = ? AND kind = 'trip'").get(d.compressorId),
    ).toEqual({ kind: "trip", run_state: "tripped", trip_code: 31, text: "Final stage temperature high" });
    await waitFor(
      () => l.messages.some((m) => m.type === "update" && m.compressor.compressorId === d.compressorId && m.compressor.runState === "tripped"),
      3_000,
      "trip shown live",
    );
  });

  it("computes the fill rate once a minute of the run gives a steady slope, and drops it when the unit stops", async () => {
    const d = dev.get("hp-9")!;
    const c = await device("hp-9");
    const start = Date.now() - 70_000;
    // 0.25 bar/s = 15 bar/min; seq carries on above the delivery-health test's readings from this unit (the sequence rule)
    const send = async (i: number) =>
      c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: start + i * 1_000, seq: 10_000 + i, deliveryBar: 200 + i * 0.25 })), { qos: 1 });
    for (let i = 0; i <= 30; i++) await send(i);
    await waitFor(() => getCompressorState(t.db, d.compressorId)?.ts === start + 30_000, 3_000, "half a minute");
    expect(getCompressorState(t.db, d.compressorId)?.fillRateBarPerMin).toBeNull();
    for (let i = 31; i <= 60; i++) await send(i);
    await waitFor(() => getCompressorState(t.db, d.compressorId)?.ts === start + 60_000, 3_000, "a minute");
    expect(getCompressorState(t.db, d.compressorId)?.fillRateBarPerMin).toBeCloseTo(15, 6);
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: start + 61_000, seq: 10_061, runState: "standby", motorOn: false })), { qos: 1 });
    await waitFor(() => getCompressorState(t.db, d.compressorId)?.ts === start + 61_000, 3_000, "standby reading");
    expect(getCompressorState(t.db, d.compressorId)?.fillRateBarPerMin).toBeNull();
  });
});

describe("health row", () => {
  it("writes the ingester's counters for GET /api/health", async () => {
    await waitFor(() => (getIngesterStatus(t.db)?.counters.received ?? 0) > 5, 3_000, "status row");
    const s = getIngesterStatus(t.db)!;
    expect(s).toMatchObject({ component: "ingester", connected: true, stale: false, pid: process.pid });
    expect(s.counters["reject.badJson"]).toBeGreaterThanOrEqual(1);
    expect(s.lastFlushAt).toBeGreaterThan(Date.now() - 10_000);
    expect(getIngesterStatus(t.db, s.updatedAt + 60_000)?.stale).toBe(true);
  });
});
