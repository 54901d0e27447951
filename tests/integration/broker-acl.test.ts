import mqtt from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { INGEST_USERNAME } from "@/lib/broker/ingest-credential";
import {
  connectDevice,
  count,
  type FleetDevice,
  makeTempDb,
  type TempDb,
  telemetry,
  topicOf,
  tryConnect,
  waitFor,
} from "./ingest-fixtures";
import { seedFleet } from "./ingest-fixtures";

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";

let t: TempDb;
let broker: BrokerHandle;
let url: string;
let dev: Map<string, FleetDevice>;

beforeAll(async () => {
  t = makeTempDb("airkeep-broker-");
  dev = seedFleet(t.db, {
    sites: ["north", "south"],
    devices: [
      { deviceId: "hp-1", siteCode: "north" },
      { deviceId: "hp-2", siteCode: "north" },
      { deviceId: "hp-3", siteCode: "south" },
      { deviceId: "hp-4", siteCode: "south", secret: null },
    ],
  }).devices;
  broker = await startBroker({ db: t.db, port: 0, ingestPassword: INGEST_PASSWORD, log: () => {} });
  url = `mqtt://127.0.0.1:${broker.port}`;
});
afterAll(async () => {
  await broker?.close();
  t?.cleanup();
});

const auditCount = (action: string) => count(t.db, "SELECT count(*) AS n FROM audit_log WHERE action = ?", action);

/** Publishes at QoS 1 and reports whether it was acknowledged and the broker kept the connection. */
async function publishOutcome(client: mqtt.MqttClient, topic: string, payload: string, retain = false) {
  const closed = new Promise<"closed">((r) => client.once("close", () => r("closed")));
  const acked = client.publishAsync(topic, payload, { qos: 1, retain }).then(() => "acked" as const);
  const first = await Promise.race([closed, acked, new Promise<"timeout">((r) => setTimeout(() => r("timeout"), 2_000))]);
  if (first !== "acked") return first;
  // Still open a moment later.
  return Promise.race([closed, new Promise<"acked, open">((r) => setTimeout(() => r("acked, open"), 200))]);
}

describe("embedded broker: credentials", () => {
  it("accepts a device with its own id and secret", async () => {
    const c = await connectDevice(url, dev.get("hp-1")!);
    expect(c.connected).toBe(true);
    await c.endAsync();
  });

  it.each([
    ["a wrong password", { username: "hp-1", password: "nope", clientId: "hp-1" }],
    ["an unknown device", { username: "hp-99", password: "secret-hp-99", clientId: "hp-99" }],
    ["a device with no credential issued", { username: "hp-4", password: "", clientId: "hp-4" }],
    ["no credentials at all", { clientId: "hp-1" }],
    ["the ingester name with a wrong password", { username: INGEST_USERNAME, password: "x", clientId: "airkeep-x" }],
  ])("refuses %s and writes an audit row", async (_label, opts) => {
    const before = broker.stats().authFailed;
    const { code } = await tryConnect(url, opts);
    expect(code).toBe(4);
    expect(broker.stats().authFailed).toBe(before + 1);
  });

  it("refuses a client id that is not the device's own (no session takeover)", async () => {
    const d = dev.get("hp-1")!;
    const { code } = await tryConnect(url, { username: "hp-1", password: d.secret!, clientId: "hp-2" });
    expect(code).toBe(2);
    const ing = await tryConnect(url, { username: "hp-1", password: d.secret!, clientId: "airkeep-ingester" });
    expect(ing.code).toBe(2);
    const ok = await tryConnect(url, { username: "hp-1", password: d.secret!, clientId: "hp-1:gateway-a" });
    expect(ok.code).toBeNull();
    await ok.client.endAsync();
    expect(broker.stats().clientIdDenied).toBeGreaterThanOrEqual(2);
  });

  it("verifies a device's bcrypt hash once and answers reconnects from the cache", async () => {
    const d = dev.get("hp-3")!;
    const before = broker.stats().bcryptChecks;
    for (let i = 0; i < 5; i++) {
      const c = await connectDevice(url, d);
      await c.endAsync();
    }
    expect(broker.stats().bcryptChecks - before).toBe(1);
  });

  it("limits the audit rows of a flood of failed logins", async () => {
    const before = auditCount("mqtt.auth_failed");
    await Promise.all(
      Array.from({ length: 40 }, () => tryConnect(url, { username: "hp-2", password: "guess", clientId: "hp-2" })),
    );
    expect(broker.stats().authFailed).toBeGreaterThanOrEqual(40);
    // One row for this (action, user, address) per minute; the repeats are counted into the next one.
    expect(auditCount("mqtt.auth_failed") - before).toBe(1);
    const row = t.db.$client
      .prepare("SELECT actor, ip, details FROM audit_log WHERE action = 'mqtt.auth_failed' AND actor = 'mqtt:hp-2'")
      .get() as { actor: string; ip: string; details: string };
    expect(row.ip).toMatch(/127\.0\.0\.1/);
    expect(JSON.parse(row.details)).toMatchObject({ reason: "bad_password" });
  });
});

