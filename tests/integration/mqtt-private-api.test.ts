import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { Aedes } from "aedes";
import mqtt, { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

// The ingester acknowledges a QoS 1 message only after its row is committed (lib/ingester/ingester.ts). mqtt.js has
// no public hook for that, so the ingester replaces the client's private `_sendPacket` and holds every PUBACK that
// mqtt.js hands to it. These tests fail loudly when an mqtt.js upgrade moves that seam: then the ingester would
// acknowledge before the commit again, and a crash between acknowledgement and commit would lose readings.

const root = path.resolve(import.meta.dirname, "../..");
const LOUD = "mqtt.js changed the private seam the ingester's acknowledgement-after-commit relies on; see lib/ingester/ingester.ts";

type SendPacket = (packet: { cmd: string; messageId?: number }, cb?: (err?: Error) => void, ...rest: unknown[]) => void;

let broker: Awaited<ReturnType<typeof Aedes.createBroker>>;
let server: net.Server;
let url: string;

beforeAll(async () => {
  broker = await Aedes.createBroker();
  server = net.createServer(broker.handle);
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  url = `mqtt://127.0.0.1:${(server.address() as net.AddressInfo).port}`;
});
afterAll(async () => {
  await new Promise<void>((r) => broker.close(() => r()));
  await new Promise<void>((r) => server.close(() => r()));
});

describe("mqtt.js: the private method behind acknowledgement after commit", () => {
  it("is pinned to an exact version, and that version is installed", () => {
    const wanted = (JSON.parse(fs.readFileSync(path.join(root, "package.json"), "utf8")) as { dependencies: Record<string, string> })
      .dependencies.mqtt;
    const installed = (JSON.parse(fs.readFileSync(path.join(root, "node_modules/mqtt/package.json"), "utf8")) as { version: string })
      .version;
    expect(wanted, "keep mqtt pinned exactly (no ^ or ~): the ingester patches a private method").toMatch(/^\d+\.\d+\.\d+$/);
    expect(installed, LOUD).toBe(wanted);
  });

  it("has MqttClient.prototype._sendPacket(packet, callback, …)", () => {
    const proto = MqttClient.prototype as unknown as { _sendPacket?: unknown };
    expect(typeof proto._sendPacket, LOUD).toBe("function");
  });

  // MQTT 3.1.1 only: aedes speaks no MQTT 5, and mqtt.js sends a PUBACK through the same path at both levels.
  it("hands every PUBACK of a received QoS 1 message to _sendPacket", async () => {
    const protocolVersion = 4;
    const sub = await mqtt.connectAsync(url, { clientId: `seam-sub-${protocolVersion}`, protocolVersion, reconnectPeriod: 0 });
    const pub = await mqtt.connectAsync(url, { clientId: `seam-pub-${protocolVersion}`, protocolVersion, reconnectPeriod: 0 });
    try {
      const raw = sub as unknown as { _sendPacket: SendPacket; stream: { write?: unknown } };
      expect(typeof raw.stream.write, `${LOUD} (the held acknowledgements are written to client.stream)`).toBe("function");
      const original = raw._sendPacket.bind(sub);
      const held: number[] = [];
      let callbacks = 0;
      raw._sendPacket = (packet, cb, ...rest) => {
        if (packet.cmd !== "puback") return original(packet, cb, ...rest);
        if (packet.messageId !== undefined) held.push(packet.messageId);
        if (typeof cb === "function") callbacks++;
        cb?.();
      };
      const received: number[] = [];
      sub.on("message", (_topic, _payload, packet) => {
        if (packet.messageId !== undefined) received.push(packet.messageId);
      });
      await sub.subscribeAsync("seam/#", { qos: 1 });
      for (let i = 0; i < 3; i++) await pub.publishAsync(`seam/${i}`, `reading ${i}`, { qos: 1 });
      const deadline = Date.now() + 5_000;
      while (received.length < 3 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 10));

      expect(received).toHaveLength(3);
      expect(held, LOUD).toEqual(received);
      expect(callbacks, `${LOUD} (the callback argument)`).toBe(3);
    } finally {
      await pub.endAsync();
      await sub.endAsync(true);
    }
  });
});
