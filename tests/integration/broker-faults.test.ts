import { type ChildProcess, spawn } from "node:child_process";
import net from "node:net";
import mqttPacket from "mqtt-packet";
import type { MqttClient } from "mqtt";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { getBrokerStatus, getIngesterStatus } from "@/db/telemetry-state";
import { type BrokerHandle, type BrokerOptions, startBroker } from "@/lib/broker/broker";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import { fixedHeader, flood } from "@/lib/bench/mqtt-flood";
import { refusalsFrom } from "@/lib/health";
import {
  connectDevice,
  count,
  type FleetDevice,
  freePort,
  makeTempDb,
  seedFleet,
  type TempDb,
  telemetry,
  topicOf,
  tryConnect,
  waitFor,
} from "./ingest-fixtures";

const credentialsOf = (d: FleetDevice) => ({ clientId: d.deviceId, username: d.deviceId, password: d.secret ?? "" });

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";

let t: TempDb;
let fleet: FleetDevice[];
let port: number;
const cleanups: (() => Promise<void> | void)[] = [];

beforeEach(async () => {
  t = makeTempDb("airkeep-broker-faults-");
  const devices = ["hp-1", "hp-2", "hp-3"].map((deviceId) => ({ deviceId, siteCode: "north" }));
  fleet = [...seedFleet(t.db, { sites: ["north"], devices }).devices.values()];
  port = await freePort();
});
afterEach(async () => {
  for (const c of cleanups.splice(0).reverse()) await c();
  t.cleanup();
});

async function broker(extra: Partial<BrokerOptions> = {}): Promise<BrokerHandle> {
  const b = await startBroker({ db: t.db, port, ingestPassword: INGEST_PASSWORD, log: () => {}, ...extra });
  cleanups.push(() => b.close());
  return b;
}

async function ingester(): Promise<Ingester> {
  const i = await startIngester({ db: t.db, mqttUrl: `mqtt://127.0.0.1:${port}`, password: INGEST_PASSWORD, flushMs: 30, live: null, log: () => {} });
  cleanups.push(() => i.close());
  return i;
}

async function device(d: FleetDevice): Promise<MqttClient> {
  const c = await connectDevice(`mqtt://127.0.0.1:${port}`, d, { clean: false, reconnectPeriod: 100 });
  cleanups.push(() => void c.end(true));
  return c;
}

const stored = () => count(t.db, "SELECT count(*) AS n FROM readings");
const base = Date.now() - 3_600_000;
const reading = (i: number) => JSON.stringify(telemetry({ ts: base + i * 1_000, seq: i }));

async function publishRange(c: MqttClient, d: FleetDevice, from: number, to: number) {
  for (let i = from; i < to; i += 50) {
    const batch = [];
    for (let j = i; j < Math.min(to, i + 50); j++) batch.push(c.publishAsync(topicOf(d), reading(j), { qos: 1 }));
    await Promise.all(batch);
  }
}

