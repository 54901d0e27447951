import mqttPacket from "mqtt-packet";
import { describe, expect, it } from "vitest";
import { PacketGuard } from "@/lib/broker/packet-guard";

const limits = { maxPacketBytes: 1_000, maxConnectBytes: 200, maxPreAuthBytes: 2_000 };
// Encoded by mqtt-packet (the library aedes parses with), not by the code under test.
const connect = mqttPacket.generate({ cmd: "connect", protocolId: "MQTT", protocolVersion: 4, clientId: "hp-1", clean: true, keepalive: 30 });
const publish = (bytes: number) =>
  mqttPacket.generate({ cmd: "publish", topic: "a/b", payload: Buffer.alloc(bytes), qos: 1, messageId: 7, retain: false, dup: false });

describe("packet guard", () => {
  it("passes ordinary packets however the stream is cut", () => {
    const stream = Buffer.concat([connect, publish(10), publish(900), publish(0)]);
    for (const cut of [1, 2, 3, 7, 64, stream.length]) {
      const g = new PacketGuard(limits);
      g.authenticated = true;
      for (let i = 0; i < stream.length; i += cut) expect(g.check(stream.subarray(i, i + cut))).toBeNull();
    }
  });

  it("refuses anything but CONNECT first", () => {
    expect(new PacketGuard(limits).check(publish(1))).toBe("not_connect_first");
  });

  it("refuses an oversized CONNECT from its fixed header alone", () => {
    // MQTT 3.1.1 §2.2.3: remaining length 100,000,000 = 0x80 0xC2 0xD7 0x2F
    expect(new PacketGuard(limits).check(Buffer.from([0x10, 0x80, 0xc2, 0xd7, 0x2f]))).toBe("connect_too_large");
  });

  it("refuses a packet over the limit after sign-in, from its header", () => {
    const g = new PacketGuard(limits);
    expect(g.check(connect)).toBeNull();
    g.authenticated = true;
    expect(g.check(publish(2_000).subarray(0, 4))).toBe("packet_too_large");
  });

  it("caps the bytes accepted before sign-in", () => {
    const g = new PacketGuard(limits);
    expect(g.check(connect)).toBeNull();
    expect(g.check(publish(900))).toBeNull();
    expect(g.check(publish(900))).toBeNull();
    expect(g.check(publish(900))).toBe("pre_auth_bytes");
  });

  it("refuses a remaining length longer than four bytes", () => {
    expect(new PacketGuard(limits).check(Buffer.from([0x10, 0xff, 0xff, 0xff, 0xff, 0x01]))).toBe("malformed_length");
  });
});