describe("embedded broker: topic rules", () => {
  it("lets a device publish only under its own site and id, on the three channels", async () => {
    const d = dev.get("hp-1")!;
    const c = await connectDevice(url, d);
    expect(await publishOutcome(c, topicOf(d), JSON.stringify(telemetry()))).toBe("acked, open");
    expect(await publishOutcome(c, topicOf(d, "event"), "{}")).toBe("acked, open");
    expect(await publishOutcome(c, topicOf(d, "status"), '{"v":1,"status":"online"}', true)).toBe("acked, open");
    await c.endAsync();
  });

  it.each([
    ["another device's topic", "airkeep/v1/north/hp-2/telemetry", false],
    ["its own id under another site", "airkeep/v1/south/hp-1/telemetry", false],
    ["an unknown channel", "airkeep/v1/north/hp-1/config", false],
    ["a topic outside the tree", "other/thing", false],
    ["a deeper topic", "airkeep/v1/north/hp-1/telemetry/x", false],
    ["retained telemetry", "airkeep/v1/north/hp-1/telemetry", true],
  ])("refuses a device publishing to %s (acknowledged and dropped, counted, connection kept)", async (_l, topic, retain) => {
    const c = await connectDevice(url, dev.get("hp-1")!);
    const before = broker.stats().publishDenied;
    expect(await publishOutcome(c, topic, "{}", retain)).toBe("acked, open");
    expect(broker.stats().publishDenied).toBe(before + 1);
    c.end(true);
  });

  it("refuses every subscription of a device", async () => {
    const c = await connectDevice(url, dev.get("hp-1")!);
    const before = broker.stats().subscribeDenied;
    // A SUBACK failure code (0x80): mqtt.js rejects the subscription.
    await expect(c.subscribeAsync("airkeep/v1/#", { qos: 1 })).rejects.toThrow(/Subscribe error/);
    await expect(c.subscribeAsync("airkeep/v1/north/hp-1/telemetry", { qos: 0 })).rejects.toThrow(/Subscribe error/);
    expect(c.connected).toBe(true);
    expect(broker.stats().subscribeDenied).toBe(before + 2);
    await waitFor(() => auditCount("mqtt.subscribe_denied") >= 1, 2_000, "audit row");
    await c.endAsync();
  });

  it("gives the ingester credential subscribe-only access", async () => {
    const ing = await mqtt.connectAsync(url, {
      username: INGEST_USERNAME,
      password: INGEST_PASSWORD,
      clientId: "airkeep-acl-test",
      protocolVersion: 4,
      reconnectPeriod: 0,
    });
    const got: string[] = [];
    ing.on("message", (topic) => got.push(topic));
    expect((await ing.subscribeAsync("airkeep/v1/#", { qos: 1 }))[0]?.qos).toBe(1);
    await expect(ing.subscribeAsync("$SYS/#", { qos: 0 })).rejects.toThrow(/Subscribe error/);

    const d = dev.get("hp-3")!;
    const c = await connectDevice(url, d);
    await c.publishAsync(topicOf(d), JSON.stringify(telemetry()), { qos: 1 });
    await waitFor(() => got.includes(topicOf(d)), 3_000, "delivery to the ingester");

    const before = broker.stats().publishDenied;
    const n = got.length;
    expect(await publishOutcome(ing, topicOf(d), JSON.stringify(telemetry()))).toBe("acked, open");
    expect(broker.stats().publishDenied).toBe(before + 1);
    expect(broker.stats().refused.ingester_is_subscribe_only).toBe(1);
    // Dropped: not delivered to the subscriber.
    await new Promise((r) => setTimeout(r, 100));
    expect(got.length).toBe(n);
    await waitFor(() => auditCount("mqtt.publish_denied") >= 1, 2_000, "audit row");
    ing.end(true);
    await c.endAsync();
  });

  it("disconnects a device whose credential is reissued", async () => {
    const t2 = makeTempDb("airkeep-broker-revoke-");
    const fleet = seedFleet(t2.db, { sites: ["east"], devices: [{ deviceId: "hp-7", siteCode: "east" }] }).devices;
    const b = await startBroker({ db: t2.db, port: 0, ingestPassword: INGEST_PASSWORD, revocationSweepMs: 100, log: () => {} });
    try {
      const c = await connectDevice(`mqtt://127.0.0.1:${b.port}`, fleet.get("hp-7")!);
      const closed = new Promise<void>((r) => c.once("close", () => r()));
      t2.db.$client.prepare("UPDATE compressors SET device_secret_hash = '$2b$04$abcdefghijklmnopqrstuu5zl3hXh4Cw5Y8Ek0l0zJ6mEN8e7yZ7K' WHERE device_id = 'hp-7'").run();
      await closed;
      expect(b.stats().credentialRevoked).toBe(1);
      expect(count(t2.db, "SELECT count(*) AS n FROM audit_log WHERE action = 'mqtt.credential_revoked'")).toBe(1);
      c.end(true);
    } finally {
      await b.close();
      t2.cleanup();
    }
  });
});