describe("queued readings survive a broker restart while the ingester is away", () => {
  it("after a planned restart of the embedded broker", async () => {
    let b = await broker();
    const ing = await ingester();
    await waitFor(() => b.stats().ingesterConnected, 5_000, "ingester");
    await ing.close();
    await waitFor(() => !b.stats().ingesterConnected, 5_000, "ingester away");

    const devs = await Promise.all(fleet.map(device));
    await Promise.all(devs.map((c, k) => publishRange(c, fleet[k]!, 0, 1_500)));
    expect(b.stats().ingestQueue).toBe(4_500);
    await b.close();
    b = await broker();
    expect(b.stats().ingestQueue).toBe(4_500);
    // Devices reconnect on their own and go on publishing into the new instance.
    await waitFor(() => devs.every((c) => c.connected), 5_000, "devices back");
    await Promise.all(devs.map((c, k) => publishRange(c, fleet[k]!, 1_500, 2_000)));

    await ingester();
    await waitFor(() => stored() === 6_000, 20_000, `6000 rows (have ${stored()})`);
    for (const d of fleet) {
      const seqs = t.db.$client.prepare("SELECT seq FROM readings WHERE compressor_id = ? ORDER BY seq").pluck().all(d.compressorId);
      expect(seqs).toEqual(Array.from({ length: 2_000 }, (_, i) => i));
    }
    await waitFor(() => b.stats().ingestQueue === 0, 5_000, "queue drained");
  }, 60_000);

  it("after the broker process is killed outright", async () => {
    const start = (): ChildProcess => {
      const child = spawn(process.execPath, ["--import", "tsx", "lib/broker/main.ts"], {
        cwd: process.cwd(),
        env: { ...process.env, DATABASE_URL: t.file, MQTT_PORT: String(port), MQTT_INGEST_PASSWORD: INGEST_PASSWORD },
        stdio: "ignore",
      });
      cleanups.push(() => void (child.exitCode === null && child.kill("SIGKILL")));
      return child;
    };
    const kill = async (child: ChildProcess) => {
      const exited = new Promise((r) => child.once("exit", r));
      process.kill(child.pid!, "SIGKILL");
      await exited;
    };
    const first = start();
    await waitForPort();
    const d = fleet[0]!;
    const c = await device(d);
    await publishRange(c, d, 0, 1_000);
    // The acknowledgement goes out as aedes routes the message; the queue file commits on the next turn.
    await new Promise((r) => setTimeout(r, 50));
    await kill(first);
    start();
    await waitForPort();
    await ingester();
    await waitFor(() => stored() === 1_000, 20_000, `1000 rows (have ${stored()})`);
  }, 90_000);
});

const portOpen = () =>
  new Promise<boolean>((resolve) => {
    const s = net.connect(port, "127.0.0.1");
    s.once("connect", () => {
      s.destroy();
      resolve(true);
    });
    s.once("error", () => resolve(false));
  });

