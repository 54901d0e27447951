import net from "node:net";
import { Aedes } from "aedes";
import mqtt, { type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { deviceEventSchema, INGEST_SUBSCRIPTION, parseTopic, statusSchema, telemetrySchema, topicFor } from "@/shared/telemetry";
import type { DemoDevice } from "@/simulator/devices";
import { FleetPublisher } from "@/simulator/publisher";

const WATCHER = { username: "watcher", password: "watcher-secret" };
const base = { compressorId: 1, name: "Unit", timeZone: "Europe/London", profile: "fire" } as const;
const devices: DemoDevice[] = [
  { ...base, deviceId: "sim-a", secret: "secret-a-123456", siteCode: "north", stages: 4, ratedDeliveryLpm: 450, ratedPressureBar: 420, stopPressureBar: 414, restartPressureBar: 370, bankVolumeL: 200 },
  { ...base, deviceId: "sim-b", secret: "secret-b-123456", siteCode: "south", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330, stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200 },
];

type Received = { topic: string; payload: unknown; retain: boolean; qos: number; at: number };

let broker: Aedes;
let server: net.Server;
let url = "";
const denied: string[] = [];

beforeAll(async () => {
  broker = await Aedes.createBroker({
    authenticate(client, username, password, done) {
      const pw = password?.toString();
      const device = devices.find((d) => d.deviceId === username);
      const ok = (device && pw === device.secret && client.id === device.deviceId) || (username === WATCHER.username && pw === WATCHER.password);
      if (ok) return done(null, true);
      const err = Object.assign(new Error("bad credentials"), { returnCode: 4 as const });
      done(err, false);
    },
    authorizePublish(client, packet, done) {
      // a device may publish only under its own topics
      const t = parseTopic(packet.topic);
      if (!client || !t || t.deviceId !== client.id) {
        denied.push(packet.topic);
        return done(new Error("not your topic"));
      }
      done(null);
    },
  });
  server = net.createServer((socket) => {
    socket.setNoDelay(true);
    broker.handle(socket);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  url = `mqtt://127.0.0.1:${(server.address() as net.AddressInfo).port}`;
});

afterAll(async () => {
  await new Promise<void>((resolve) => broker.close(() => resolve()));
  await new Promise<void>((resolve) => server.close(() => resolve()));
});

async function watch(): Promise<{ client: MqttClient; got: Received[] }> {
  const got: Received[] = [];
  const client = await mqtt.connectAsync(url, { ...WATCHER, clientId: `watcher-${Math.random().toString(36).slice(2)}`, reconnectPeriod: 0 });
  client.on("message", (topic, payload, packet) => got.push({ topic, payload: JSON.parse(payload.toString()), retain: packet.retain, qos: packet.qos, at: Date.now() }));
  await client.subscribeAsync(INGEST_SUBSCRIPTION, { qos: 1 });
  return { client, got };
}

async function until(what: string, cond: () => boolean, ms = 8_000): Promise<void> {
  const end = Date.now() + ms;
  while (!cond()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

const statusOf = (got: Received[], deviceId: string, siteCode: string) =>
  got.filter((m) => m.topic === topicFor(siteCode, deviceId, "status")).map((m) => ({ ...(m.payload as { status: string }), retain: m.retain }));

describe("simulator over MQTT", () => {
  it("publishes telemetry, events, retained status and a last will on each device's own topics", async () => {
    const live = await watch();
    const started = Date.now();
    const publisher = new FleetPublisher({
      url,
      devices,
      seed: "mqtt-test",
      intervalS: 0.1,
      speed: 60,
      telemetryQos: 0,
      // sim-a starts filling at once (state events); sim-b loses its link 2 model minutes in, for 2 model minutes
      init: new Map([["sim-a", { bankBar: 360 }]]),
      faults: [{ deviceId: "sim-b", kind: "comms-drop", atMs: started + 2 * 60_000, durationMs: 2 * 60_000 }],
      incidentsPerDay: 0,
    });
    publisher.start(started);
    try {
      await publisher.ready();
      await until("telemetry from both devices", () =>
        devices.every((d) => live.got.filter((m) => m.topic === topicFor(d.siteCode, d.deviceId, "telemetry")).length >= 5),
      );

      // telemetry on the right topics, valid, in sequence, stamped in real time
      for (const d of devices) {
        const msgs = live.got.filter((m) => m.topic === topicFor(d.siteCode, d.deviceId, "telemetry"));
        let last = -1;
        for (const m of msgs) {
          const t = telemetrySchema.parse(m.payload);
          expect(t.seq).toBeGreaterThan(last);
          last = t.seq;
          expect(Math.abs(t.ts - m.at)).toBeLessThan(1_000);
          expect(t.stageC).toHaveLength(d.stages);
          expect(m.qos).toBe(0);
        }
      }

      // state changes arrive on the event topic
      await until("starting and running events", () => {
        const evs = live.got.filter((m) => m.topic === topicFor("north", "sim-a", "event")).map((m) => deviceEventSchema.parse(m.payload));
        return evs.some((e) => e.runState === "starting") && evs.some((e) => e.runState === "running");
      });
      expect(live.got.filter((m) => m.topic.endsWith("/event")).every((m) => m.qos === 1)).toBe(true);

      // a late subscriber is told by the retained status that both are online
      const late = await watch();
      await until("retained online status", () => devices.every((d) => statusOf(late.got, d.deviceId, d.siteCode).some((s) => s.status === "online")));
      for (const d of devices) expect(statusOf(late.got, d.deviceId, d.siteCode)[0]).toMatchObject({ status: "online", retain: true });
      await late.client.endAsync();

      // the dropped link: the broker sends the last will, which is retained; then the device comes back online
      await until("last will", () => statusOf(live.got, "sim-b", "south").some((s) => s.status === "offline"), 10_000);
      const will = live.got.find((m) => m.topic === topicFor("south", "sim-b", "status") && (m.payload as { status: string }).status === "offline")!;
      expect(will.payload).toEqual({ v: 1, status: "offline" });
      expect(statusSchema.safeParse(will.payload).success).toBe(true);
      const during = await watch();
      await until("retained offline", () => statusOf(during.got, "sim-b", "south").length > 0);
      expect(statusOf(during.got, "sim-b", "south")[0]).toMatchObject({ status: "offline", retain: true });
      await during.client.endAsync();
      const silentFrom = will.at;
      await until("link restored", () => live.got.some((m) => m.topic === topicFor("south", "sim-b", "status") && m.at > silentFrom && (m.payload as { status: string }).status === "online"), 10_000);
      const gap = live.got.filter((m) => m.topic === topicFor("south", "sim-b", "telemetry") && m.at > silentFrom + 200 && m.at < silentFrom + 1_500);
      expect(gap).toHaveLength(0);
    } finally {
      await publisher.stop();
    }

    // a clean stop leaves a retained offline status with a time
    const after = await watch();
    await until("retained offline after stop", () => devices.every((d) => statusOf(after.got, d.deviceId, d.siteCode).length > 0));
    for (const d of devices) {
      const s = after.got.find((m) => m.topic === topicFor(d.siteCode, d.deviceId, "status"))!;
      expect(statusSchema.parse(s.payload)).toMatchObject({ status: "offline" });
      expect((s.payload as { ts?: number }).ts).toBeGreaterThan(started);
    }
    await after.client.endAsync();
    await live.client.endAsync();
    expect(denied).toEqual([]);
  });

  it("publishes telemetry at QoS 1 when asked; a device with a wrong secret gets nothing through", async () => {
    const live = await watch();
    const wrong: DemoDevice = { ...devices[0]!, secret: "wrong-secret-000" };
    const publisher = new FleetPublisher({ url, devices: [wrong, devices[1]!], seed: "qos", intervalS: 0.1, speed: 1, telemetryQos: 1, incidentsPerDay: 0 });
    publisher.start();
    try {
      await until("telemetry from the good device", () => live.got.filter((m) => m.topic === topicFor("south", "sim-b", "telemetry")).length >= 3);
      expect(live.got.filter((m) => m.topic.endsWith("/sim-b/telemetry")).every((m) => m.qos === 1)).toBe(true);
      // only the retained status left by the previous test, nothing new
      expect(live.got.filter((m) => m.topic.includes("/sim-a/") && !m.retain).length).toBe(0);
    } finally {
      await publisher.stop();
      await live.client.endAsync();
    }
  });
});