describe("embedded broker: teardown under load", () => {
  it("closes cleanly with tens of thousands of messages in flight", async () => {
    const t3 = makeTempDb("airkeep-broker-flood-");
    const fleet = seedFleet(t3.db, { sites: ["west"], devices: [{ deviceId: "hp-8", siteCode: "west" }] }).devices;
    const b = await startBroker({ db: t3.db, port: 0, ingestPassword: INGEST_PASSWORD, log: () => {} });
    const u = `mqtt://127.0.0.1:${b.port}`;
    const errors: unknown[] = [];
    const onErr = (e: unknown) => errors.push(e);
    process.on("uncaughtException", onErr);
    try {
      // A subscriber that never reads, so the broker buffers.
      const slow = await mqtt.connectAsync(u, {
        username: INGEST_USERNAME,
        password: INGEST_PASSWORD,
        clientId: "airkeep-slow",
        protocolVersion: 4,
        reconnectPeriod: 0,
      });
      await slow.subscribeAsync("airkeep/v1/#", { qos: 1 });
      (slow as unknown as { stream: { pause(): void } }).stream.pause();
      const d = fleet.get("hp-8")!;
      const pubs = await Promise.all([0, 1].map(() => connectDevice(u, { ...d }, { clientId: `hp-8:${Math.random()}` })));
      const payload = JSON.stringify(telemetry());
      for (let i = 0; i < 15_000; i++) for (const p of pubs) p.publish(topicOf(d), payload, { qos: i % 2 ? 1 : 0 });
      await waitFor(() => b.stats().messagesIn > 10_000, 20_000, "load");
      await b.close();
      for (const p of pubs) p.end(true);
      slow.end(true);
      await new Promise((r) => setTimeout(r, 200));
      expect(errors).toEqual([]);
    } finally {
      process.off("uncaughtException", onErr);
      t3.cleanup();
    }
  });
});