async function waitForPort(timeoutMs = 40_000) {
  const deadline = Date.now() + timeoutMs;
  while (!(await portOpen())) {
    if (Date.now() > deadline) throw new Error("timed out waiting for the broker process");
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe("a refused publish is acknowledged and dropped; the device stays connected", () => {
  it.each([
    ["an oversized payload", (d: FleetDevice) => topicOf(d), Buffer.alloc(100_000, 0x7b), "payload_too_large"],
    ["a topic the device may not use", () => "airkeep/v1/north/hp-9/telemetry", Buffer.from(reading(0)), "foreign_topic"],
  ])("after %s, every later valid reading is stored", async (_l, topicFn, payload, reason) => {
    const b = await broker();
    await ingester();
    const d = fleet[0]!;
    const c = await device(d);
    let closes = 0;
    c.on("close", () => closes++);
    const poison = c.publishAsync(topicFn(d), payload, { qos: 1 });
    await publishRange(c, d, 1, 200);
    await poison;
    await waitFor(() => stored() === 199, 10_000, `199 rows (have ${stored()})`);
    expect(closes).toBe(0);
    expect(b.stats().refused[reason]).toBe(1);
  });

  it("closes the connection of a device that keeps sending refused publishes", async () => {
    const b = await broker();
    const c = await connectDevice(`mqtt://127.0.0.1:${port}`, fleet[0]!);
    cleanups.push(() => void c.end(true));
    const closed = new Promise<void>((r) => c.once("close", () => r()));
    for (let i = 0; i < 40; i++) c.publish("airkeep/v1/north/hp-9/telemetry", "{}", { qos: 1 });
    await closed;
    expect(b.stats().refused.foreign_topic).toBe(31);
    expect(b.stats().refused.repeated_refusals).toBe(1);
  });
});

describe("socket limits before parsing", () => {
  const flooded = (head: Buffer, bytes = 20_000_000) => {
    const f = flood(port, head, bytes);
    cleanups.push(() => void f.socket.destroy());
    return f.done;
  };

  it.each([
    ["a packet before CONNECT", fixedHeader(3, 100_000_000), "not_connect_first"],
    ["a 100 MB CONNECT", fixedHeader(1, 100_000_000), "connect_too_large"],
  ])("drops a client that sends %s at once, unbuffered", async (_l, head, reason) => {
    const b = await broker();
    const sent = await flooded(head);
    // Closed long before the 20 MB were through, and well inside the 10 s CONNECT timeout.
    expect(sent).toBeLessThan(20_000_000);
    expect(b.stats().refused[reason]).toBe(1);
    await waitFor(() => count(t.db, "SELECT count(*) AS n FROM audit_log WHERE action = 'mqtt.connection_refused' AND details LIKE ?", `%${reason}%`) === 1, 2_000, "audit row");
  });

  it("drops a signed-in client sending a packet over the limit", async () => {
    const b = await broker({ limits: { maxPacketBytes: 200_000 } });
    const c = await connectDevice(`mqtt://127.0.0.1:${port}`, fleet[0]!);
    cleanups.push(() => void c.end(true));
    const closed = new Promise<void>((r) => c.once("close", () => r()));
    c.publish(topicOf(fleet[0]!), Buffer.alloc(300_000, 0x20), { qos: 1 });
    await closed;
    expect(b.stats().refused.packet_too_large).toBe(1);
  });

  it("counts an MQTT 5 client (refused: the embedded broker speaks 3.1.1) and a malformed CONNECT", async () => {
    const b = await broker();
    const r = await tryConnect(`mqtt://127.0.0.1:${port}`, { ...credentialsOf(fleet[0]!), protocolVersion: 5 });
    expect(r.code).not.toBeNull();
    await waitFor(() => b.stats().refused.protocol_version === 1, 2_000, "protocol refusal");
    // A CONNECT whose protocol name is not MQTT (mqtt-packet refuses it while parsing).
    await flooded(Buffer.from([0x10, 0x06, 0x00, 0x04, 0x58, 0x58, 0x58, 0x58]), 0);
    await waitFor(() => b.stats().refused.malformed_packet === 1, 2_000, "malformed refusal");
  });

  it("drops a client that sends nothing within the CONNECT timeout", async () => {
    const b = await broker({ connectTimeoutMs: 300 });
    const s = net.connect(port, "127.0.0.1");
    cleanups.push(() => void s.destroy());
    const t0 = Date.now();
    await new Promise((r) => s.once("close", r));
    expect(Date.now() - t0).toBeLessThan(2_000);
    expect(b.stats().refused.connect_timeout).toBe(1);
  });

  it("reports broker refusals and ingester rejections by reason side by side, each since its process started", async () => {
    const b = await broker({ statusIntervalMs: 50 });
    const t0 = Date.now();
    const ing = await startIngester({ db: t.db, mqttUrl: `mqtt://127.0.0.1:${port}`, password: INGEST_PASSWORD, flushMs: 30, live: null, statusIntervalMs: 50, log: () => {} });
    cleanups.push(() => ing.close());
    const wrong = mqttPacket.generate({ cmd: "connect", protocolId: "MQTT", protocolVersion: 4, clientId: "hp-1", username: "hp-1", password: Buffer.from("nope"), clean: true, keepalive: 30 });
    const s = net.connect(port, "127.0.0.1", () => s.write(wrong));
    cleanups.push(() => void s.destroy());
    await waitFor(() => b.stats().refused.auth_failed === 1, 5_000, "auth refusal");
    await flooded(fixedHeader(3, 1_000_000));
    const c = await device(fleet[0]!);
    await c.publishAsync(topicOf(fleet[0]!), "not json", { qos: 1 });
    await waitFor(() => getBrokerStatus(t.db)?.counters["refused.not_connect_first"] === 1, 5_000, "broker status row");
    await waitFor(() => (getIngesterStatus(t.db)?.counters["reject.badJson"] ?? 0) >= 1, 5_000, "ingester status row");
    const r = refusalsFrom(getBrokerStatus(t.db), getIngesterStatus(t.db));
    expect(r.broker.byReason).toMatchObject({ auth_failed: 1, not_connect_first: 1 });
    expect(r.broker.since).toBe(b.stats().startedAt);
    expect(r.ingester.byReason.badJson).toBe(1);
    expect(r.ingester.since).toBeGreaterThanOrEqual(t0);
    expect(r.ingester.since).toBeLessThanOrEqual(Date.now());
  });
});
